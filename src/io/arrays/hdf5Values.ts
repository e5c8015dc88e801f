import type { Dataset, Filter, Group, Metadata } from "h5wasm";
import { InputError } from "../../errors.js";
import { printable } from "../printable.js";
import { placeColumnMajorBlock } from "./columnMajor.js";
import { hdf5Call, type Hdf5Library } from "./hdf5Calls.js";
import type { Hdf5Entry, Hdf5Source } from "./hdf5Types.js";

// One entry's values, as float64 in C order over its shape, read on the HDF5
// worker thread a slab at a time (so the WebAssembly heap holds one slab, not
// the array) straight into the array handed back.

/** Values read per slab: 16 MB as float64 (PLEXUS_HDF5_SLAB_VALUES, for tests, makes slabs of small arrays). */
const SLAB_VALUES = Number(process.env.PLEXUS_HDF5_SLAB_VALUES) || 1 << 21;
/** The most values one array may hold (16 GiB as float64). */
export const VALUE_LIMIT = 2 ** 31 - 1;
/** Filters built into h5wasm's HDF5: deflate (gzip), shuffle, Fletcher-32, szip, n-bit, scale-offset (H5Zpublic.h). */
const BUILT_IN_FILTERS = new Set([1, 2, 3, 4, 5, 6]);

export function readValues(library: Hdf5Library, root: Group, entry: Hdf5Entry & { source: Hdf5Source }, progress: () => void): Float64Array {
  const { source } = entry;
  return source.kind === "dense" ? readDense(library, root, entry.name, source, progress) : readSparse(library, root, entry.name, source);
}

function readDense(library: Hdf5Library, root: Group, name: string, source: Extract<Hdf5Source, { kind: "dense" }>, progress: () => void): Float64Array {
  const what = `cannot read '${printable(name)}'`;
  const dataset = openDataset(library, root, source.dataset);
  refuseMissingFilters(hdf5Call(library, what, () => dataset.filters), name);
  const metadata = hdf5Call(library, what, () => dataset.metadata);
  const dims = metadata.shape ?? [];
  const total = countValues(dims, name);
  if (total === 0) return new Float64Array(0);
  if (dims.length === 0) return Float64Array.of(numberOf(hdf5Call(library, what, () => dataset.value), name));
  // Slabs along the first HDF5 axis (MATLAB's and Octave's last), each read by
  // HDF5 into one buffer on the WebAssembly heap and converted from there.
  const { module } = library;
  const Elements = elementArray(metadata);
  const inner = total / dims[0];
  const perSlab = Math.max(1, Math.floor(SLAB_VALUES / inner));
  const slabBytes = perSlab * inner * metadata.size;
  const pointer = slabBytes <= module.MAXIMUM_MEMORY ? module._malloc(slabBytes) : 0;
  if (pointer === 0) throw new InputError(`not enough memory to read '${printable(name)}': one slice of it (${dims.slice(1).join(" × ")} values) does not fit in HDF5's memory`);
  const scratch = Elements === Float64Array ? undefined : new Float64Array(perSlab * inner);
  const matlabDims = source.columnMajor ? [...dims].reverse() : undefined;
  // Allocated once the first slab has read: a damaged file claiming huge dims fails before it.
  let out: Float64Array | undefined;
  try {
    for (let first = 0; first < dims[0]; first += perSlab) {
      const count = Math.min(perSlab, dims[0] - first);
      hdf5Call(library, what, () => {
        const status = module.get_dataset_data(
          dataset.file_id,
          dataset.path,
          [BigInt(count), ...dims.slice(1).map(BigInt)],
          dims.map((_, k) => (k === 0 ? BigInt(first) : 0n)),
          dims.map(() => 1n),
          BigInt(pointer),
        );
        if (status < 0) throw new Error("HDF5 could not read the values");
      });
      // A view made after the read: the heap may have grown (and moved) during it.
      const stored = new Elements(module.HEAPU8.buffer, pointer, count * inner);
      const slab = scratch ? toFloat64(stored, scratch) : (stored as Float64Array);
      out ??= allocate(dims, name);
      if (matlabDims) placeColumnMajorBlock(slab, matlabDims, first, count, out);
      else out.set(slab, first * inner);
      progress();
    }
  } finally {
    module._free(pointer);
  }
  return out!;
}

type ElementArray = Float64Array | Float32Array | Int8Array | Uint8Array | Int16Array | Uint16Array | Int32Array | Uint32Array | BigInt64Array | BigUint64Array;

/** The typed array HDF5's values come in (native byte order, the stored class and size; an enum as its base integers). */
function elementArray(metadata: Metadata): new (buffer: ArrayBufferLike, offset: number, length: number) => ElementArray {
  const { size, signed } = metadata;
  if (metadata.type === 1) return size === 8 ? Float64Array : Float32Array;
  switch (size) {
    case 1:
      return signed ? Int8Array : Uint8Array;
    case 2:
      return signed ? Int16Array : Uint16Array;
    case 4:
      return signed ? Int32Array : Uint32Array;
    default:
      return signed ? BigInt64Array : BigUint64Array;
  }
}

