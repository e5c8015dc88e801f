import type { KernelData } from "../permutedStatistics.js";

/**
 * The two-level path: when relabelings permute an effect regressor that takes
 * only two values (a two-group comparison with no other nuisance than the
 * constant, `model: group`), the numerator of the Freedman–Lane statistic
 * (see permutedStatistics.ts) is a sum over one group instead of a dot product:
 * with x̃[π(s)] = g for the subjects s in the summed group G and o elsewhere,
 *   a = Σ_s x̃[π(s)] R_s = (g − o) · Σ_{s∈G} R_s + o · Σ_s R_s,
 * additions only, over the smaller group. This file is the plain TypeScript
 * reference of that path and defines its order of operations: the group sum
 * runs over G in ascending subject order from +0, Σ_s R_s in ascending order
 * from +0, then a = (g − o)·sum + o·ΣR and t exactly as permutedStatistics
 * forms it from a. The SIMD kernel (wasmKernel.ts) follows the same order and
 * is tested to give the same bits.
 */
export interface TwoLevelEffect {
  /** The value of x̃ on the summed group (the smaller one; on a tie, subject 0's). */
  inGroup: number;
  /** The other value. */
  other: number;
  /** inGroup − other. */
  difference: number;
  /** Size of the summed group: the same for every permutation. */
  groupSize: number;
}

/** The two values of the effect regressor and the group to sum, or undefined if it takes more or fewer values. */
export function twoLevelEffect(effect: Float64Array): TwoLevelEffect | undefined {
  if (effect.length === 0) return undefined;
  const first = effect[0];
  let second = Number.NaN;
  let firstCount = 0;
  let secondCount = 0;
  for (const value of effect) {
    if (value === first) firstCount++;
    else if (secondCount === 0) {
      second = value;
      secondCount = 1;
    } else if (value === second) secondCount++;
    else return undefined;
  }
  if (secondCount === 0 || !Number.isFinite(first) || !Number.isFinite(second)) return undefined;
  const [inGroup, other, groupSize] = firstCount <= secondCount ? [first, second, firstCount] : [second, first, secondCount];
  return { inGroup, other, difference: inGroup - other, groupSize };
}

const sumsOf = new WeakMap<KernelData, Float64Array>();

/** Σ_s R[e·S + s] per edge, in ascending subject order from +0 (computed once per kernel data). */
export function residualSums(data: KernelData): Float64Array {
  const cached = sumsOf.get(data);
  if (cached) return cached;
  const { subjects: S, edges: E, residuals } = data;
  const sums = new Float64Array(E);
  for (let e = 0; e < E; e++) {
    let sum = 0;
    const at = e * S;
    for (let s = 0; s < S; s++) sum += residuals[at + s];
    sums[e] = sum;
  }
  sumsOf.set(data, sums);
  return sums;
}

/**
 * t at every edge for `batch` relabelings, each given by the ascending list of
 * the subjects in its summed group: members[b·groupSize + m]. out: batch × E.
 */
export function groupSumStatistics(
  data: KernelData,
  level: TwoLevelEffect,
  members: Int32Array,
  batch: number,
  out: Float64Array,
): void {
  const E = data.edges;
  const sums = residualSums(data);
  const G = level.groupSize;
  for (let e = 0; e < E; e++) {
    for (let b = 0; b < batch; b++) out[b * E + e] = groupStatisticAt(data, level, sums, members, b * G, e);
  }
}

/** t of one relabeling (its group members[listStart …], ascending) at edge e, in the order defined above. */
export function groupStatisticAt(
  data: KernelData,
  level: TwoLevelEffect,
  sums: Float64Array,
  members: Int32Array,
  listStart: number,
  e: number,
): number {
  const { subjects: S, residuals, valid } = data;
  if (valid[e] === 0) return NaN;
  const at = e * S;
  let sum = 0;
  const end = listStart + level.groupSize;
  for (let m = listStart; m < end; m++) sum += residuals[at + members[m]];
  return statisticOfSum(data, level, sums, e, sum);
}

/**
 * groupStatisticAt at the edges edges[from … from+count) into out[e]: four
 * edges' group sums at a time (four independent sums, each still in ascending
 * subject order from +0), so the same bits in a quarter of the dependent adds.
 */
export function groupStatisticsAtEdges(
  data: KernelData,
  level: TwoLevelEffect,
  sums: Float64Array,
  members: Int32Array,
  listStart: number,
  edges: Int32Array,
  from: number,
  count: number,
  out: Float64Array,
): void {
  const { subjects: S, residuals, valid } = data;
  const end = listStart + level.groupSize;
  const last = from + count;
  let i = from;
  for (; i + 4 <= last; i += 4) {
    const e0 = edges[i];
    const e1 = edges[i + 1];
    const e2 = edges[i + 2];
    const e3 = edges[i + 3];
    const at0 = e0 * S;
    const at1 = e1 * S;
    const at2 = e2 * S;
    const at3 = e3 * S;
    let sum0 = 0;
    let sum1 = 0;
    let sum2 = 0;
    let sum3 = 0;
    for (let m = listStart; m < end; m++) {
      const s = members[m];
      sum0 += residuals[at0 + s];
      sum1 += residuals[at1 + s];
      sum2 += residuals[at2 + s];
      sum3 += residuals[at3 + s];
    }
    out[e0] = valid[e0] === 0 ? NaN : statisticOfSum(data, level, sums, e0, sum0);
    out[e1] = valid[e1] === 0 ? NaN : statisticOfSum(data, level, sums, e1, sum1);
    out[e2] = valid[e2] === 0 ? NaN : statisticOfSum(data, level, sums, e2, sum2);
    out[e3] = valid[e3] === 0 ? NaN : statisticOfSum(data, level, sums, e3, sum3);
  }
  for (; i < last; i++) out[edges[i]] = groupStatisticAt(data, level, sums, members, listStart, edges[i]);
}

/** t at edge e from its group sum: a = (g − o)·sum + o·ΣR, then as permutedStatistics forms t from a. */
function statisticOfSum(data: KernelData, level: TwoLevelEffect, sums: Float64Array, e: number, sum: number): number {
  const a = level.difference * sum + level.other * sums[e];
  const sse = data.sumSquares[e] - (a * a) / data.effectNorm2;
  return sse > 0 ? a / Math.sqrt((sse / data.df) * data.effectNorm2) : NaN;
}
