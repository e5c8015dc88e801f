/**
 * Distinct arrangements of a multiset (sequences of type codes with fixed
 * counts), counted by the multinomial coefficient and ranked in
 * lexicographic order (Knuth, TAOCP vol. 4A, 2011, §7.2.1.2). Counts are
 * kept as doubles and are exact while they stay below 2^53; callers only
 * enumerate when the count is at most the requested number of permutations.
 */

/** n! / (n_1! n_2! …), or Infinity once it passes `cap` (so huge designs never overflow). */
export function multinomialCount(counts: number[], cap = Number.MAX_SAFE_INTEGER): number {
  let total = 0;
  let result = 1;
  for (const n of counts) {
    for (let k = 1; k <= n; k++) {
      total++;
      // result · total / k stays an integer: it is a product of binomial coefficients.
      result = (result * total) / k;
      if (result > cap) return Infinity;
    }
  }
  return Math.round(result);
}

/** Lexicographic rank of `sequence` among all arrangements of its own multiset. */
export function rankArrangement(sequence: ArrayLike<number>, typeCount: number): number {
  const counts = new Array<number>(typeCount).fill(0);
  for (let i = 0; i < sequence.length; i++) counts[sequence[i]]++;
  let remaining = sequence.length;
  let arrangements = multinomialCount(counts);
  let rank = 0;
  for (let i = 0; i < sequence.length; i++) {
    const current = sequence[i];
    for (let t = 0; t < current; t++) {
      if (counts[t] > 0) rank += (arrangements * counts[t]) / remaining;
    }
    arrangements = (arrangements * counts[current]) / remaining;
    counts[current]--;
    remaining--;
  }
  return Math.round(rank);
}

/** The arrangement with lexicographic rank `rank` of the multiset with these type counts; written into `out`. */
export function unrankArrangement(rank: number, typeCounts: number[], out: Int32Array | number[]): void {
  const counts = [...typeCounts];
  let remaining = counts.reduce((a, b) => a + b, 0);
  let arrangements = multinomialCount(counts);
  let r = rank;
  for (let i = 0; remaining > 0; i++) {
    for (let t = 0; t < counts.length; t++) {
      if (counts[t] === 0) continue;
      const starting = Math.round((arrangements * counts[t]) / remaining);
      if (r < starting) {
        out[i] = t;
        arrangements = starting;
        counts[t]--;
        remaining--;
        break;
      }
      r -= starting;
    }
  }
}
