import { studentTUpperTail } from "../statistics/studentT.js";
import { statisticsAtEdges, type KernelData } from "./permutedStatistics.js";
import { groupStatisticsAtEdges, residualSums, type TwoLevelEffect } from "./kernels/groupSums.js";
import { screeningInstance, type KernelChoice } from "./kernels/selectKernel.js";
import { quantizedResident, type GroupSumBounds } from "./kernels/wasmKernel.js";
import type { Tail } from "../common/inferenceOptions.js";
import type { NullMaxima } from "./nullMaxima.js";
import type { NullContext, NullRecorder, ScreenTally } from "./nullRangeTypes.js";
import { relabelingWriter } from "./relabelingWriter.js";
import {
  groupSumBounds,
  quantizedScales,
  residualScales,
  screenThreshold,
  screeningApplies,
  tailSides,
  vectorScales,
  type QuantizedScales,
  type ResidualScales,
} from "./screening.js";

/**
 * The screened path (screening.ts explains why it is exact): per batch, the
 * screening kernel (integer products, or single-precision group sums) lists for each relabeling the edges whose statistic
 * could reach the lowest threshold; those are recomputed with the reference
 * order of operations (statisticAt, groupStatisticAt) and measured
 * (NullMaxima.measureListed). A relabeling where no listed edge passes the
 * threshold (so the largest statistic lies among the unlisted edges) is
 * screened again lower; one whose list overflowed, or that no lower screen
 * settles, is returned to be computed in full (nullRange.ts ExactRows). Every
 * null row is the reference kernel's, bit for bit.
 */
export interface PreparedScreen {
  batchSize: number;
  counts: Int32Array;
  lists: Int32Array;
  capacity: number;
  /** Edges listed for every relabeling (residuals the screen cannot bound), ascending. */
  forced: Int32Array;
  lowest: number;
  run(batch: number): void;
  /** Screens the next runs against another (lower) threshold. */
  retarget(threshold: number): void;
  /** Writes relabeling k into slot b of the batch. */
  fill(k: number, b: number): void;
  /** The reference statistics of slot b at the edges edges[from … from+count), into out[e]. */
  exactAtEdges(b: number, edges: Int32Array, from: number, count: number, out: Float64Array): void;
  /**
   * Near lists of the first run at `lowest` (two-level path): per slot, the edges a screen at
   * `threshold` (the first retry's) would add. A slot whose list has no edge above `lowest` is then
   * settled from both lists without another run, when its near list is complete (count ≤ capacity).
   */
  near?: { counts: Int32Array; lists: Int32Array; capacity: number; threshold: number };
}

/** Rows (relabelings × vectors) per screened batch: the panel of weights stays in the level-2 cache. */
const SCREEN_ROWS = 192;
/**
 * Rows per batch when the residuals are too large to stay resident and each batch converts them again
 * (10,000 subjects × 55,278 edges): four times as many relabelings share each conversion. Each chunk of
 * 256 subjects of the panel (768 rows: 393 kB) still stays in the level-2 cache.
 */
const STREAMED_SCREEN_ROWS = 768;
const STREAMED_MAX_RELABELINGS = 128;
/** Relabelings per screened batch on the two-level path (each tile's subset tables serve the whole batch). */
const GROUP_SCREEN_BATCH = 512;
/**
 * Each list's capacity: the listed edges expected per relabeling times a factor, plus a floor, and at
 * least an eighth of the edges. Connectomes' edges are correlated, so the count varies widely between
 * relabelings: in scenario B (t = 3, about 215 expected) some list 2,000–5,000, and an overflow costs a
 * pass of the double-precision kernel, against well under a millisecond to recompute 5,000 listed pairs.
 */
const CAPACITY_FACTOR = 8;
const CAPACITY_FLOOR = 256;
const CAPACITY_FRACTION = 1 / 8;
/**
 * Capacity of each near list. In scenario B the relabelings with no edge above t = 3 (about 3 %) have
 * 0–80 edges (median 10) between 0.8 × 3 and 3; a fuller list only means a run at the lower threshold.
 */
const NEAR_CAPACITY = 256;
/** Relabelings of a run with no edge above the near threshold either: up to this many are computed edge by edge. */
const DIRECT_LIMIT = 4;

const scalesOf = new WeakMap<KernelData, ResidualScales>();
const quantizedOf = new WeakMap<KernelData, QuantizedScales>();
const PADDING = 64;

function scalesFor(data: KernelData): ResidualScales {
  let scales = scalesOf.get(data);
  if (!scales) {
    scales = residualScales(data, PADDING);
    scalesOf.set(data, scales);
  }
  return scales;
}

function quantizedFor(data: KernelData): QuantizedScales {
  let scales = quantizedOf.get(data);
  if (!scales) {
    scales = quantizedScales(data, PADDING);
    quantizedOf.set(data, scales);
  }
  return scales;
}

const boundsOf = new WeakMap<KernelData, Map<string, GroupSumBounds>>();

