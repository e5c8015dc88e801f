import { studentTUpperTail } from "../statistics/studentT.js";
import type { Tail } from "../common/inferenceOptions.js";
import type { KernelData } from "./permutedStatistics.js";
import type { TwoLevelEffect } from "./kernels/groupSums.js";

/**
 * Screening with exact answers. The permuted sums are computed first
 * approximately and fast (the products of weights and residuals in 16-bit
 * integers, quantizedScales below; the two-level path's group sums in single
 * precision, twice the SIMD lanes of double); a rigorous bound on their error
 * then tells which (relabeling, edge) pairs could
 * possibly have |t| at or above the lowest threshold, and only those are
 * recomputed in double precision with the reference kernel's order of
 * operations. Every other pair is certainly below every threshold, so the null
 * maxima (extent, mass and the largest statistic, whenever some edge passes the
 * threshold) are the reference kernel's to the last bit; a relabeling where no
 * edge passes is recomputed whole.
 *
 * The single-precision bound (Higham 2002, Accuracy and Stability of Numerical
 * Algorithms, 2nd ed., SIAM, §3.1, eq. 3.5): a sum of n products evaluated in any order with
 * unit roundoff u is within γ_n·Σ|w_s||r_s| of the exact sum, γ_n = n·u/(1 − n·u).
 * Rounding the inputs to single precision adds two more factors (1 + u), so the
 * single-precision sum is within γ_{S+2}(2⁻²⁴)·‖w‖∞·‖R_e‖₁ of the exact one, and
 * the reference double-precision sum within γ_S(2⁻⁵³)·‖w‖∞·‖R_e‖₁. The screen
 * uses twice γ_{S+2} at u = 2⁻²³ (one unit in the last place, whatever the
 * rounding), which covers both with room, plus an absolute term for values that
 * underflow single precision. ‖w‖∞ does not change under permutation or sign
 * flipping, so each edge's scale κ·‖R_e‖₁ is computed once.
 *
 * Edges whose residuals lie outside [2⁻⁴⁰, 2⁴⁰] in magnitude (or are all zero)
 * are not screened: they are recomputed for every relabeling.
 */

/** Relative margin on the threshold: covers the rounding of the reference statistic and of the screen's own arithmetic. */
export const THRESHOLD_MARGIN = 1e-6;
/** Screening is used only when the reference statistic's rounding is far inside the margin: (df + h²)/df below this. */
const MAX_CONDITION = 1e4;
/** Above this expected fraction of listed edges per relabeling, recomputing would cost more than it saves. */
const MAX_LISTED_FRACTION = 0.05;
const SCALE_LOW = 2 ** -40;
const SCALE_HIGH = 2 ** 40;
/** Covers the absolute error of values below single precision's normal range (2⁻¹²⁶), S of them. */
const UNDERFLOW_PER_SUBJECT = 2 ** -100;

/** γ_n = n·u / (1 − n·u) (Higham 2002, Lemma 3.1). */
export function gamma(n: number, unitRoundoff: number): number {
  const nu = n * unitRoundoff;
  return nu < 1 ? nu / (1 - nu) : Infinity;
}

export interface ResidualScales {
  /** κ·‖R_e‖₁ + S·2⁻¹⁰⁰ per edge, then `padding` zeros: multiplied by ‖w‖∞ it bounds a sum's error. */
  scale: Float64Array;
  /** Edges the screen cannot bound (ascending): recomputed for every relabeling. */
  forced: Int32Array;
}

/** Whether an edge's largest residual (or a vector's largest weight) lies where the screen's bounds hold. */
function inScreenRange(largest: number): boolean {
  return largest >= SCALE_LOW && largest <= SCALE_HIGH;
}

/** ‖R_e‖₁ and ‖R_e‖∞ of the S residuals from `at`. */
function edgeNorms(residuals: Float64Array, at: number, S: number): { l1: number; largest: number } {
  let l1 = 0;
  let largest = 0;
  for (let s = 0; s < S; s++) {
    const v = Math.abs(residuals[at + s]);
    l1 += v;
    if (v > largest) largest = v;
  }
  return { l1, largest };
}

/** Each edge's error scale, and the edges outside the screen's range. Invalid edges are neither (they stay NaN). */
export function residualScales(data: KernelData, padding: number): ResidualScales {
  const { subjects: S, edges: E, residuals, valid } = data;
  const kappa = 2 * gamma(S + 2, 2 ** -23);
  const scale = new Float64Array(E + padding);
  const forced: number[] = [];
  for (let e = 0; e < E; e++) {
    if (valid[e] === 0) continue;
    const { l1, largest } = edgeNorms(residuals, e * S, S);
    if (!inScreenRange(largest)) forced.push(e);
    // κ carries a factor 4 over the bound it needs (u = 2⁻²³ instead of 2⁻²⁴, then × 2), far more than
    // covers the double-precision rounding of ‖R_e‖₁ itself and the reference sum's own error.
    scale[e] = kappa * l1 + S * UNDERFLOW_PER_SUBJECT;
  }
  return { scale, forced: Int32Array.from(forced) };
}

