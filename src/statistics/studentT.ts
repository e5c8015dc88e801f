import { regularizedIncompleteBeta } from "./incompleteBeta.js";

/**
 * Upper tail P(T_ν > t) of Student's t distribution through the incomplete
 * beta function, P(|T| > t) = I_{ν/(ν+t²)}(ν/2, ½) (Abramowitz & Stegun
 * 1964, 26.7.1 and 26.5.27). Each tail is computed directly, never as
 * 1 − CDF, so that p-values for large t keep their precision.
 */
/** Degrees of freedom beyond which the tails lose accuracy (error grows like ν·ε); NaN is returned there. */
export const MAX_DEGREES_OF_FREEDOM = 1e10;

export function studentTUpperTail(t: number, df: number): number {
  if (Number.isNaN(t) || !(df > 0) || !(df <= MAX_DEGREES_OF_FREEDOM)) return NaN;
  if (t === Infinity) return 0;
  if (t === -Infinity) return 1;
  const t2 = t * t;
  // x = ν/(ν+t²) and 1−x = t²/(ν+t²), both formed without cancellation.
  const x = df / (df + t2);
  const complement = t2 / (df + t2);
  const twoTailed = regularizedIncompleteBeta(x, df / 2, 0.5, complement);
  return t >= 0 ? 0.5 * twoTailed : 1 - 0.5 * twoTailed;
}

/** Lower tail P(T_ν ≤ t), by symmetry P(T_ν ≤ t) = P(T_ν > −t). */
export function studentTCdf(t: number, df: number): number {
  return studentTUpperTail(-t, df);
}

/**
 * Quantile: the t with P(T_ν ≤ t) = p, by safeguarded Newton steps on the
 * tail that is smaller (so that p near 1 keeps its precision).
 */
export function studentTQuantile(p: number, df: number): number {
  if (!(p >= 0 && p <= 1) || !(df > 0) || !(df <= MAX_DEGREES_OF_FREEDOM)) return NaN;
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  if (p === 0.5) return 0;
  const upper = p > 0.5;
  const tail = upper ? 1 - p : p; // the target tail mass beyond |t|
  // Bracket [0, hi] with P(T > hi) < tail.
  let lo = 0;
  let hi = 1;
  while (studentTUpperTail(hi, df) > tail) {
    lo = hi;
    hi *= 2;
    if (hi > 1e300) break;
  }
  let t = (lo + hi) / 2;
  for (let iteration = 0; iteration < 200; iteration++) {
    const f = studentTUpperTail(t, df) - tail;
    if (f === 0) break;
    if (f > 0) lo = t;
    else hi = t;
    const density = studentTDensity(t, df);
    let next = density > 0 ? t + f / density : (lo + hi) / 2;
    if (!(next > lo && next < hi)) next = (lo + hi) / 2;
    if (Math.abs(next - t) <= 1e-15 * Math.max(1, Math.abs(t))) {
      t = next;
      break;
    }
    t = next;
  }
  return upper ? t : -t;
}

/** Density of Student's t (Abramowitz & Stegun 1964, 26.7.1). */
export function studentTDensity(t: number, df: number): number {
  const logNorm = logGammaHalfRatio(df) - 0.5 * Math.log(df * Math.PI);
  return Math.exp(logNorm - ((df + 1) / 2) * Math.log1p((t * t) / df));
}

import { logBeta } from "./logGamma.js";

/** ln[Γ((ν+1)/2) / Γ(ν/2)] = −ln B(ν/2, ½) + ln Γ(½). */
function logGammaHalfRatio(df: number): number {
  return -logBeta(df / 2, 0.5) + 0.5 * Math.log(Math.PI);
}
