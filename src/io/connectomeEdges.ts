import { InputError, type InputLocation } from "../errors.js";
import type { EdgePairs } from "../edges/edgeIndex.js";
import { printable } from "./printable.js";

/** How one subject's N × N matrix becomes its edge values. */
export interface EdgeExtractionOptions {
  /** Average a_ij and a_ji instead of requiring them to agree. */
  symmetrize: boolean;
  /** Without `symmetrize`: |a_ij − a_ji| ≤ tol × max(1, |a_ij|, |a_ji|) is required. */
  asymmetryTolerance: number;
  transform: "none" | "fisher-z" | "log1p";
  /** `edges.missing: drop`: a NaN cell is a missing edge (NaN in the data, left out by the edge rules) instead of an error. */
  missing?: "error" | "drop";
}

/** The hint of the first error about a non-finite cell, when the design does not drop missing edges. */
export const MISSING_EDGES_HINT =
  "if NaN marks an edge without coverage (e.g. a region without signal), `edges: {missing: drop}` in the design leaves out every edge that is NaN in any analysed participant";

/** Where a matrix came from, so that a bad cell can be located. */
export interface MatrixOrigin {
  file: string;
  /** 1-based file line of each matrix row (text matrices); absent for binary files. */
  rowLines?: number[];
  /** Prefix for messages about a matrix inside a stack, e.g. "matrix 3 (participant 'sub-03')". */
  label?: string;
  /** 1-based file column of each matrix column, where it is not the column's number (a label column; reordered rows and columns). */
  columns?: ArrayLike<number>;
  /** Each region's label, named in messages beside its row and column number (reordered rows and columns). */
  regionLabels?: readonly string[];
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
 * 10(4):507-521), and needs every off-diagonal cell strictly inside (−1, 1);
 * "log1p" maps x to log(1 + x) and needs every off-diagonal cell above −1.
 * With `missing: "drop"`, a NaN cell (either triangle) makes the edge NaN, a
 * missing edge that the edge rules (src/edges/edgeRules.ts) leave out.
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
  const fisher = options.transform === "fisher-z";
  const log1p = options.transform === "log1p";
  const dropMissing = options.missing === "drop";
  const tolerance = options.asymmetryTolerance;
  // Edges in order (0,1), (0,2), …, (1,2), …: e runs with (i, j) as in src/edges/edgeIndex.ts.
  let to = outOffset;
  for (let i = 0; i < n; i++) {
    const rowStart = matrixOffset + i * n;
    for (let j = i + 1, below = matrixOffset + (i + 1) * n + i; j < n; j++, below += n, to += outStride) {
      const upper = matrix[rowStart + j];
      const lower = matrix[below];
      if (dropMissing && (upper !== upper || lower !== lower)) {
        out[to] = NaN;
        continue;
      }
      if (!Number.isFinite(upper)) throw cellError(origin, i, j, `is ${upper}; off-diagonal cells must be finite`);
      if (!Number.isFinite(lower)) throw cellError(origin, j, i, `is ${lower}; off-diagonal cells must be finite`);
      let value: number;
      if (options.symmetrize) {
        value = (upper + lower) / 2;
      } else {
        if (!(Math.abs(upper - lower) <= tolerance * Math.max(1, Math.abs(upper), Math.abs(lower)))) {
          throw new InputError(
            `${prefix(origin)}matrix is not symmetric: ${cellName(origin, i, j)} is ${upper} but ${cellName(origin, j, i)} is ${lower} ` +
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
      } else if (log1p) {
        if (!(upper > -1)) throw log1pError(origin, i, j, upper);
        if (!(lower > -1)) throw log1pError(origin, j, i, lower);
        value = Math.log1p(value);
      }
      out[to] = value;
    }
  }
}

function prefix(origin: MatrixOrigin): string {
  return origin.label === undefined ? "" : `${origin.label}: `;
}

function cellLocation(origin: MatrixOrigin, row: number, column: number): InputLocation {
  return origin.rowLines === undefined
    ? { file: origin.file }
    : { file: origin.file, line: origin.rowLines[row], column: origin.columns ? origin.columns[column] : column + 1 };
}

/** "row 2, column 5", with the regions' labels when the origin has them: "row 2 ('a'), column 5 ('b')". */
function cellName(origin: MatrixOrigin, row: number, column: number): string {
  const labels = origin.regionLabels;
  if (!labels) return `row ${row + 1}, column ${column + 1}`;
  return `row ${row + 1} ('${printable(labels[row])}'), column ${column + 1} ('${printable(labels[column])}')`;
}

function cellError(origin: MatrixOrigin, row: number, column: number, what: string): InputError {
  return new InputError(`${prefix(origin)}cell at ${cellName(origin, row, column)} ${what}`, cellLocation(origin, row, column));
}

function fisherError(origin: MatrixOrigin, row: number, column: number, value: number): InputError {
  return cellError(
    origin,
    row,
    column,
    `is ${value}; fisher-z needs correlations strictly between -1 and 1`,
  );
}

function log1pError(origin: MatrixOrigin, row: number, column: number, value: number): InputError {
  return cellError(origin, row, column, `is ${value}; log1p (log(1 + x)) needs values above -1`);
}

/** Subjects per block of EdgeMajorWriter: an edge's 16 values fill two 64-byte cache lines. */
export const SUBJECT_BLOCK_SIZE = 16;

/**
 * Fills an edge-major array out[e·S + s] (S = subjectCount) one subject at a
 * time without a scattered store per edge: each subject's edges go contiguously
 * into a row of a small subject-major block (B × E values), and each full block
 * is transposed into `out`, so every edge receives B adjacent values at once.
 * The values and the checks are those of writeMatrixEdges.
 */
export class EdgeMajorWriter {
  private readonly block: Float64Array;
  private readonly blockSize: number;
  /** Subject of the block's first row. */
  private blockStart = 0;
  /** Rows of the block filled so far. */
  private rows = 0;

  /** One past the last subject this writer fills. */
  private readonly end: number;

  /**
   * Fills subjects firstSubject … endSubject − 1 (default: all) of the
   * edge-major `out`, in that order; writers of disjoint ranges can share `out`
   * (worker threads loading blocks of subjects, matrixBlocks.ts).
   */
  constructor(
    private readonly pairs: EdgePairs,
    private readonly out: Float64Array,
    private readonly subjectCount: number,
    blockSize: number = SUBJECT_BLOCK_SIZE,
    firstSubject = 0,
    endSubject = subjectCount,
  ) {
    if (out.length !== subjectCount * pairs.edgeCount) {
      throw new RangeError(`EdgeMajorWriter: ${out.length} values for ${subjectCount} subjects × ${pairs.edgeCount} edges`);
    }
    if (!(firstSubject >= 0 && firstSubject <= endSubject && endSubject <= subjectCount)) {
      throw new RangeError(`EdgeMajorWriter: subjects ${firstSubject} to ${endSubject} of ${subjectCount}`);
    }
    this.blockStart = firstSubject;
    this.end = endSubject;
    this.blockSize = Math.max(1, Math.min(blockSize, endSubject - firstSubject));
    this.block = new Float64Array(this.blockSize * pairs.edgeCount);
  }

  /** Writes the next subject's edges (subjects in order) from the N × N matrix at `matrix[matrixOffset …]`. */
  add(matrix: Float64Array, matrixOffset: number, options: EdgeExtractionOptions, origin: MatrixOrigin): void {
    const edgeCount = this.pairs.edgeCount;
    if (this.blockStart + this.rows >= this.end) {
      throw new RangeError(`EdgeMajorWriter: more than ${this.end} subjects`);
    }
    writeMatrixEdges(matrix, matrixOffset, this.pairs, this.block, this.rows * edgeCount, options, origin);
    this.next();
  }

  /**
   * Passes over the next subject, whose matrix could not be read or failed a
   * check, leaving its edges NaN, so the loader can go on to find every bad matrix.
   */
  skip(): void {
    const edgeCount = this.pairs.edgeCount;
    if (this.blockStart + this.rows >= this.end) {
      throw new RangeError(`EdgeMajorWriter: more than ${this.end} subjects`);
    }
    this.block.fill(NaN, this.rows * edgeCount, (this.rows + 1) * edgeCount);
    this.next();
  }

  private next(): void {
    this.rows++;
    if (this.rows === this.blockSize || this.blockStart + this.rows === this.end) {
      transposeBlock(this.block, this.rows, this.pairs.edgeCount, this.out, this.subjectCount, this.blockStart);
      this.blockStart += this.rows;
      this.rows = 0;
    }
  }
}

/** Edges per tile of transposeBlock: the tile's destination lines (256 × B values) stay in the first-level cache. */
const TRANSPOSE_TILE_EDGES = 256;

/**
 * Copies a subject-major block (`rows` rows of `edgeCount` values) into columns
 * firstColumn … firstColumn + rows − 1 of the edge-major `out`:
 * out[e·outStride + firstColumn + r] = block[r·edgeCount + e]. Works through
 * tiles of edges, so each row is read contiguously while the tile's part of
 * `out` stays in cache.
 */
export function transposeBlock(
  block: Float64Array,
  rows: number,
  edgeCount: number,
  out: Float64Array,
  outStride: number,
  firstColumn: number,
): void {
  for (let tileStart = 0; tileStart < edgeCount; tileStart += TRANSPOSE_TILE_EDGES) {
    const tileEnd = Math.min(edgeCount, tileStart + TRANSPOSE_TILE_EDGES);
    for (let r = 0; r < rows; r++) {
      const rowStart = r * edgeCount;
      for (let e = tileStart, to = tileStart * outStride + firstColumn + r; e < tileEnd; e++, to += outStride) {
        out[to] = block[rowStart + e];
      }
    }
  }
}
