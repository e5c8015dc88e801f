import { logBeta } from "./logGamma.js";

/**
 * Regularized incomplete beta I_x(a, b) by its continued fraction evaluated
 * with the modified Lentz method (Lentz 1976, Applied Optics 15:668; the
 * fraction is Abramowitz & Stegun 1964, 26.5.8), using the symmetry
 * I_x(a, b) = 1 − I_{1−x}(b, a) where the fraction converges slowly.
 * `complement` is 1 − x, passed separately so that callers who know it
 * exactly (e.g. t²/(ν + t²)) lose no digits forming it.
 */
export function regularizedIncompleteBeta(x: number, a: number, b: number, complement = 1 - x): number {
  if (Number.isNaN(x) || Number.isNaN(a) || Number.isNaN(b)) return NaN;
  if (x <= 0) return 0;
  if (complement <= 0) return 1;
  if (x > (a + 1) / (a + b + 2)) return 1 - fractionTerm(complement, b, a, x);
  return fractionTerm(x, a, b, complement);
}

/** x^a (1−x)^b / (a B(a,b)) times the continued fraction; accurate when x < (a+1)/(a+b+2). */
function fractionTerm(x: number, a: number, b: number, complement: number): number {
  const logFront = a * Math.log(x) + b * Math.log(complement) - logBeta(a, b);
  const front = Math.exp(logFront) / a;
  if (front === 0) return 0;
  return front * continuedFraction(x, a, b);
}

function continuedFraction(x: number, a: number, b: number): number {
  const tiny = 1e-300;
  const epsilon = 1e-16;
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < tiny) d = tiny;
  d = 1 / d;
  let result = d;
  for (let m = 1; m <= 10_000; m++) {
    const m2 = 2 * m;
    // Even step.
    let numerator = (m * (b - m) * x) / ((a + m2 - 1) * (a + m2));
    d = 1 + numerator * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + numerator / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    result *= d * c;
    // Odd step.
    numerator = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + m2 + 1));
    d = 1 + numerator * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + numerator / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    result *= delta;
    if (Math.abs(delta - 1) < epsilon) break;
  }
  return result;
}