/**
 * The products screen in 16-bit integers (kernels/build/quantizedScreenWat.mjs). Each edge's
 * residuals are rounded to integers q_R = nearest(R / σ_e) on the step σ_e = ‖R_e‖∞ / 4095
 * (rounded up to single precision), each relabeled vector's weights to q_w = nearest(w / τ_k),
 * τ_k = ‖v_k‖∞ / 2047; 256 products of such integers sum exactly in 32 bits. With
 * |ε_R| ≤ σ_e/2 and |ε_w| ≤ τ_k/2 the rounding errors, the exact identity
 *   Σ w·R − τσ·Σ q_w·q_R = Σ (w·ε_R + ε_w·R − ε_w·ε_R)
 * bounds the integer product's error by ‖v_k‖∞·(S·σ_e/2 + ‖R_e‖₁/(2·2047) + S·σ_e/(4·2047)).
 * The integer sums of each 256 subjects are then converted to single precision, added and
 * multiplied by σ_e and τ_k: n + 3 roundings for n chunks, within γ_{n+3}(2⁻²⁴)·τσ·Σ|q_w||q_R|
 * ≤ γ_{n+3}(2⁻²⁴)·‖v_k‖∞·(‖R_e‖₁ + S·σ_e/2) (Higham 2002, §3.1, Lemma 3.1 and eq. 3.5). The
 * reference double-precision sum is within γ_S(2⁻⁵³)·‖v_k‖∞·‖R_e‖₁ of the exact one, counted
 * twice over. So, as for the single-precision path, an error bound is ‖v_k‖∞ times a per-edge
 * scale, and the screen's test (screenKernelWat.mjs $screenTile) is the same.
 */
const RESIDUAL_LEVELS = 4095;
const WEIGHT_LEVELS = 2047;
/** Subjects per exact 32-bit sum: 256 · 2047 · 4095 < 2³¹ (the kernel's quantizedPairsPerChunk, twice; kernelSignatures.test.ts). */
export const SUBJECTS_PER_SUM = 256;
/** Covers the rounding of nearest(x · 1/step) against x / step (relative 2⁻⁵¹ of at most 4095). */
const HALF_STEP = 0.5 + 2 ** -38;
/** Covers the double-precision evaluation of the bound itself. */
const BOUND_SLACK = 1 + 2 ** -20;

export interface QuantizedScales {
  /** σ_e (single-precision values), then `padding` zeros; 0 for edges not screened. */
  step: Float32Array;
  /** 1 / σ_e, or 0 for edges not screened (their integers are 0). */
  inverse: Float64Array;
  /** The per-edge scale: multiplied by ‖v_k‖∞ it bounds the quantized product's error against the reference's. */
  bound: Float64Array;
  forced: Int32Array;
}

/** Each edge's quantization step and error scale; invalid edges, and those outside the screen's range (forced), get 0. */
export function quantizedScales(data: KernelData, padding: number): QuantizedScales {
  const { subjects: S, edges: E, residuals, valid } = data;
  const forced: number[] = [];
  const step = new Float32Array(E + padding);
  const inverse = new Float64Array(E + padding);
  const bound = new Float64Array(E + padding);
  const reference = 2 * gamma(S + 2, 2 ** -53);
  const sums = Math.ceil(S / SUBJECTS_PER_SUM);
  const conversion = gamma(sums + 3, 2 ** -24);
  const wStep = (1 + 2 ** -22) / WEIGHT_LEVELS;
  for (let e = 0; e < E; e++) {
    if (valid[e] === 0) continue;
    const { l1, largest } = edgeNorms(residuals, e * S, S);
    // As for residualScales: edges outside the screen's range are recomputed for every relabeling.
    if (!inScreenRange(largest)) {
      forced.push(e);
      continue;
    }
    const sigma = float32AtLeast(largest / RESIDUAL_LEVELS);
    step[e] = sigma;
    inverse[e] = 1 / sigma;
    const roundR = S * sigma * HALF_STEP;
    const roundW = HALF_STEP * wStep * l1;
    const both = S * sigma * HALF_STEP * HALF_STEP * wStep;
    const converted = conversion * (1 + 2 ** -22) * (l1 + S * sigma * HALF_STEP);
    bound[e] = BOUND_SLACK * (reference * l1 + S * UNDERFLOW_PER_SUBJECT + roundR + roundW + both + converted);
  }
  return { step, inverse, bound, forced: Int32Array.from(forced) };
}

