import { Matrix, SingularValueDecomposition } from "ml-matrix";

/**
 * Numerical rank from the singular values, with the tolerance
 * max(rows, cols) · σ_max · ε (Golub & Van Loan 2013, §5.4.1; the default of
 * most numerical libraries). Each near-null right singular vector names a set
 * of collinear columns: those with a non-negligible weight in it.
 */
export interface RankReport {
  rank: number;
  singularValues: number[];
  tolerance: number;
  /** For each null direction, the indices of the columns involved. */
  collinearSets: number[][];
}

export function rankReport(x: Float64Array, rows: number, cols: number): RankReport {
  const matrix = new Matrix(rows, cols);
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) matrix.set(i, j, x[i * cols + j]);
  // Scale columns to unit norm so that the rank does not depend on units (age in days vs years).
  const norms = new Float64Array(cols);
  for (let j = 0; j < cols; j++) {
    let s = 0;
    for (let i = 0; i < rows; i++) s += matrix.get(i, j) ** 2;
    norms[j] = Math.sqrt(s);
    if (norms[j] > 0) for (let i = 0; i < rows; i++) matrix.set(i, j, matrix.get(i, j) / norms[j]);
  }
  const svd = new SingularValueDecomposition(matrix, { computeLeftSingularVectors: false, autoTranspose: true });
  const values = svd.diagonal;
  const largest = Math.max(0, ...values);
  const tolerance = Math.max(rows, cols) * largest * Number.EPSILON;
  let rank = 0;
  for (const s of values) if (s > tolerance) rank++;
  const collinearSets: number[][] = [];
  const v = svd.rightSingularVectors;
  for (let k = 0; k < cols; k++) {
    const s = k < values.length ? values[k] : 0;
    if (s > tolerance) continue;
    const weights: number[] = [];
    for (let j = 0; j < cols; j++) weights.push(Math.abs(v.get(j, k)));
    const top = Math.max(...weights);
    const set = weights.flatMap((w, j) => (w > top * 1e-6 ? [j] : []));
    collinearSets.push(set);
  }
  // A zero column shows up as its own set (its null vector is that unit vector).
  for (let j = 0; j < cols; j++) {
    if (norms[j] === 0 && !collinearSets.some((set) => set.length === 1 && set[0] === j)) collinearSets.push([j]);
  }
  return { rank, singularValues: [...values], tolerance, collinearSets };
}

/** The collinear sets of a rank-deficient design as column names ("a, b"); every column when no set could be named. */
export function collinearColumnNames(report: RankReport, names: readonly string[]): string[] {
  const named = report.collinearSets.filter((set) => set.length > 0);
  if (named.length === 0) named.push(names.map((_, j) => j));
  return named.map((set) => set.map((j) => names[j]).join(", "));
}
