import { upperIncompleteGamma } from "./upperIncompleteGamma.js";

/**
 * Pearson's chi-square test of independence for an r × c table of counts
 * (Pearson 1900, Philosophical Magazine 50:157; no continuity correction):
 * X² = Σ (O − E)²/E with E = row total × column total / N, referred to
 * χ² with (r − 1)(c − 1) degrees of freedom: p = Q(df/2, X²/2). Rows and
 * columns whose total is zero are left out first (they carry no information
 * and would make E zero). NaN when fewer than two rows or columns remain.
 * O(rc).
 */
export interface ChiSquareTest {
  statistic: number;
  df: number;
  pValue: number;
  /** Smallest expected count among the cells tested. */
  minExpected: number;
  /** The table tested, after empty rows and columns were removed. */
  rows: number;
  columns: number;
}

export function chiSquareIndependence(counts: number[][]): ChiSquareTest {
  const rowTotals = counts.map((row) => row.reduce((s, v) => s + v, 0));
  const width = counts.length > 0 ? counts[0].length : 0;
  const columnTotals = Array.from({ length: width }, (_, j) => counts.reduce((s, row) => s + row[j], 0));
  const keptRows = rowTotals.map((t, i) => (t > 0 ? i : -1)).filter((i) => i >= 0);
  const keptColumns = columnTotals.map((t, j) => (t > 0 ? j : -1)).filter((j) => j >= 0);
  const total = rowTotals.reduce((s, v) => s + v, 0);
  const r = keptRows.length;
  const c = keptColumns.length;
  if (r < 2 || c < 2) return { statistic: NaN, df: NaN, pValue: NaN, minExpected: NaN, rows: r, columns: c };
  let statistic = 0;
  let minExpected = Infinity;
  for (const i of keptRows) {
    for (const j of keptColumns) {
      const expected = (rowTotals[i] * columnTotals[j]) / total;
      minExpected = Math.min(minExpected, expected);
      statistic += (counts[i][j] - expected) ** 2 / expected;
    }
  }
  const df = (r - 1) * (c - 1);
  return { statistic, df, pValue: upperIncompleteGamma(df / 2, statistic / 2), minExpected, rows: r, columns: c };
}
