import { regularizedIncompleteBeta } from "../../distributions/incompleteBeta.js";

/**
 * Upper tail P(F > f) of the F distribution with (d₁, d₂) degrees of freedom,
 * through the incomplete beta function: P(F > f) = I_x(d₂/2, d₁/2) with
 * x = d₂/(d₂ + d₁f) (Abramowitz & Stegun 1964, 26.6.2 and 26.5.27). The tail
 * is computed directly, not as 1 − CDF, so small p-values keep their digits.
 */
export function fUpperTail(f: number, d1: number, d2: number): number {
  if (Number.isNaN(f) || !(d1 > 0) || !(d2 > 0)) return NaN;
  if (f <= 0) return 1;
  if (f === Infinity) return 0;
  const denominator = d2 + d1 * f;
  return regularizedIncompleteBeta(d2 / denominator, d2 / 2, d1 / 2, (d1 * f) / denominator);
}