/** groupSumBounds, computed once per kernel data, effect and threshold (every chunk of a run screens against the same). */
function cachedGroupSumBounds(
  data: KernelData,
  level: TwoLevelEffect,
  sums: Float64Array,
  scales: ResidualScales,
  threshold: number,
  tail: Tail,
): GroupSumBounds {
  let cache = boundsOf.get(data);
  if (!cache) {
    cache = new Map();
    boundsOf.set(data, cache);
  }
  const key = `${level.inGroup}:${level.other}:${threshold}:${tail}`;
  let bounds = cache.get(key);
  if (!bounds) {
    bounds = groupSumBounds(data, level, sums, scales, threshold, tail, PADDING);
    cache.set(key, bounds);
  }
  return bounds;
}

/** The screen for this context, or undefined where it does not apply (then every relabeling is computed in full). */
export function prepareScreen(
  context: NullContext,
  level: TwoLevelEffect | undefined,
  choice: KernelChoice | undefined,
  capacityOverride?: number,
): PreparedScreen | undefined {
  const { kernel, vectors } = context;
  if (context.enhancement || (kernel.effectVectors ?? 1) !== 1 || kernel.edges === 0) return undefined;
  const { thresholds } = context;
  const lowest = Math.min(...thresholds);
  if (!screeningApplies(lowest, kernel.df)) return undefined;
  const norms = vectorScales(vectors);
  if (!norms) return undefined;
  const instance = screeningInstance(choice);
  if (!instance) return undefined;
  const E = kernel.edges;
  const S = kernel.subjects;
  const c = vectors.length;
  const [upper, lower] = tailSides(context.tail);
  const expected = Math.min(1, 2 * studentTUpperTail(lowest, kernel.df));
  const capacity = capacityOverride ?? Math.min(E, Math.max(Math.ceil(CAPACITY_FACTOR * expected * E) + CAPACITY_FLOOR, Math.ceil(CAPACITY_FRACTION * E)));
  const writer = relabelingWriter(context);
  if (level) {
    const scales = scalesFor(kernel);
    const sums = residualSums(kernel);
    const boundsAt = (threshold: number) => cachedGroupSumBounds(kernel, level, sums, scales, threshold, context.tail);
    const nearThreshold = lowest * RETRY_FACTOR;
    const nearCapacity = capacityOverride ?? NEAR_CAPACITY;
    const near = screeningApplies(nearThreshold, kernel.df) ? { bounds: boundsAt(nearThreshold), capacity: nearCapacity } : undefined;
    const batch = instance.prepareGroupScreen(kernel, GROUP_SCREEN_BATCH, level.groupSize, boundsAt(lowest), capacity, near);
    if (!batch) return undefined;
    const G = level.groupSize;
    return {
      batchSize: GROUP_SCREEN_BATCH,
      counts: batch.counts,
      lists: batch.lists,
      capacity,
      forced: scales.forced,
      lowest,
      run: batch.run,
      retarget: (threshold) => batch.setBounds(boundsAt(threshold)),
      fill: (k, b) => writer.members(k, b, batch.members, level),
      exactAtEdges: (b, edges, from, count, out) => groupStatisticsAtEdges(kernel, level, sums, batch.members, b * G, edges, from, count, out),
      near: near && { counts: batch.nearCounts, lists: batch.nearLists, capacity: near.capacity, threshold: nearThreshold },
    };
  }
  const batchSize = quantizedResident(S, E)
    ? Math.max(1, Math.floor(SCREEN_ROWS / c))
    : Math.max(1, Math.min(STREAMED_MAX_RELABELINGS, Math.floor(STREAMED_SCREEN_ROWS / c)));
  const quantized = quantizedFor(kernel);
  const batch = instance.prepareScreen(kernel, batchSize, c, {
    quantized,
    valid: screenedEdges(kernel.valid, quantized.forced),
    norms,
    threshold: screenThreshold(lowest),
    upper,
    lower,
    capacity,
  });
  if (!batch) return undefined;
  return {
    batchSize,
    counts: batch.counts,
    lists: batch.lists,
    capacity,
    forced: quantized.forced,
    lowest,
    run: batch.run,
    retarget: (threshold) => batch.setThreshold(screenThreshold(threshold)),
    fill: (k, b) => writer.weights(k, b, batch.weights),
    exactAtEdges: (b, edges, from, count, out) => statisticsAtEdges(kernel, batch.weights, b * c * S, c, edges, from, count, out),
  };
}

/** The valid flags without the forced edges (those are listed separately, never by the kernel). */
function screenedEdges(valid: Uint8Array, forced: Int32Array): Uint8Array {
  if (forced.length === 0) return valid;
  const out = Uint8Array.from(valid);
  for (const e of forced) out[e] = 0;
  return out;
}

/** Each retry lowers the screen's threshold by this factor, for relabelings where no listed edge passed. */
const RETRY_FACTOR = 0.8;
const RETRIES = 2;

