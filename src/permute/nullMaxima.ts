import type { InferenceSpec, Tail } from "../common/inferenceOptions.js";
import { signsOfTail, UnionFind } from "../network/components.js";
import { ThresholdFreeEnhancer, type EnhancementParameters } from "../network/thresholdFree.js";

/**
 * What one relabeling contributes to the null distributions: the largest
 * component's extent and mass at the primary threshold (each maximised on
 * its own, over both signs for a two-tailed test), the largest statistic
 * (|t| when two-tailed; the maximum statistic of Westfall & Young 1993), and
 * as extra columns the same component maxima at every further threshold of
 * a sweep and the largest threshold-free enhanced value. 0 when nothing is
 * supra-threshold.
 *
 * One pass over the edges collects the edges above the lowest threshold
 * (per sign); every threshold then works on that short list only.
 */
export interface NullMeasureOptions {
  /** Primary threshold first, then the rest of a sweep. */
  thresholds: readonly number[];
  tail: Tail;
  /** When set, the largest enhanced value is recorded as `max_enhanced`. */
  enhancement?: EnhancementParameters;
}

/**
 * The null measures a design asks for: its thresholds, primary first (none is
 * ever reached when only the largest statistic is wanted), the tail tested
 * and the enhancement of threshold-free inference.
 */
export function nullMeasureOptions(inference: InferenceSpec, tail: Tail, largestStatisticOnly = false): NullMeasureOptions {
  return {
    thresholds: largestStatisticOnly ? [Infinity] : inference.thresholds,
    enhancement: inference.method === "threshold-free" ? inference.enhancement : undefined,
    tail,
  };
}

/** Names of the extra null columns for these options, in order. */
export function extraNullColumns(options: NullMeasureOptions): string[] {
  const names: string[] = [];
  for (const threshold of options.thresholds.slice(1)) names.push(`max_extent_t${threshold}`, `max_mass_t${threshold}`);
  if (options.enhancement) names.push("max_enhanced");
  return names;
}

export class NullMaxima {
  private readonly sets: UnionFind;
  private readonly edgesOfRoot: Int32Array;
  private readonly massOfRoot: Float64Array;
  private readonly signs: (1 | -1)[];
  private readonly supra: Int32Array;
  private readonly lowest: number;
  private readonly enhancer?: ThresholdFreeEnhancer;
  private readonly enhanced?: Float64Array;
  readonly extraNames: string[];

  constructor(
    readonly regionA: Uint32Array,
    readonly regionB: Uint32Array,
    regionCount: number,
    readonly options: NullMeasureOptions,
  ) {
    this.sets = new UnionFind(regionCount);
    this.edgesOfRoot = new Int32Array(regionCount);
    this.massOfRoot = new Float64Array(regionCount);
    this.signs = signsOfTail(options.tail);
    this.supra = new Int32Array(regionA.length);
    this.lowest = Math.min(...options.thresholds);
    this.extraNames = extraNullColumns(options);
    if (options.enhancement) {
      this.enhancer = new ThresholdFreeEnhancer(regionA, regionB, regionCount, options.enhancement);
      this.enhanced = new Float64Array(regionA.length);
    }
  }

  /** Largest extent and mass among the listed edges above `threshold` (edges in ascending order, as observed components sum them). */
  private largest(statistic: ArrayLike<number>, count: number, threshold: number, sign: 1 | -1): [number, number] {
    const { sets, supra, regionA, regionB } = this;
    sets.reset();
    let any = false;
    for (let k = 0; k < count; k++) {
      const e = supra[k];
      if (sign * statistic[e] > threshold) {
        sets.union(regionA[e], regionB[e]);
        any = true;
      }
    }
    if (!any) return [0, 0];
    this.edgesOfRoot.fill(0);
    this.massOfRoot.fill(0);
    let maxExtent = 0;
    let maxMass = 0;
    for (let k = 0; k < count; k++) {
      const e = supra[k];
      const value = sign * statistic[e];
      if (value > threshold) {
        const root = sets.find(regionA[e]);
        const extent = ++this.edgesOfRoot[root];
        const mass = (this.massOfRoot[root] += value - threshold);
        if (extent > maxExtent) maxExtent = extent;
        if (mass > maxMass) maxMass = mass;
      }
    }
    return [maxExtent, maxMass];
  }

  /** Measures one relabeling's statistics; extra columns go to `extra` (length extraNames.length). */
  measure(statistic: ArrayLike<number>, extra?: Float64Array): { maxExtent: number; maxMass: number; maxStatistic: number } {
    return this.measureEdges(statistic, undefined, 0, extra);
  }

  /**
   * As measure, reading only the `count` listed edges (ascending) of `statistic`:
   * the same result whenever every other edge is at or below the lowest
   * threshold and some listed edge is above it (the screened path, screening.ts).
   * Not for threshold-free enhancement, which needs every edge.
   */
  measureListed(statistic: ArrayLike<number>, listed: Int32Array, count: number, extra?: Float64Array) {
    if (this.enhancer) throw new Error("internal: threshold-free enhancement needs every edge's statistic");
    return this.measureEdges(statistic, listed, count, extra);
  }

  private measureEdges(
    statistic: ArrayLike<number>,
    listed: Int32Array | undefined,
    listedCount: number,
    extra?: Float64Array,
  ): { maxExtent: number; maxMass: number; maxStatistic: number } {
    const { thresholds } = this.options;
    let maxStatistic = -Infinity;
    const sweep = new Float64Array(2 * thresholds.length);
    for (const sign of this.signs) {
      let count = 0;
      if (listed) {
        for (let k = 0; k < listedCount; k++) {
          const e = listed[k];
          const value = sign * statistic[e];
          if (value > maxStatistic) maxStatistic = value;
          if (value > this.lowest) this.supra[count++] = e;
        }
      } else {
        const E = statistic.length;
        for (let e = 0; e < E; e++) {
          const value = sign * statistic[e];
          if (value > maxStatistic) maxStatistic = value;
          if (value > this.lowest) this.supra[count++] = e;
        }
      }
      thresholds.forEach((threshold, i) => {
        const [extent, mass] = this.largest(statistic, count, threshold, sign);
        if (extent > sweep[2 * i]) sweep[2 * i] = extent;
        if (mass > sweep[2 * i + 1]) sweep[2 * i + 1] = mass;
      });
    }
    if (extra) {
      for (let i = 1; i < thresholds.length; i++) {
        extra[2 * (i - 1)] = sweep[2 * i];
        extra[2 * (i - 1) + 1] = sweep[2 * i + 1];
      }
      if (this.enhancer && this.enhanced) {
        this.enhancer.enhanceTail(statistic, this.signs, this.enhanced);
        let top = 0;
        for (let e = 0; e < this.enhanced.length; e++) {
          const value = Math.abs(this.enhanced[e]);
          if (value > top) top = value;
        }
        extra[extra.length - 1] = top;
      }
    }
    return { maxExtent: sweep[0], maxMass: sweep[1], maxStatistic: maxStatistic === -Infinity ? NaN : maxStatistic };
  }
}