/** τ_k (single-precision values, rounded up) and 1/τ_k for each relabeled vector from its ‖v_k‖∞. */
export function weightSteps(norms: Float64Array): { step: Float64Array; inverse: Float64Array } {
  const step = norms.map((n) => float32AtLeast(n / WEIGHT_LEVELS));
  return { step, inverse: step.map((t) => 1 / t) };
}

/** ‖v‖∞ of each relabeled vector, or undefined when one lies outside the screen's range. */
export function vectorScales(vectors: Float64Array[]): Float64Array | undefined {
  const out = new Float64Array(vectors.length);
  for (let k = 0; k < vectors.length; k++) {
    let largest = 0;
    for (const v of vectors[k]) largest = Math.max(largest, Math.abs(v));
    if (!inScreenRange(largest)) return undefined;
    out[k] = largest;
  }
  return out;
}

/**
 * Whether screening pays and is sound for these settings: a t statistic, a
 * positive lowest threshold with (df + h²)/df small enough that the reference
 * statistic's rounding lies well inside THRESHOLD_MARGIN, and few edges expected
 * above the threshold (two-sided Student t tail at most MAX_LISTED_FRACTION).
 */
export function screeningApplies(lowestThreshold: number, df: number): boolean {
  if (!(df >= 1) || !(lowestThreshold > 0) || !Number.isFinite(lowestThreshold)) return false;
  if ((df + lowestThreshold * lowestThreshold) / df > MAX_CONDITION) return false;
  return 2 * studentTUpperTail(lowestThreshold, df) <= MAX_LISTED_FRACTION;
}

/** The threshold the screen tests against: a little below the lowest, so that rounding can only add pairs. */
export function screenThreshold(lowestThreshold: number): number {
  return lowestThreshold * (1 - THRESHOLD_MARGIN);
}

/** Which signs of the numerator can pass: [upper, lower]. */
export function tailSides(tail: Tail): [boolean, boolean] {
  return [tail !== "lower", tail !== "upper"];
}

const f32 = new Float32Array(1);
const f32Bits = new Int32Array(f32.buffer);

/** The largest single-precision value ≤ x (x not NaN). */
export function float32AtMost(x: number): number {
  const f = Math.fround(x);
  if (f <= x) return f;
  f32[0] = f;
  if (f === 0) f32Bits[0] = 0x80000001 | 0;
  else if (f > 0) f32Bits[0] -= 1;
  else f32Bits[0] += 1;
  return f32[0];
}

/** The smallest single-precision value ≥ x (x not NaN). */
export function float32AtLeast(x: number): number {
  return -float32AtMost(-x);
}

/**
 * The two-level path (kernels/groupSums.ts): a = d·Σ_{s∈G} R_s + o·ΣR is linear
 * in the group sum, and |t| ≥ h exactly when a² ≥ h²·‖R‖²·x̃'x̃ / (df + h²), so
 * each edge gets an interval of group sums that certainly stay below the
 * threshold. sHi[e] (sLo[e]): a single-precision sum at or above (at or below)
 * it is listed. The error of a is at most (|d| + |o|)·scale_e (the group sum's,
 * and the rounding of forming a); unused sides and invalid or forced edges get
 * ±∞ (forced edges are listed by the caller).
 */
export function groupSumBounds(
  data: KernelData,
  level: TwoLevelEffect,
  residualSum: Float64Array,
  scales: ResidualScales,
  lowestThreshold: number,
  tail: Tail,
  padding: number,
): { sLo: Float32Array; sHi: Float32Array } {
  const { edges: E, sumSquares, valid, effectNorm2, df } = data;
  const sLo = new Float32Array(E + padding).fill(-Infinity);
  const sHi = new Float32Array(E + padding).fill(Infinity);
  const h = screenThreshold(lowestThreshold);
  const [upper, lower] = tailSides(tail);
  const d = level.difference;
  const o = level.other;
  const forced = new Set(scales.forced);
  for (let e = 0; e < E; e++) {
    if (valid[e] === 0 || forced.has(e)) continue;
    const reach = h * Math.sqrt((sumSquares[e] * effectNorm2) / (df + h * h));
    const shift = o * residualSum[e];
    // Slack for the rounding of these few operations, relative to the values involved.
    const error = (Math.abs(d) + Math.abs(o)) * scales.scale[e] + 1e-9 * (reach + Math.abs(shift));
    // a ≥ reach is possible iff d·s ≥ reach − error − shift; a ≤ −reach iff d·s ≤ −reach + error − shift.
    const upperEdge = (reach - error - shift) / d;
    const lowerEdge = (-reach + error - shift) / d;
    if (d > 0) {
      if (upper) sHi[e] = float32AtMost(upperEdge);
      if (lower) sLo[e] = float32AtLeast(lowerEdge);
    } else {
      if (upper) sLo[e] = float32AtLeast(upperEdge);
      if (lower) sHi[e] = float32AtMost(lowerEdge);
    }
  }
  return { sLo, sHi };
}
