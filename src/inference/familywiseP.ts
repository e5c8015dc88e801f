import jStat from "jstat";

/**
 * Family-wise error-corrected p-values from the null distribution of a
 * maximum (Westfall & Young 1993; Nichols & Holmes 2002, Hum. Brain Mapp.
 * 15:1). Exact enumeration of all M relabelings (identity included):
 * p = b/M, with b the relabelings whose maximum is at least the observed
 * value. Monte Carlo with K random relabelings (identity not among them):
 * p = (1 + b)/(1 + K) (Phipson & Smyth 2010, Stat. Appl. Genet. Mol. Biol.
 * 9:39), with a Clopper–Pearson (1934, Biometrika 26:404) interval for the
 * exceedance probability b/K.
 */
export interface FamilywiseP {
  p: number;
  /** Clopper–Pearson interval (Monte Carlo only; NaN when exact). */
  low: number;
  high: number;
  exceedances: number;
}

/**
 * Relative tolerance for ties: a null value within this fraction of the
 * observed value counts as reaching it. Relabelings that are exact mirror
 * images (swapping two equal groups gives −t) must tie with the observed
 * value, but rounding can put them an ulp apart (common practice; whole
 * numbers such as extents are unaffected).
 */
export const TIE_TOLERANCE = 1e-10;

/** Counts of null values ≥ each query (within TIE_TOLERANCE), via one sort (O((K + Q) log K)). */
export function exceedanceCounts(nullValues: ArrayLike<number>, queries: ArrayLike<number>): Int32Array {
  // A NaN null value (a relabeling without any statistic) exceeds nothing: sort it as −∞, not last.
  const sorted = Float64Array.from(nullValues, (v) => (Number.isNaN(v) ? -Infinity : v)).sort();
  const out = new Int32Array(queries.length);
  for (let i = 0; i < queries.length; i++) {
    const value = queries[i];
    const q = Number.isFinite(value) ? value - TIE_TOLERANCE * Math.abs(value) : value;
    if (Number.isNaN(q)) {
      out[i] = -1;
      continue;
    }
    // First index with sorted[index] ≥ q.
    let lo = 0;
    let hi = sorted.length;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (sorted[mid] >= q) hi = mid;
      else lo = mid + 1;
    }
    out[i] = sorted.length - lo;
  }
  return out;
}

export function clopperPearson(successes: number, trials: number, level = 0.95): { low: number; high: number } {
  const a = (1 - level) / 2;
  const low = successes === 0 ? 0 : jStat.beta.inv(a, successes, trials - successes + 1);
  const high = successes === trials ? 1 : jStat.beta.inv(1 - a, successes + 1, trials - successes);
  return { low, high };
}

export function familywiseP(nullValues: ArrayLike<number>, observed: ArrayLike<number>, exact: boolean): FamilywiseP[] {
  const counts = exceedanceCounts(nullValues, observed);
  const n = nullValues.length;
  return Array.from(counts, (b) => {
    if (b < 0) return { p: NaN, low: NaN, high: NaN, exceedances: 0 };
    if (exact) return { p: b / n, low: NaN, high: NaN, exceedances: b };
    const { low, high } = clopperPearson(b, n);
    return { p: (1 + b) / (1 + n), low, high, exceedances: b };
  });
}

/**
 * The critical value at alpha: observed values strictly above it are
 * significant. It is the (B+1)-th largest null value with B the largest
 * exceedance count that still gives p ≤ alpha; Infinity when even b = 0 is
 * not significant (too few relabelings for this alpha).
 */
export function criticalValue(nullValues: ArrayLike<number>, alpha: number, exact: boolean): number {
  const n = nullValues.length;
  // Largest b with p(b) ≤ alpha (b/n exact, (1+b)/(1+n) Monte Carlo); the epsilon guards products landing on an integer.
  const allowed = exact ? Math.floor(alpha * n + 1e-9) : Math.floor(alpha * (1 + n) - 1 + 1e-9);
  if (allowed < 0) return Infinity;
  if (allowed >= n) return -Infinity;
  const sorted = Float64Array.from(nullValues, (v) => (Number.isNaN(v) ? -Infinity : v)).sort();
  return sorted[n - 1 - allowed];
}
