import { NullMaxima } from "./nullMaxima.js";
import type { NullChunk, NullContext, NullRecorder, ScreenTally } from "./nullRangeTypes.js";
import { twoLevelEffect, type TwoLevelEffect } from "./kernels/groupSums.js";
import { selectKernel, type KernelChoice } from "./kernels/selectKernel.js";
import { prepareScreen, screenedRows } from "./screenedRange.js";
import { relabelingWriter, type RelabelingWriter } from "./relabelingWriter.js";


export interface NullRangeOptions {
  /** The kernel (default "auto": WebAssembly SIMD where available; PLEXUS_KERNEL overrides). Results are identical. */
  kernel?: KernelChoice;
  /** Take the two-level path where it applies (default true); false forces dot products (for comparisons). */
  groupSums?: boolean;
  /**
   * Screen in single precision where it applies (default true unless
   * PLEXUS_SCREEN=off; screenedRange.ts): the same results, faster. false
   * computes every relabeling in full.
   */
  screen?: boolean;
  /** Counts, for tests and benchmarks: relabelings settled by the screen, and computed in full. */
  tally?: ScreenTally;
  /** Overrides each relabeling's list capacity (and near-list capacity) on the screened path (tests of the overflow path). */
  screenCapacity?: number;
}

/**
 * Permutations of a lone two-valued effect regressor (`model: group`) take the
 * two-level path: group sums instead of dot products (kernels/groupSums.ts).
 * Both kernels implement both paths with the same operations.
 */
function twoLevelOf(context: NullContext) {
  return context.plan.kind === "permute" && context.vectors.length === 1 && (context.kernel.effectVectors ?? 1) === 1
    ? twoLevelEffect(context.vectors[0])
    : undefined;
}

/** PLEXUS_SCREEN=off turns the screen off (benchmarks compare both); the results are the same either way. */
function screenFromEnvironment(): boolean {
  const value = typeof process === "object" ? process.env.PLEXUS_SCREEN : undefined;
  return value?.trim().toLowerCase() !== "off";
}

/** Relabelings per full computation behind the screen, which sends back few. */
const FALLBACK_BATCH = 8;

export function computeNullRange(context: NullContext, from: number, to: number, options: NullRangeOptions = {}): NullChunk {
  const count = to - from;
  const maxima = new NullMaxima(context.regionA, context.regionB, context.regionCount, context);
  const chunk: NullChunk = {
    from,
    to,
    maxExtent: new Float64Array(count),
    maxMass: new Float64Array(count),
    maxStatistic: new Float64Array(count),
    extraNames: maxima.extraNames,
    extra: maxima.extraNames.map(() => new Float64Array(count)),
  };
  const record: NullRecorder = (k, m, extra) => {
    chunk.maxExtent[k - from] = m.maxExtent;
    chunk.maxMass[k - from] = m.maxMass;
    chunk.maxStatistic[k - from] = m.maxStatistic;
    for (let j = 0; j < extra.length; j++) chunk.extra[j][k - from] = extra[j];
  };
  const level = options.groupSums === false ? undefined : twoLevelOf(context);
  const screen = (options.screen ?? screenFromEnvironment()) ? prepareScreen(context, level, options.kernel, options.screenCapacity) : undefined;
  const exact = new ExactRows(context, level, maxima, record, options.kernel, screen ? FALLBACK_BATCH : Infinity);
  let k = from;
  // The identity of an exact enumeration takes the observed values themselves.
  if (k === 1 && k < to && context.plan.exact) {
    const extra = new Float64Array(maxima.extraNames.length);
    record(1, maxima.measure(context.observed, extra), extra);
    k++;
  }
  if (screen) {
    const unsettled = screenedRows(context, screen, maxima, record, k, to, options.tally);
    exact.computeList(unsettled);
    if (options.tally) {
      options.tally.screened += to - k - unsettled.length;
      options.tally.full += unsettled.length;
    }
  } else {
    exact.compute(k, to);
    if (options.tally) options.tally.full += to - k;
  }
  return chunk;
}

/**
 * Relabelings computed in full with the statistics kernel: every relabeling
 * without screening, and those the screen cannot settle (screenedRange.ts).
 */
export class ExactRows {
  private prepared?: { statistics: Float64Array; run(batch: number): void; fill(k: number, b: number): void; batchSize: number };
  private readonly writer: RelabelingWriter;
  private readonly extra: Float64Array;

  constructor(
    private readonly context: NullContext,
    private readonly level: TwoLevelEffect | undefined,
    private readonly maxima: NullMaxima,
    private readonly record: NullRecorder,
    private readonly kernelChoice: KernelChoice | undefined,
    /** Most relabelings per kernel call: a few where it only catches what the screen sends back (less memory to touch). */
    private readonly batchCap = Infinity,
  ) {
    this.writer = relabelingWriter(context);
    this.extra = new Float64Array(maxima.extraNames.length);
  }

  private prepare() {
    if (this.prepared) return this.prepared;
    const { kernel, vectors } = this.context;
    const c = vectors.length;
    // An F contrast (several effect vectors) runs on the TypeScript kernel, which holds the F formula.
    const statisticsKernel = selectKernel((kernel.effectVectors ?? 1) > 1 ? "typescript" : this.kernelChoice);
    const batchSize = Math.max(1, Math.min(this.batchCap, statisticsKernel.batchSize(c, kernel.edges)));
    const level = this.level;
    if (level) {
      const groups = statisticsKernel.prepareGroups(kernel, batchSize, level);
      this.prepared = { ...groups, batchSize, fill: (k, b) => this.writer.members(k, b, groups.members, level) };
    } else {
      const batch = statisticsKernel.prepare(kernel, batchSize, c);
      this.prepared = { ...batch, batchSize, fill: (k, b) => this.writer.weights(k, b, batch.weights) };
    }
    return this.prepared;
  }

  /** Relabelings from..to−1. */
  compute(from: number, to: number): void {
    for (let k = from; k < to; ) {
      const batch = Math.min(this.prepare().batchSize, to - k);
      this.run(Array.from({ length: batch }, (_, b) => k + b));
      k += batch;
    }
  }

  /** The listed relabelings (at most one batch's worth at a time). */
  computeList(list: number[]): void {
    for (let i = 0; i < list.length; ) {
      const batch = Math.min(this.prepare().batchSize, list.length - i);
      this.run(list.slice(i, i + batch));
      i += batch;
    }
  }

  private run(ks: number[]): void {
    const prepared = this.prepare();
    const E = this.context.kernel.edges;
    ks.forEach((k, b) => prepared.fill(k, b));
    prepared.run(ks.length);
    ks.forEach((k, b) => this.record(k, this.maxima.measure(prepared.statistics.subarray(b * E, (b + 1) * E), this.extra), this.extra));
  }
}
