import { InputError, type InputLocation } from "../errors.js";
import type { EdgePairs } from "../edges/edgeIndex.js";

/** How one subject's N × N matrix becomes its edge values. */
export interface EdgeExtractionOptions {
  /** Average a_ij and a_ji instead of requiring them to agree. */
  symmetrize: boolean;
  /** Without `symmetrize`: |a_ij − a_ji| ≤ tol × max(1, |a_ij|, |a_ji|) is required. */
  asymmetryTolerance: number;
  transform: "none" | "fisher-z";
}

/** Where a matrix came from, so that a bad cell can be located. */
export interface MatrixOrigin {
  file: string;
  /** 1-based file line of each matrix row (text matrices); absent for binary files. */
  rowLines?: number[];
  /** Prefix for messages about a matrix inside a stack, e.g. "matrix 3 (participant 'sub-03')". */
  label?: string;
}

export const SYMMETRIZE_HINT = "set `symmetrize: true` in the design to average the two triangles";

/**
 * Writes the upper-triangle edges (row-major, i < j; src/edges/edgeIndex.ts) of
 * the N × N row-major matrix at `matrix[matrixOffset …]` into
 * `out[outOffset + e·outStride]` (stride S fills one subject of an edge-major array).
 * The diagonal is ignored. Off-diagonal cells must be finite; unless
 * symmetrizing, a_ij and a_ji must agree within the tolerance (the edge is then
 * a_ij), and with symmetrizing the edge is (a_ij + a_ji) / 2. The "fisher-z"
 * transform maps each edge r to atanh(r), Fisher's z (Fisher 1915, Biometrika
 * 10(4):507-521), and needs every off-diagonal cell strictly inside (−1, 1).
 */
export function writeMatrixEdges(
  matrix: Float64Array,
  matrixOffset: number,
  pairs: EdgePairs,
  out: Float64Array,
  outOffset: number,
  options: EdgeExtractionOptions,
  origin: MatrixOrigin,
  outStride = 1,
): void {
  const n = pairs.regionCount;
  const { regionA, regionB, edgeCount } = pairs;
  const fisher = options.transform === "fisher-z";
  const tolerance = options.asymmetryTolerance;
  for (let e = 0; e < edgeCount; e++) {
    const i = regionA[e];
    const j = regionB[e];
    const upper = matrix[matrixOffset + i * n + j];
    const lower = matrix[matrixOffset + j * n + i];
    if (!Number.isFinite(upper)) throw cellError(origin, i, j, `is ${upper}; off-diagonal cells must be finite`);
    if (!Number.isFinite(lower)) throw cellError(origin, j, i, `is ${lower}; off-diagonal cells must be finite`);
    let value: number;
    if (options.symmetrize) {
      value = (upper + lower) / 2;
    } else {
      if (!(Math.abs(upper - lower) <= tolerance * Math.max(1, Math.abs(upper), Math.abs(lower)))) {
        throw new InputError(
          `${prefix(origin)}matrix is not symmetric: row ${i + 1}, column ${j + 1} is ${upper} but row ${j + 1}, column ${i + 1} is ${lower} ` +
            `(tolerance ${tolerance} × max(1, |a_ij|, |a_ji|))`,
          cellLocation(origin, i, j),
          SYMMETRIZE_HINT,
        );
      }
      value = upper;
    }
    if (fisher) {
      if (!(Math.abs(upper) < 1)) throw fisherError(origin, i, j, upper);
      if (!(Math.abs(lower) < 1)) throw fisherError(origin, j, i, lower);
      value = Math.atanh(value);
    }
    out[outOffset + e * outStride] = value;
  }
}

function prefix(origin: MatrixOrigin): string {
  return origin.label === undefined ? "" : `${origin.label}: `;
}

function cellLocation(origin: MatrixOrigin, row: number, column: number): InputLocation {
  return origin.rowLines === undefined
    ? { file: origin.file }
    : { file: origin.file, line: origin.rowLines[row], column: column + 1 };
}

function cellError(origin: MatrixOrigin, row: number, column: number, what: string): InputError {
  return new InputError(`${prefix(origin)}cell at row ${row + 1}, column ${column + 1} ${what}`, cellLocation(origin, row, column));
}

function fisherError(origin: MatrixOrigin, row: number, column: number, value: number): InputError {
  return cellError(
    origin,
    row,
    column,
    `is ${value}; fisher-z needs correlations strictly between -1 and 1`,
  );
}
