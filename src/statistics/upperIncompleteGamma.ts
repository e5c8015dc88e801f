import { logGamma } from "./logGamma.js";

/**
 * Regularized upper incomplete gamma function Q(a, x) = Γ(a, x)/Γ(a), for
 * a > 0, x ≥ 0. Below x = a + 1 it is 1 − P(a, x) with P from its power
 * series (Abramowitz & Stegun 1964, 6.5.29), where Q is not small; above, Q
 * comes directly from its continued fraction (A&S 6.5.31) evaluated by the
 * modified Lentz method (Lentz 1976, Applied Optics 15:668), so small upper
 * tails keep their precision.
 */
export function upperIncompleteGamma(a: number, x: number): number {
  if (Number.isNaN(a) || Number.isNaN(x) || !(a > 0) || x < 0) return NaN;
  if (x === 0) return 1;
  if (x === Infinity) return 0;
  const logFront = -x + a * Math.log(x) - logGamma(a);
  if (x < a + 1) return 1 - Math.exp(logFront) * lowerSeries(a, x);
  return Math.exp(logFront) * upperFraction(a, x);
}

/** Σₙ xⁿ / (a(a+1)…(a+n)), so that P(a, x) = e^{−x} x^a / Γ(a) times it. */
function lowerSeries(a: number, x: number): number {
  let term = 1 / a;
  let sum = term;
  for (let n = 1; n < 10_000; n++) {
    term *= x / (a + n);
    sum += term;
    if (Math.abs(term) < Math.abs(sum) * 1e-17) break;
  }
  return sum;
}

/** The continued fraction 1/(x+1−a− 1·(1−a)/(x+3−a− 2·(2−a)/(x+5−a− …))). */
function upperFraction(a: number, x: number): number {
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let result = d;
  for (let i = 1; i < 10_000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const step = d * c;
    result *= step;
    if (Math.abs(step - 1) < 1e-16) break;
  }
  return result;
}
