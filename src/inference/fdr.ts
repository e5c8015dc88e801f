/**
 * False discovery rate adjusted p-values (q-values in the sense of adjusted
 * p-values): Benjamini & Hochberg (1995, J. R. Stat. Soc. B 57:289–300) step-up,
 * q_(i) = min_{j ≥ i} min(1, m p_(j) / j), and the Benjamini & Yekutieli (2001,
 * Ann. Stat. 29:1165–1188) variant for arbitrary dependence, which multiplies
 * by Σ_{k=1..m} 1/k. Non-finite p-values (edges without a statistic) are left
 * out of m and get NaN.
 */
export type FdrVariant = "bh" | "by";

export function adjustFdr(p: ArrayLike<number>, variant: FdrVariant = "bh"): Float64Array {
  const n = p.length;
  const q = new Float64Array(n).fill(NaN);
  const order: number[] = [];
  for (let i = 0; i < n; i++) if (Number.isFinite(p[i])) order.push(i);
  const m = order.length;
  if (m === 0) return q;
  // Stable sort by p, largest first, so the running minimum walks down the ranks.
  order.sort((a, b) => p[b] - p[a] || a - b);
  let factor = 1;
  if (variant === "by") {
    factor = 0;
    for (let k = 1; k <= m; k++) factor += 1 / k;
  }
  let running = Infinity;
  for (let position = 0; position < m; position++) {
    const rank = m - position; // rank of this p among the finite ones, 1 = smallest
    const index = order[position];
    const candidate = Math.min(1, (factor * m * p[index]) / rank);
    running = Math.min(running, candidate);
    q[index] = running;
  }
  return q;
}
