import { endianness } from "node:os";
import { InputError } from "../errors.js";
import { LiteralError, parsePythonLiteral, type PyValue } from "./pythonLiteral.js";

/**
 * Reader and writer for the NumPy `.npy` array format, versions 1.0, 2.0 and
 * 3.0, as published in the NumPy documentation (numpy.lib.format; NEP 1,
 * "A Simple File Format for NumPy Arrays", R. Kern, 2007):
 *
 *   bytes 0-5  magic "\x93NUMPY"; byte 6 major version; byte 7 minor version
 *   1.0        bytes 8-9  header length, little-endian uint16, then a Latin-1 header
 *   2.0, 3.0   bytes 8-11 header length, little-endian uint32; 3.0's header is UTF-8
 *   header     a Python dict literal {'descr': ..., 'fortran_order': ..., 'shape': (...)},
 *              padded with spaces and ended by '\n'; the data follows it.
 *
 * Values are read with typed arrays or a DataView, never parsed as text, and
 * returned as float64 in C (row-major) order.
 */
export interface NpyArray {
  shape: number[];
  data: Float64Array;
}

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]; // \x93 N U M P Y
const HOST_IS_LITTLE_ENDIAN = endianness() === "LE";

type Kind = "f" | "i" | "u" | "b";
/** An element type the reader supports: float, signed or unsigned integer, or bool, of `itemSize` bytes. */
export interface NpyDType {
  kind: Kind;
  itemSize: number;
  littleEndian: boolean;
}

/** What the preamble and header say, and where the data starts. */
export interface NpyHeader {
  shape: number[];
  /** The header's 'descr' text, e.g. '<f8'. */
  descr: string;
  dtype: NpyDType;
  /** True when the data is column-major (first index fastest). */
  fortranOrder: boolean;
  /** Byte offset of the first value in the file. */
  dataOffset: number;
  /** Number of values: the product of the shape. */
  count: number;
}

const SUPPORTED_DTYPES = "<f8 >f8 <f4 >f4 <i8 >i8 <i4 >i4 <i2 >i2 |i1 <u8 >u8 <u4 >u4 <u2 >u2 |u1 |b1 ('=' for native little-endian)";

export function parseNpy(bytes: Uint8Array, file: string): NpyArray {
  const header = parseNpyHeader(bytes, file);
  const { shape, count } = header;
  const flat = new Float64Array(count);
  decodeNpyValues(bytes, header.dataOffset, count, header.dtype, flat, 0);
  const data = header.fortranOrder && shape.length > 1 ? fortranToC(flat, shape) : flat;
  return { shape, data };
}

/**
 * Where the header ends and the data starts, from the preamble alone (its first
 * 10 or 12 bytes), so a reader of a large file knows how many bytes to read
 * before calling parseNpyHeader; undefined when `prefix` is too short or not a
 * .npy preamble (parseNpyHeader then says why).
 */
export function npyDataOffset(prefix: Uint8Array): number | undefined {
  if (prefix.length < 10 || prefix[7] !== 0) return undefined;
  for (let k = 0; k < MAGIC.length; k++) if (prefix[k] !== MAGIC[k]) return undefined;
  const view = new DataView(prefix.buffer, prefix.byteOffset, prefix.byteLength);
  const major = prefix[6];
  if (major === 1) return 10 + view.getUint16(8, true);
  if (!(major === 2 || major === 3) || prefix.length < 12) return undefined;
  return 12 + view.getUint32(8, true);
}

/**
 * Reads and checks the preamble and the header. `bytes` holds the start of a
 * file of `fileSize` bytes (the whole file by default): at least its first
 * min(fileSize, npyDataOffset(bytes)) bytes. The data itself is not read, but
 * its length must be exactly what the shape and dtype need.
 */
