import { InputError } from "../../errors.js";
import { printable } from "../printable.js";
import { MI_DOUBLE, MI_INT16, MI_INT32, MI_INT64, MI_INT8, MI_SINGLE, MI_UINT16, MI_UINT32, MI_UINT64, MI_UINT8, NUMBER_TYPE_BYTES } from "./mat5Types.js";

// The data elements of a MATLAB level-5 .mat file ("MATLAB MAT-File Format",
// The MathWorks, Level 5): an 8-byte tag (data type, byte count) and the data
// padded to 8 bytes, or, for 1 to 4 bytes of data, the small element format: a
// 4-byte tag (byte count in the upper 16 bits, type in the lower) and the data
// in the next 4 bytes. Every length is checked against the bytes there are.

/** Bytes in one byte order: the file's, or a decompressed variable's. */
export interface Segment {
  bytes: Uint8Array;
  view: DataView;
  littleEndian: boolean;
}

export function segment(bytes: Uint8Array, littleEndian: boolean): Segment {
  return { bytes, view: new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength), littleEndian };
}

/** What a message names: the file, and the variable when it is known. */
export interface Mat5Place {
  file: string;
  variable?: string;
  compressed?: boolean;
}

export const MAT5_FORMAT = "MATLAB 5 .mat";

export function mat5Error(place: Mat5Place, problem: string): InputError {
  const variable = place.variable === undefined ? "" : `variable '${printable(place.variable)}'${place.compressed ? " (compressed)" : ""}: `;
  return new InputError(`not a readable ${MAT5_FORMAT} file: ${variable}${problem}`, { file: place.file });
}

export interface Tag {
  type: number;
  /** Byte count of the data. */
  size: number;
  /** Offset of the data in the segment. */
  dataStart: number;
  /** Offset of the next element (after the padding, never beyond the enclosing end). */
  next: number;
}

/** The element at `at`, which must lie inside [at, end). */
export function readTag(seg: Segment, at: number, end: number, place: Mat5Place, what: string): Tag {
  if (end - at < 8) throw mat5Error(place, `it ends inside ${what} (${Math.max(0, end - at)} bytes where a tag of 8 was expected; the file is truncated or damaged)`);
  const first = seg.view.getUint32(at, seg.littleEndian);
  const small = first >>> 16;
  if (small !== 0) {
    if (small > 4) throw mat5Error(place, `the packed tag of ${what} claims ${small} bytes (at most 4 fit)`);
    return { type: first & 0xffff, size: small, dataStart: at + 4, next: at + 8 };
  }
  const size = seg.view.getUint32(at + 4, seg.littleEndian);
  const dataStart = at + 8;
  if (size > end - dataStart) {
    throw mat5Error(place, `the tag of ${what} claims ${size} bytes but only ${end - dataStart} remain (the file is truncated or damaged)`);
  }
  return { type: first, size, dataStart, next: Math.min(end, dataStart + size + ((8 - (size % 8)) % 8)) };
}

const HOST_LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

type TypedView = Int8Array | Uint8Array | Int16Array | Uint16Array | Int32Array | Uint32Array | Float32Array | Float64Array | BigInt64Array | BigUint64Array;

function nativeView(type: number, buffer: ArrayBufferLike, offset: number, count: number): TypedView {
  switch (type) {
    case MI_INT8: return new Int8Array(buffer, offset, count);
    case MI_UINT8: return new Uint8Array(buffer, offset, count);
    case MI_INT16: return new Int16Array(buffer, offset, count);
    case MI_UINT16: return new Uint16Array(buffer, offset, count);
    case MI_INT32: return new Int32Array(buffer, offset, count);
    case MI_UINT32: return new Uint32Array(buffer, offset, count);
    case MI_SINGLE: return new Float32Array(buffer, offset, count);
    case MI_DOUBLE: return new Float64Array(buffer, offset, count);
    case MI_INT64: return new BigInt64Array(buffer, offset, count);
    default: return new BigUint64Array(buffer, offset, count);
  }
}

function readOne(view: DataView, type: number, at: number, le: boolean): number {
  switch (type) {
    case MI_INT8: return view.getInt8(at);
    case MI_UINT8: return view.getUint8(at);
    case MI_INT16: return view.getInt16(at, le);
    case MI_UINT16: return view.getUint16(at, le);
    case MI_INT32: return view.getInt32(at, le);
    case MI_UINT32: return view.getUint32(at, le);
    case MI_SINGLE: return view.getFloat32(at, le);
    case MI_DOUBLE: return view.getFloat64(at, le);
    case MI_INT64: return Number(view.getBigInt64(at, le));
    default: return Number(view.getBigUint64(at, le));
  }
}

/**
 * The numbers of a data element as float64, converted by the type they are
 * stored as (MATLAB may store a double array as miUINT8, miINT16, …). When the
 * data are doubles in the host's byte order and aligned, the result is a view
 * of the segment's bytes, not a copy. 64-bit integers beyond 2^53 are rounded
 * to the nearest double.
 */
export function storedNumbers(seg: Segment, tag: Tag, place: Mat5Place, what: string): Float64Array {
  const width = NUMBER_TYPE_BYTES[tag.type];
  if (width === undefined) throw mat5Error(place, `${what} are stored as data type ${tag.type}, which holds no numbers`);
  if (tag.size % width !== 0) throw mat5Error(place, `${what} take ${tag.size} bytes, not a whole number of ${width}-byte values`);
  const count = tag.size / width;
  if (seg.littleEndian === HOST_LITTLE_ENDIAN) {
    let buffer = seg.bytes.buffer;
    let offset = seg.bytes.byteOffset + tag.dataStart;
    if (offset % width !== 0) {
      buffer = seg.bytes.slice(tag.dataStart, tag.dataStart + tag.size).buffer;
      offset = 0;
    }
    const view = nativeView(tag.type, buffer, offset, count);
    if (view instanceof Float64Array) return view;
    if (view instanceof BigInt64Array || view instanceof BigUint64Array) {
      const out = new Float64Array(count);
      for (let k = 0; k < count; k++) out[k] = Number(view[k]);
      return out;
    }
    return new Float64Array(view);
  }
  const out = new Float64Array(count);
  for (let k = 0, at = tag.dataStart; k < count; k++, at += width) out[k] = readOne(seg.view, tag.type, at, seg.littleEndian);
  return out;
}

/** Longer than any name MATLAB writes (63 characters). */
const LONGEST_NAME = 1024;

/** The text of a name element (bytes read as Latin-1, trailing NULs dropped). */
export function storedName(seg: Segment, tag: Tag, place: Mat5Place): string {
  if (tag.size > LONGEST_NAME) throw mat5Error(place, `a variable name of ${tag.size} bytes is longer than any MATLAB writes`);
  let end = tag.dataStart + tag.size;
  while (end > tag.dataStart && seg.bytes[end - 1] === 0) end--;
  let name = "";
  for (let k = tag.dataStart; k < end; k++) name += String.fromCharCode(seg.bytes[k]);
  return name;
}
