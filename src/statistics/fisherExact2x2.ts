import { logGamma } from "./logGamma.js";

/**
 * Fisher's exact test for a 2 × 2 table (Fisher 1935, Journal of the Royal
 * Statistical Society 98:39): with the margins fixed, the top-left count
 * follows the hypergeometric distribution, and the two-sided p-value sums the
 * probabilities of every table no more probable than the one observed
 * (Agresti 1992, Statistical Science 7:131), with a relative tolerance of 1e-7
 * so that tables tied in exact arithmetic are not split by rounding (the same
 * tolerance R's fisher.test uses). Probabilities are formed in log space and
 * scaled by the most probable table. O(min margin).
 */
export function fisherExact2x2(table: [[number, number], [number, number]]): number {
  const [[a, b], [c, d]] = table;
  const row1 = a + b;
  const column1 = a + c;
  const total = a + b + c + d;
  if (total === 0) return NaN;
  const low = Math.max(0, row1 + column1 - total);
  const high = Math.min(row1, column1);
  const logChoose = (n: number, k: number) => logGamma(n + 1) - logGamma(k + 1) - logGamma(n - k + 1);
  const logP: number[] = [];
  for (let x = low; x <= high; x++) logP.push(logChoose(column1, x) + logChoose(total - column1, row1 - x));
  const largest = Math.max(...logP);
  const relative = logP.map((v) => Math.exp(v - largest));
  const observed = relative[a - low];
  let all = 0;
  let asExtreme = 0;
  for (const p of relative) {
    all += p;
    if (p <= observed * (1 + 1e-7)) asExtreme += p;
  }
  return Math.min(1, asExtreme / all);
}
