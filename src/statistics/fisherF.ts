import { regularizedIncompleteBeta } from "./incompleteBeta.js";

/**
 * Upper tail P(F > f) of the F distribution with (d1, d2) degrees of freedom,
 * P(F > f) = I_{d2/(d2 + d1 f)}(d2/2, d1/2) (Abramowitz & Stegun 1964,
 * 26.6.2 with 26.5.27), computed directly (never as 1 − CDF).
 */
export function fisherFUpperTail(f: number, df1: number, df2: number): number {
  if (Number.isNaN(f) || !(df1 > 0) || !(df2 > 0)) return NaN;
  if (f <= 0) return 1;
  if (f === Infinity) return 0;
  const scaled = df1 * f;
  const x = df2 / (df2 + scaled);
  const complement = scaled / (df2 + scaled);
  return regularizedIncompleteBeta(x, df2 / 2, df1 / 2, complement);
}
