import type { NumericArray } from "./arrayContainer.js";
import { columnMajorToC } from "./columnMajor.js";
import { mat5Error, readTag, storedName, storedNumbers, type Mat5Place, type Segment } from "./mat5Elements.js";
import {
  CLASS_NAMES,
  FLAG_COMPLEX,
  FLAG_LOGICAL,
  isNumericClass,
  MI_INT32,
  MI_INT8,
  MI_UINT32,
  MI_UINT8,
  MI_UTF8,
  MX_OPAQUE,
  MX_SPARSE,
} from "./mat5Types.js";

// One miMATRIX element ("MATLAB MAT-File Format", The MathWorks, Level 5):
// array flags (class, complex and logical bits, nzmax), dimensions (miINT32),
// name (miINT8), then the data: the real part of a numeric array (its own
// stored type), or for a sparse matrix the row indices, the column starts and
// the values. An object of the opaque class has no dimensions: its name follows
// the flags.

export interface MatrixHeader {
  name: string;
  mclass: number;
  complex: boolean;
  logical: boolean;
  /** MATLAB's dims (column-major order). */
  dims: number[];
  /** Offset of the first data element, and of the end of the matrix. */
  dataAt: number;
  end: number;
}

/** Largest sparse matrix expanded to dense: 2^28 values (2 GiB). */
const MOST_DENSE_VALUES = 2 ** 28;

/** The flags, dimensions and name of the miMATRIX whose data span [start, end). */
export function readMatrixHeader(seg: Segment, start: number, end: number, place: Mat5Place): MatrixHeader {
  const flags = readTag(seg, start, end, place, "the array flags");
  if (flags.type !== MI_UINT32 || flags.size !== 8) {
    throw mat5Error(place, `the array flags are data type ${flags.type} of ${flags.size} bytes (expected 8 bytes of miUINT32)`);
  }
  const word = seg.view.getUint32(flags.dataStart, seg.littleEndian);
  const mclass = word & 0xff;
  const bits = (word >>> 8) & 0xff;
  const common = { mclass, complex: (bits & FLAG_COMPLEX) !== 0, logical: (bits & FLAG_LOGICAL) !== 0, end };
  if (mclass === MX_OPAQUE) {
    const nameTag = readTag(seg, flags.next, end, place, "the object's name");
    // An object's size is inside its data; it is listed as one object.
    return { ...common, name: storedName(seg, nameTag, place), dims: [1, 1], dataAt: nameTag.next };
  }
  const dimsTag = readTag(seg, flags.next, end, place, "the dimensions");
  if (dimsTag.type !== MI_INT32 || dimsTag.size === 0 || dimsTag.size % 4 !== 0) {
    throw mat5Error(place, `the dimensions are data type ${dimsTag.type} of ${dimsTag.size} bytes (expected miINT32 values)`);
  }
  const dims: number[] = [];
  for (let at = dimsTag.dataStart; at < dimsTag.dataStart + dimsTag.size; at += 4) {
    const extent = seg.view.getInt32(at, seg.littleEndian);
    if (extent < 0) throw mat5Error(place, `a dimension is negative (${extent})`);
    dims.push(extent);
  }
  const nameTag = readTag(seg, dimsTag.next, end, place, "the name");
  if (nameTag.type !== MI_INT8 && nameTag.type !== MI_UINT8 && nameTag.type !== MI_UTF8) {
    throw mat5Error(place, `the name is data type ${nameTag.type} (expected miINT8 text)`);
  }
  return { ...common, name: storedName(seg, nameTag, place), dims, dataAt: nameTag.next };
}

/** How a variable is listed: its type as MATLAB names it, and whether plexus can read it as numbers. */
export function describeMatrix(header: MatrixHeader): { type: string; numeric: boolean } {
  const complex = header.complex ? "complex " : "";
  if (header.mclass === MX_SPARSE) {
    return { type: `${complex}sparse ${header.logical ? "logical" : "double"}`, numeric: !header.complex };
  }
  if (isNumericClass(header.mclass)) {
    return { type: complex + (header.logical ? "logical" : CLASS_NAMES[header.mclass]), numeric: !header.complex };
  }
  return { type: CLASS_NAMES[header.mclass] ?? `class ${header.mclass}`, numeric: false };
}

/** A numeric or sparse matrix's values in C order over MATLAB's dims. */
export function readMatrixValues(seg: Segment, header: MatrixHeader, place: Mat5Place): NumericArray {
  const { type, numeric } = describeMatrix(header);
  if (!numeric) throw mat5Error(place, `it is ${type}, not a numeric array`);
  if (header.mclass === MX_SPARSE) return sparseToDense(seg, header, place);
  const count = header.dims.reduce((product, d) => product * d, 1);
  if (count === 0 && header.dataAt >= header.end) return { shape: header.dims, values: new Float64Array(0) }; // an empty array may have no data element
  const tag = readTag(seg, header.dataAt, header.end, place, "the values");
  const stored = storedNumbers(seg, tag, place, "the values");
  if (stored.length !== count) {
    throw mat5Error(place, `it holds ${stored.length} values where its dimensions ${header.dims.join(" × ")} need ${count}`);
  }
  return { shape: header.dims, values: columnMajorToC(stored, header.dims) };
}

/**
 * A sparse matrix (compressed columns: row index ir[k] and value pr[k] for k
 * from jc[c] to jc[c+1] − 1 in column c) expanded to a dense M × N matrix in C
 * order; repeated (row, column) pairs add up.
 */
function sparseToDense(seg: Segment, header: MatrixHeader, place: Mat5Place): NumericArray {
  if (header.dims.length !== 2) throw mat5Error(place, `a sparse matrix has ${header.dims.length} dimensions (expected 2)`);
  const [rows, columns] = header.dims;
  if (rows * columns > MOST_DENSE_VALUES) {
    throw mat5Error(place, `the sparse matrix ${rows} × ${columns} is too large to expand to a dense matrix (more than ${MOST_DENSE_VALUES} values)`);
  }
  const irTag = readTag(seg, header.dataAt, header.end, place, "the row indices");
  const ir = storedNumbers(seg, irTag, place, "the row indices");
  const jcTag = readTag(seg, irTag.next, header.end, place, "the column starts");
  const jc = storedNumbers(seg, jcTag, place, "the column starts");
  const prTag = readTag(seg, jcTag.next, header.end, place, "the values");
  const pr = storedNumbers(seg, prTag, place, "the values");
  if (jc.length !== columns + 1) throw mat5Error(place, `the sparse matrix has ${jc.length} column starts where ${columns} columns need ${columns + 1}`);
  const stored = Math.min(ir.length, pr.length);
  const out = new Float64Array(rows * columns);
  for (let c = 0; c < columns; c++) {
    const from = jc[c];
    const to = jc[c + 1];
    if (!(Number.isInteger(from) && Number.isInteger(to) && 0 <= from && from <= to && to <= stored)) {
      throw mat5Error(place, `the sparse matrix's column starts are not increasing within its ${stored} stored values (column ${c + 1}: ${from} … ${to})`);
    }
    for (let k = from; k < to; k++) {
      const r = ir[k];
      if (!(Number.isInteger(r) && r >= 0 && r < rows)) throw mat5Error(place, `the sparse matrix has row index ${r} outside 0 … ${rows - 1}`);
      out[r * columns + c] += pr[k];
    }
  }
  return { shape: header.dims, values: out };
}
