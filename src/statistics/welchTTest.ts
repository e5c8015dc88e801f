import { studentTUpperTail } from "./studentT.js";
import { mean, variance } from "./describe.js";

/**
 * Welch's two-sample t-test for a difference in means without assuming equal
 * variances (Welch 1947, Biometrika 34:28): t = (m₁ − m₂)/√(s₁²/n₁ + s₂²/n₂)
 * with the Welch–Satterthwaite degrees of freedom (Satterthwaite 1946,
 * Biometrics Bulletin 2:110). Two-sided p = 2 P(T_df > |t|), the tail computed
 * directly. NaN throughout when a group has fewer than two values or both
 * variances are zero. O(n₁ + n₂).
 */
export interface WelchTTest {
  statistic: number;
  df: number;
  pValue: number;
}

export function welchTTest(first: ArrayLike<number>, second: ArrayLike<number>): WelchTTest {
  const n1 = first.length;
  const n2 = second.length;
  if (n1 < 2 || n2 < 2) return { statistic: NaN, df: NaN, pValue: NaN };
  const a = variance(first) / n1;
  const b = variance(second) / n2;
  const se2 = a + b;
  if (!(se2 > 0)) return { statistic: NaN, df: NaN, pValue: NaN };
  const statistic = (mean(first) - mean(second)) / Math.sqrt(se2);
  const df = (se2 * se2) / ((a * a) / (n1 - 1) + (b * b) / (n2 - 1));
  const pValue = Math.min(1, 2 * studentTUpperTail(Math.abs(statistic), df));
  return { statistic, df, pValue };
}
