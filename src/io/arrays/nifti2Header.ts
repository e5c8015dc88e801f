import { InputError } from "../../errors.js";
import type { NpyDType } from "../npy.js";

/**
 * The NIfTI-2 header (540 bytes) and the extensions after it, as the NIfTI-2
 * format lays them out (NIfTI Data Format Working Group, nifti2.h, 2011):
 *
 *   0 sizeof_hdr int32 = 540 (its byte order is the file's)   4 magic "n+2\0\r\n\x1a\n"
 *   12 datatype int16   14 bitpix int16   16 dim int64[8]
 *   168 vox_offset int64   176 scl_slope float64   184 scl_inter float64
 *   504 intent_code int32   508 intent_name char[16]
 *   540 extension flag char[4]; when byte 540 is not 0, extensions follow at 544,
 *       each esize int32 (its length, header included), ecode int32, then esize − 8 bytes,
 *       up to vox_offset, where the data starts.
 */
export interface Nifti2Header {
  littleEndian: boolean;
  datatype: number;
  bitpix: number;
  /** dim[0] … dim[7]: dim[0] is the number of dimensions used. */
  dim: number[];
  voxOffset: number;
  sclSlope: number;
  sclInter: number;
  intentCode: number;
  intentName: string;
}

export const NIFTI2_HEADER_BYTES = 540;
/** The NIfTI extension code of the CIFTI-2 XML. */
export const CIFTI_EXTENSION_CODE = 32;

/** NIfTI datatype codes of the element types read (nifti1.h: DT_UINT8 … DT_UINT64), as element readers. */
const DATATYPES: Record<number, { name: string; kind: NpyDType["kind"]; itemSize: number }> = {
  2: { name: "uint8", kind: "u", itemSize: 1 },
  4: { name: "int16", kind: "i", itemSize: 2 },
  8: { name: "int32", kind: "i", itemSize: 4 },
  16: { name: "float32", kind: "f", itemSize: 4 },
  64: { name: "float64", kind: "f", itemSize: 8 },
  256: { name: "int8", kind: "i", itemSize: 1 },
  512: { name: "uint16", kind: "u", itemSize: 2 },
  768: { name: "uint32", kind: "u", itemSize: 4 },
  1024: { name: "int64", kind: "i", itemSize: 8 },
  1280: { name: "uint64", kind: "u", itemSize: 8 },
};

/** The element type of a datatype code, or undefined for types not read (complex, RGB, float128, …). */
export function niftiElementType(header: Nifti2Header): { name: string; dtype: NpyDType } | undefined {
  const type = DATATYPES[header.datatype];
  if (!type) return undefined;
  return { name: type.name, dtype: { kind: type.kind, itemSize: type.itemSize, littleEndian: header.littleEndian } };
}

function fail(file: string, what: string): never {
  throw new InputError(`not a readable NIfTI-2 file: ${what}`, { file });
}

/** The header of a NIfTI-2 file in either byte order; InputError when it is short or inconsistent. */
export function readNifti2Header(bytes: Uint8Array, file: string): Nifti2Header {
  if (bytes.length < NIFTI2_HEADER_BYTES) fail(file, `only ${bytes.length} bytes, shorter than the ${NIFTI2_HEADER_BYTES}-byte header`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const littleEndian = view.getInt32(0, true) === NIFTI2_HEADER_BYTES;
  if (!littleEndian && view.getInt32(0, false) !== NIFTI2_HEADER_BYTES) fail(file, "sizeof_hdr is not 540");
  const int64 = (at: number, what: string): number => {
    const value = view.getBigInt64(at, littleEndian);
    if (value > BigInt(Number.MAX_SAFE_INTEGER) || value < -BigInt(Number.MAX_SAFE_INTEGER)) fail(file, `${what} ${value} is out of range`);
    return Number(value);
  };
  const dim = Array.from({ length: 8 }, (_, k) => int64(16 + 8 * k, `dim[${k}]`));
  if (dim[0] < 1 || dim[0] > 7) fail(file, `dim[0] is ${dim[0]}, not a number of dimensions between 1 and 7`);
  if (dim.slice(1, dim[0] + 1).some((d) => d < 0)) fail(file, `a dimension is negative (dim = ${dim.join(", ")})`);
  const nameBytes = bytes.subarray(508, 524);
  const nameEnd = nameBytes.indexOf(0);
  return {
    littleEndian,
    datatype: view.getInt16(12, littleEndian),
    bitpix: view.getInt16(14, littleEndian),
    dim,
    voxOffset: int64(168, "vox_offset"),
    sclSlope: view.getFloat64(176, littleEndian),
    sclInter: view.getFloat64(184, littleEndian),
    intentCode: view.getInt32(504, littleEndian),
    intentName: new TextDecoder("latin1").decode(nameEnd < 0 ? nameBytes : nameBytes.subarray(0, nameEnd)),
  };
}

/** The content of the first extension with `code` (undefined when there is none); the extensions must lie between the header and vox_offset. */
export function niftiExtension(bytes: Uint8Array, header: Nifti2Header, code: number, file: string): Uint8Array | undefined {
  if (bytes.length < NIFTI2_HEADER_BYTES + 4 || bytes[NIFTI2_HEADER_BYTES] === 0) return undefined;
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const end = Math.min(header.voxOffset, bytes.length);
  let at = NIFTI2_HEADER_BYTES + 4;
  while (at + 8 <= end) {
    const size = view.getInt32(at, header.littleEndian);
    const ecode = view.getInt32(at + 4, header.littleEndian);
    if (size < 8 || at + size > end) {
      fail(file, `the header extension at byte ${at} claims ${size} bytes, ${size < 8 ? "fewer than its own 8-byte header" : `past the data offset (${header.voxOffset}) or the end of the file`}`);
    }
    if (ecode === code) return bytes.subarray(at + 8, at + size);
    at += size;
  }
  return undefined;
}