/**
 * Relabelings from..to−1 through the screen; returns those it cannot settle
 * (to be computed in full). A relabeling where no listed edge passes the
 * threshold has its largest statistic among the unlisted edges; it is screened
 * again against lower thresholds (while screening still applies), where the
 * largest statistic then passes and is listed.
 */
export function screenedRows(
  context: NullContext,
  screen: PreparedScreen,
  maxima: NullMaxima,
  record: NullRecorder,
  from: number,
  to: number,
  tally?: ScreenTally,
): number[] {
  const full: number[] = [];
  let pending = Array.from({ length: to - from }, (_, i) => from + i);
  let threshold = screen.lowest;
  for (let attempt = 0; pending.length > 0; attempt++) {
    if (attempt > 0) {
      threshold *= RETRY_FACTOR;
      if (attempt > RETRIES || !screeningApplies(threshold, context.kernel.df)) {
        full.push(...pending);
        break;
      }
      screen.retarget(threshold);
    }
    const { passed, overflowed } = screenList(context, screen, maxima, record, pending, threshold, tally);
    full.push(...overflowed);
    pending = passed;
  }
  return full.sort((a, b) => a - b);
}

/** Screens the listed relabelings against `threshold`; returns those with no listed edge above it, and those whose list overflowed. */
function screenList(
  context: NullContext,
  screen: PreparedScreen,
  maxima: NullMaxima,
  record: NullRecorder,
  ks: number[],
  threshold: number,
  tally?: ScreenTally,
): { passed: number[]; overflowed: number[] } {
  const E = context.kernel.edges;
  const { counts, lists, capacity, forced } = screen;
  // Near lists hold for the first run only (a retry's bounds have none).
  const near = threshold === screen.lowest ? screen.near : undefined;
  const values = new Float64Array(E);
  const listed = new Int32Array(capacity + forced.length);
  const widened = new Int32Array(near ? capacity + forced.length + near.capacity : 0);
  const extra = new Float64Array(maxima.extraNames.length);
  const passed: number[] = [];
  const overflowed: number[] = [];
  const belowNear: number[] = [];
  for (let i = 0; i < ks.length; ) {
    const batch = Math.min(screen.batchSize, ks.length - i);
    for (let b = 0; b < batch; b++) screen.fill(ks[i + b], b);
    screen.run(batch);
    for (let b = 0; b < batch; b++) {
      const k = ks[i + b];
      const n = counts[b];
      if (n > capacity) {
        overflowed.push(k);
        continue;
      }
      const count = mergeAscending(lists, b * capacity, n, forced, 0, forced.length, listed);
      screen.exactAtEdges(b, listed, 0, count, values);
      const measured = maxima.measureListed(values, listed, count, extra);
      // Unlisted edges are below `threshold`: the largest statistic is listed only if one passes it.
      if (measured.maxStatistic > threshold) {
        record(k, measured, extra);
        continue;
      }
      // The retry's screen, read from the near list: unlisted edges are below the near threshold.
      const nearCount = near ? near.counts[b] : Infinity;
      if (near && nearCount <= near.capacity) {
        const start = b * near.capacity;
        screen.exactAtEdges(b, near.lists, start, nearCount, values);
        const total = mergeAscending(listed, 0, count, near.lists, start, nearCount, widened);
        const wider = maxima.measureListed(values, widened, total, extra);
        if (wider.maxStatistic > near.threshold) {
          record(k, wider, extra);
          if (tally) tally.near = (tally.near ?? 0) + 1;
          continue;
        }
        belowNear.push(k);
        continue;
      }
      passed.push(k);
    }
    i += batch;
  }
  // Every edge of a relabeling below the near threshold too: computed one by one when few (each costs
  // about as much as one more run of the screen, which they would need, and likely a second).
  if (belowNear.length <= DIRECT_LIMIT) {
    const everyEdge = Int32Array.from({ length: E }, (_, e) => e);
    for (const k of belowNear) {
      screen.fill(k, 0);
      screen.exactAtEdges(0, everyEdge, 0, E, values);
      record(k, maxima.measure(values, extra), extra);
    }
    if (tally) tally.direct = (tally.direct ?? 0) + belowNear.length;
  } else {
    passed.push(...belowNear);
    passed.sort((a, b) => a - b);
  }
  return { passed, overflowed };
}

/** Merges a[aStart … aStart+aCount) and b[bStart … bStart+bCount) (each ascending, disjoint) into out; returns the count. */
function mergeAscending(a: Int32Array, aStart: number, aCount: number, b: Int32Array, bStart: number, bCount: number, out: Int32Array): number {
  if (bCount === 0) {
    out.set(a.subarray(aStart, aStart + aCount));
    return aCount;
  }
  let i = aStart;
  let j = bStart;
  const aEnd = aStart + aCount;
  const bEnd = bStart + bCount;
  let o = 0;
  while (i < aEnd || j < bEnd) {
    if (j >= bEnd || (i < aEnd && a[i] < b[j])) out[o++] = a[i++];
    else out[o++] = b[j++];
  }
  return o;
}