export function parseNpyHeader(bytes: Uint8Array, file: string, fileSize: number = bytes.length): NpyHeader {
  const fail: (what: string) => never = (what) => {
    throw new InputError(`not a readable .npy file: ${what}`, { file });
  };
  if (fileSize < 10) fail(`only ${fileSize} bytes, shorter than the smallest .npy preamble (10 bytes)`);
  for (let k = 0; k < MAGIC.length; k++) {
    if (bytes[k] !== MAGIC[k]) fail("it does not start with the magic string \\x93NUMPY");
  }
  const major = bytes[6];
  const minor = bytes[7];
  if (!((major === 1 || major === 2 || major === 3) && minor === 0)) {
    fail(`format version ${major}.${minor} is not one of 1.0, 2.0, 3.0`);
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let headerStart: number;
  let headerLength: number;
  if (major === 1) {
    headerStart = 10;
    headerLength = view.getUint16(8, true);
  } else {
    if (fileSize < 12) fail(`only ${fileSize} bytes, shorter than a version ${major}.0 preamble (12 bytes)`);
    headerStart = 12;
    headerLength = view.getUint32(8, true);
  }
  const dataStart = headerStart + headerLength;
  if (dataStart > fileSize) {
    fail(`the header claims ${headerLength} bytes but the file ends ${fileSize - headerStart} bytes after its start`);
  }
  if (dataStart > bytes.length) {
    throw new RangeError(`parseNpyHeader: ${bytes.length} bytes given, the header of ${file} needs ${dataStart}`);
  }

  let headerText: string;
  try {
    headerText = new TextDecoder(major === 3 ? "utf-8" : "latin1", { fatal: true }).decode(
      bytes.subarray(headerStart, dataStart),
    );
  } catch {
    return fail(`the header is not valid ${major === 3 ? "UTF-8" : "Latin-1"} text`);
  }

  let header: Map<string, PyValue>;
  try {
    const literal = parsePythonLiteral(headerText);
    if (!(literal instanceof Map)) throw new LiteralError("the header is not a dict");
    header = literal;
  } catch (error) {
    if (error instanceof LiteralError) return fail(`malformed header (${error.message}): ${quoteHeader(headerText)}`);
    throw error;
  }

  const descr = header.get("descr");
  const fortranOrder = header.get("fortran_order");
  const shapeValue = header.get("shape");
  if (descr === undefined || fortranOrder === undefined || shapeValue === undefined) {
    fail(`the header needs the keys 'descr', 'fortran_order' and 'shape': ${quoteHeader(headerText)}`);
  }
  if (typeof descr !== "string") return fail(`unsupported dtype ${describeLiteral(descr)} (supported: ${SUPPORTED_DTYPES})`);
  const dtype = parseDType(descr);
  if (dtype === undefined) return fail(`unsupported dtype '${descr}' (supported: ${SUPPORTED_DTYPES})`);
  if (typeof fortranOrder !== "boolean") return fail(`'fortran_order' must be True or False, found ${describeLiteral(fortranOrder)}`);
  if (!isShape(shapeValue)) return fail(`'shape' must be a tuple of non-negative integers, found ${describeLiteral(shapeValue)}`);
  const shape = shapeValue as number[];

  let count = 1;
  for (const extent of shape) count *= extent;
  if (!Number.isSafeInteger(count)) fail(`the shape (${shape.join(", ")}) has too many elements`);
  const available = fileSize - dataStart;
  const needed = count * dtype.itemSize;
  if (available < needed) {
    fail(`truncated data: shape (${shape.join(", ")}) of '${descr}' needs ${needed} bytes but ${available} follow the header`);
  }
  if (available > needed) {
    fail(`${available - needed} bytes follow the data of shape (${shape.join(", ")}) of '${descr}'`);
  }
  return { shape, descr, dtype, fortranOrder, dataOffset: dataStart, count };
}

/** Writes a float64 array as a version 1.0 .npy ('<f8', C order) with the header padded to a multiple of 64 bytes. */
export function encodeNpy(shape: number[], data: Float64Array): Uint8Array {
  let count = 1;
  for (const extent of shape) {
    if (!Number.isSafeInteger(extent) || extent < 0) throw new RangeError(`encodeNpy: bad extent ${extent}`);
    count *= extent;
  }
  if (count !== data.length) throw new RangeError(`encodeNpy: shape (${shape.join(", ")}) needs ${count} values, got ${data.length}`);
  const shapeText = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(", ")})`;
  let header = `{'descr': '<f8', 'fortran_order': False, 'shape': ${shapeText}, }`;
  const unpadded = 10 + header.length + 1;
  header += " ".repeat((64 - (unpadded % 64)) % 64) + "\n";
  if (header.length > 0xffff) throw new RangeError("encodeNpy: header too long for version 1.0");

  const out = new Uint8Array(10 + header.length + data.length * 8);
  out.set(MAGIC, 0);
  out[6] = 1;
  out[7] = 0;
  const view = new DataView(out.buffer);
  view.setUint16(8, header.length, true);
  for (let k = 0; k < header.length; k++) out[10 + k] = header.charCodeAt(k);
  const dataStart = 10 + header.length;
  if (HOST_IS_LITTLE_ENDIAN) {
    out.set(new Uint8Array(data.buffer, data.byteOffset, data.byteLength), dataStart);
  } else {
    for (let k = 0; k < data.length; k++) view.setFloat64(dataStart + 8 * k, data[k], true);
  }
  return out;
}

/** The element type a 'descr' names, when the reader supports it (undefined otherwise). */
export function parseDType(descr: string): NpyDType | undefined {
  const match = /^([<>=|])([fiub])(\d)$/.exec(descr);
  if (match === null) return undefined;
  const [, order, kindText, sizeText] = match;
  const kind = kindText as Kind;
  const itemSize = Number(sizeText);
  const allowed: Record<Kind, number[]> = { f: [4, 8], i: [1, 2, 4, 8], u: [1, 2, 4, 8], b: [1] };
  if (!allowed[kind].includes(itemSize)) return undefined;
  // '|' means "byte order does not apply", which numpy writes only for one-byte types.
  if (order === "|" && itemSize !== 1) return undefined;
  return { kind, itemSize, littleEndian: order !== ">" };
}

/** True when the values are float64 in this machine's byte order, so their bytes can be used as they are. */
export function isNativeFloat64(dtype: NpyDType): boolean {
  return dtype.kind === "f" && dtype.itemSize === 8 && dtype.littleEndian === HOST_IS_LITTLE_ENDIAN;
}

/**
 * Converts `count` consecutive values of `dtype` starting at `bytes[start]` to
 * float64 into `out[outOffset …]` (in the order they are stored).
 */
export function decodeNpyValues(
  bytes: Uint8Array,
  start: number,
  count: number,
  dtype: NpyDType,
  out: Float64Array,
  outOffset: number,
): void {
  if (isNativeFloat64(dtype)) {
    // One copy of the raw bytes into the output's buffer, aligned or not.
    new Uint8Array(out.buffer, out.byteOffset + outOffset * 8, count * 8).set(bytes.subarray(start, start + count * 8));
    return;
  }
  const read = npyValueReader(bytes, dtype);
  for (let k = 0, offset = start; k < count; k++, offset += dtype.itemSize) out[outOffset + k] = read(offset);
}

/** A function giving the float64 value of the element of `dtype` at byte `offset` of `bytes`. */
export function npyValueReader(bytes: Uint8Array, dtype: NpyDType): (offset: number) => number {
  if (dtype.kind === "b") return (o) => (bytes[o] !== 0 ? 1 : 0);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  return elementReader(view, dtype.kind, dtype.itemSize, dtype.littleEndian);
}

function elementReader(view: DataView, kind: Kind, itemSize: number, le: boolean): (offset: number) => number {
  if (kind === "f") return itemSize === 8 ? (o) => view.getFloat64(o, le) : (o) => view.getFloat32(o, le);
  if (kind === "i") {
    switch (itemSize) {
      case 1:
        return (o) => view.getInt8(o);
      case 2:
        return (o) => view.getInt16(o, le);
      case 4:
        return (o) => view.getInt32(o, le);
      default:
        return (o) => Number(view.getBigInt64(o, le));
    }
  }
  switch (itemSize) {
    case 1:
      return (o) => view.getUint8(o);
    case 2:
      return (o) => view.getUint16(o, le);
    case 4:
      return (o) => view.getUint32(o, le);
    default:
      return (o) => Number(view.getBigUint64(o, le));
  }
}

/** Reorders column-major (first index fastest) values into row-major (last index fastest) order. */
function fortranToC(source: Float64Array, shape: number[]): Float64Array {
  const rank = shape.length;
  const out = new Float64Array(source.length);
  if (out.length === 0) return out;
  const stride = new Array<number>(rank);
  stride[0] = 1;
  for (let d = 1; d < rank; d++) stride[d] = stride[d - 1] * shape[d - 1];
  const index = new Array<number>(rank).fill(0);
  let offset = 0;
  for (let k = 0; k < out.length; k++) {
    out[k] = source[offset];
    for (let d = rank - 1; d >= 0; d--) {
      index[d]++;
      offset += stride[d];
      if (index[d] < shape[d]) break;
      offset -= stride[d] * shape[d];
      index[d] = 0;
    }
  }
  return out;
}

function isShape(value: PyValue): boolean {
  return (
    Array.isArray(value) &&
    (value as PyValue[]).every((v) => typeof v === "number" && Number.isSafeInteger(v) && v >= 0)
  );
}

function quoteHeader(text: string): string {
  const trimmed = text.trimEnd();
  return JSON.stringify(trimmed.length > 200 ? `${trimmed.slice(0, 200)}…` : trimmed);
}

function describeLiteral(value: PyValue): string {
  if (value instanceof Map) return "a dict";
  if (Array.isArray(value)) return "a tuple or list";
  return JSON.stringify(value);
}
