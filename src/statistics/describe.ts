/**
 * Descriptive statistics of a sample: mean, standard deviation with the n − 1
 * divisor (two-pass, so large offsets cost no digits), and quantiles by linear
 * interpolation between order statistics, definition 7 of Hyndman & Fan
 * (1996, The American Statistician 50:361), which is R's default. O(n log n).
 */
export interface Description {
  n: number;
  mean: number;
  sd: number;
  median: number;
  q1: number;
  q3: number;
}

export function mean(values: ArrayLike<number>): number {
  const n = values.length;
  if (n === 0) return NaN;
  let sum = 0;
  for (let i = 0; i < n; i++) sum += values[i];
  const first = sum / n;
  // A second pass removes most of the rounding error of the first (corrected two-pass mean).
  let correction = 0;
  for (let i = 0; i < n; i++) correction += values[i] - first;
  return first + correction / n;
}

/** Sample variance (divisor n − 1); NaN for fewer than two values. */
export function variance(values: ArrayLike<number>): number {
  const n = values.length;
  if (n < 2) return NaN;
  const m = mean(values);
  let squares = 0;
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const d = values[i] - m;
    squares += d * d;
    sum += d;
  }
  return (squares - (sum * sum) / n) / (n - 1);
}

/** Quantile of a sorted sample by Hyndman & Fan's definition 7: h = (n − 1)p, linear between neighbours. */
export function sortedQuantile(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, n - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

export function describe(values: ArrayLike<number>): Description {
  const sorted = Float64Array.from(values).sort();
  return {
    n: values.length,
    mean: mean(values),
    sd: Math.sqrt(variance(values)),
    median: sortedQuantile(sorted, 0.5),
    q1: sortedQuantile(sorted, 0.25),
    q3: sortedQuantile(sorted, 0.75),
  };
}