function toFloat64(stored: ElementArray, scratch: Float64Array): Float64Array {
  const out = scratch.length === stored.length ? scratch : scratch.subarray(0, stored.length);
  if (stored instanceof BigInt64Array || stored instanceof BigUint64Array) {
    for (let k = 0; k < stored.length; k++) out[k] = Number(stored[k]);
  } else {
    out.set(stored);
  }
  return out;
}

/**
 * A compressed-sparse-column matrix as dense, in C order: column c holds the
 * values k = start[c] … start[c+1] − 1 at rows rowIndex[k] (0-based); repeated
 * (row, column) pairs are summed.
 */
function readSparse(library: Hdf5Library, root: Group, name: string, source: Extract<Hdf5Source, { kind: "sparse" }>): Float64Array {
  const { rows, columns } = source;
  const malformed = (detail: string) => new InputError(`the sparse matrix '${printable(name)}' is malformed: ${detail}`);
  const starts = readWhole(library, root, source.columnStarts, name);
  const rowIndex = source.rowIndices ? readWhole(library, root, source.rowIndices, name) : new Float64Array(0);
  const values = source.values ? readWhole(library, root, source.values, name) : new Float64Array(0);
  if (!(Number.isInteger(rows) && rows >= 0 && Number.isInteger(columns) && columns >= 0)) throw malformed(`its size is ${rows} × ${columns}`);
  if (starts.length !== columns + 1) throw malformed(`${starts.length} column starts for ${columns} columns`);
  const count = Math.min(rowIndex.length, values.length);
  const out = allocate([rows, columns], name);
  for (let c = 0; c < columns; c++) {
    const from = starts[c];
    const to = starts[c + 1];
    if (!(Number.isInteger(from) && Number.isInteger(to) && from >= 0 && from <= to && to <= count)) {
      throw malformed(`column ${c + 1} starts at ${from} and ends before ${to}, with ${count} stored values`);
    }
    for (let k = from; k < to; k++) {
      const row = rowIndex[k];
      if (!(Number.isInteger(row) && row >= 0 && row < rows)) throw malformed(`stored value ${k + 1} is in row ${row + 1} of ${rows}`);
      out[row * columns + c] += values[k];
    }
  }
  return out;
}

function readWhole(library: Hdf5Library, root: Group, path: string, name: string): Float64Array {
  const dataset = openDataset(library, root, path);
  refuseMissingFilters(hdf5Call(library, `cannot read '${printable(path)}'`, () => dataset.filters), name);
  const value = hdf5Call(library, `cannot read '${printable(path)}'`, () => dataset.value);
  return typeof value === "number" || typeof value === "bigint" ? Float64Array.of(Number(value)) : floatValues(value, name);
}

function openDataset(library: Hdf5Library, root: Group, path: string): Dataset {
  const object = hdf5Call(library, `cannot open '${printable(path)}'`, () => root.get(path));
  if ((object as { type?: string } | null)?.type !== "Dataset") throw new InputError(`'${printable(path)}' is not a dataset`);
  return object as Dataset;
}

/** A filter h5wasm's HDF5 lacks (e.g. lzf, blosc, bitshuffle) would leave the values unread: refused by name. */
function refuseMissingFilters(filters: Filter[], name: string): void {
  const missing = filters.find((filter) => !BUILT_IN_FILTERS.has(filter.id));
  if (missing) {
    throw new InputError(
      `'${printable(name)}' is compressed with the HDF5 filter ${printable(missing.name || "unnamed")} (id ${missing.id}), which plexus's HDF5 library does not include`,
      {},
      "rewrite the file with gzip compression or none, e.g. h5repack -f GZIP=4 in.h5 out.h5, or h5py's compression='gzip'",
    );
  }
}

function countValues(dims: readonly number[], name: string): number {
  const count = dims.reduce((product, d) => product * d, 1);
  if (count > VALUE_LIMIT) {
    throw new InputError(`'${printable(name)}' holds ${count} values (${dims.join(" × ")}), more than the ${VALUE_LIMIT} plexus reads as one array`);
  }
  return count;
}

function allocate(dims: readonly number[], name: string): Float64Array {
  const count = countValues(dims, name);
  try {
    return new Float64Array(count);
  } catch {
    throw new InputError(`not enough memory to read '${printable(name)}' (${dims.join(" × ")}, ${(count * 8) / 2 ** 30} GiB as float64)`);
  }
}

/** What h5wasm gives for numbers (a typed array of the stored type, BigInt for 64-bit integers) as float64. */
function floatValues(value: unknown, name: string): Float64Array {
  if (value instanceof Float64Array) return value;
  if (value instanceof BigInt64Array || value instanceof BigUint64Array) return Float64Array.from(value, (v) => Number(v));
  if (ArrayBuffer.isView(value) && !(value instanceof DataView)) return new Float64Array(value as unknown as ArrayLike<number>);
  throw new InputError(`'${printable(name)}' did not read as numbers`);
}

function numberOf(value: unknown, name: string): number {
  if (typeof value === "number" || typeof value === "bigint") return Number(value);
  if (typeof value === "boolean") return value ? 1 : 0;
  return floatValues(value, name)[0];
}
