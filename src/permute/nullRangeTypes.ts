import type { NullMeasureOptions } from "./nullMaxima.js";
import type { KernelData } from "./permutedStatistics.js";
import type { RelabelingPlan } from "./relabelings.js";

// What a range of null rows is computed from and what it gives back: the types that
// nullRange.ts (the chunk), screenedRange.ts (the screen) and relabelingWriter.ts share.

/**
 * Everything needed to compute null rows for one contrast (plain data;
 * shareable with workers), with the measures each relabeling records.
 */
export interface NullContext extends NullMeasureOptions {
  kernel: KernelData;
  /** x̃ then the nuisance basis vectors the relabeling must carry (see permutedStatistics). */
  vectors: Float64Array[];
  plan: RelabelingPlan;
  regionA: Uint32Array;
  regionB: Uint32Array;
  regionCount: number;
  /** The observed statistic, used as is for the identity (relabeling 1 in exact mode). */
  observed: Float64Array;
}

/** Null rows for relabelings from..to−1 (1-based k), in order. */
export interface NullChunk {
  from: number;
  to: number;
  maxExtent: Float64Array;
  maxMass: Float64Array;
  maxStatistic: Float64Array;
  /** Extra null columns (threshold sweep, enhanced maximum), named in `extraNames`. */
  extraNames: string[];
  extra: Float64Array[];
}

/** Counts of how a chunk's relabelings were computed (tests and benchmarks). */
export interface ScreenTally {
  screened: number;
  full: number;
  /** Of the screened: settled from the near lists of their first run (no edge above the threshold, no second run). */
  near?: number;
  /** Of the screened: below the near threshold too, and computed edge by edge with the per-pair recomputation. */
  direct?: number;
}

/** One relabeling's null row, recorded into the chunk. */
export type NullRecorder = (k: number, measured: { maxExtent: number; maxMass: number; maxStatistic: number }, extra: Float64Array) => void;
