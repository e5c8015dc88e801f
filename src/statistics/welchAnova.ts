import { fisherFUpperTail } from "./fisherF.js";
import { mean, variance } from "./describe.js";

/**
 * Welch's one-way analysis of variance: equality of k ≥ 2 means without
 * assuming equal variances (Welch 1951, Biometrika 38:330). With weights
 * wᵢ = nᵢ/sᵢ², W = Σwᵢ, the weighted mean m = Σwᵢmᵢ/W and
 * Λ = Σ(1 − wᵢ/W)²/(nᵢ − 1):
 *   F = [Σwᵢ(mᵢ − m)²/(k − 1)] / [1 + 2(k − 2)Λ/(k² − 1)],
 * referred to F(k − 1, (k² − 1)/(3Λ)). NaN when a group has fewer than two
 * values or zero variance. O(Σnᵢ).
 */
export interface WelchAnova {
  statistic: number;
  df1: number;
  df2: number;
  pValue: number;
}

export function welchAnova(groups: ArrayLike<number>[]): WelchAnova {
  const none = { statistic: NaN, df1: NaN, df2: NaN, pValue: NaN };
  const k = groups.length;
  if (k < 2) return none;
  const weights: number[] = [];
  const means: number[] = [];
  for (const group of groups) {
    const v = variance(group);
    if (!(v > 0)) return none;
    weights.push(group.length / v);
    means.push(mean(group));
  }
  const total = weights.reduce((s, w) => s + w, 0);
  const weightedMean = weights.reduce((s, w, i) => s + w * means[i], 0) / total;
  let between = 0;
  let lambda = 0;
  for (let i = 0; i < k; i++) {
    between += weights[i] * (means[i] - weightedMean) ** 2;
    lambda += (1 - weights[i] / total) ** 2 / (groups[i].length - 1);
  }
  const statistic = between / (k - 1) / (1 + (2 * (k - 2) * lambda) / (k * k - 1));
  const df1 = k - 1;
  const df2 = (k * k - 1) / (3 * lambda);
  return { statistic, df1, df2, pValue: fisherFUpperTail(statistic, df1, df2) };
}
