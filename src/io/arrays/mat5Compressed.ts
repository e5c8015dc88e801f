import { constants, inflateSync } from "node:zlib";
import { isInputError } from "../../errors.js";
import { mat5Error, segment, type Mat5Place } from "./mat5Elements.js";
import { readMatrixHeader, type MatrixHeader } from "./mat5Matrix.js";
import { MI_MATRIX } from "./mat5Types.js";

// miCOMPRESSED elements: a zlib stream (RFC 1950) whose inflated bytes are one
// element, an miMATRIX. Node's zlib does the inflating. Listing a file reads
// only each variable's header, from the inflated start of its stream; the
// whole stream is inflated when the variable is read, never to more bytes than
// its own tag claims.

/** Compressed bytes inflated to read a header; a header not found in the second is refused. */
const HEADER_PREFIXES = [1024, 65536];

function zlibReason(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

/** The start of what `data` inflates to (a cut stream gives what its bytes hold). */
function inflateStart(data: Uint8Array, place: Mat5Place): Uint8Array {
  try {
    return inflateSync(data, { finishFlush: constants.Z_SYNC_FLUSH });
  } catch (error) {
    throw mat5Error(place, `its compressed data are damaged (zlib: ${zlibReason(error)})`);
  }
}

export interface CompressedHeader {
  header: MatrixHeader;
  /** Byte count of the inflated miMATRIX's data (after its 8-byte tag). */
  size: number;
}

/** The header of the variable compressed in `data`. */
export function compressedHeader(data: Uint8Array, littleEndian: boolean, place: Mat5Place): CompressedHeader {
  for (let attempt = 0; ; attempt++) {
    const prefix = HEADER_PREFIXES[attempt];
    const whole = prefix >= data.length;
    const last = whole || attempt === HEADER_PREFIXES.length - 1;
    const head = segment(inflateStart(data.subarray(0, Math.min(prefix, data.length)), place), littleEndian);
    try {
      if (head.bytes.length < 8) throw mat5Error(place, `its compressed data inflate to ${head.bytes.length} bytes, too few for a tag`);
      const type = head.view.getUint32(0, littleEndian);
      const size = head.view.getUint32(4, littleEndian);
      if (type !== MI_MATRIX) throw mat5Error(place, `its compressed data hold data type ${type}, not a variable (miMATRIX)`);
      return { header: readMatrixHeader(head, 8, Math.min(8 + size, head.bytes.length), place), size };
    } catch (error) {
      if (last || !isInputError(error)) throw error;
    }
  }
}

/** Whatever a compressed stream may hold after the one element it inflates to. */
const TRAILING_ALLOWANCE = 4096;

/** The whole inflated element (tag and data), checked to hold the `size` bytes its tag claims. */
export function inflateVariable(data: Uint8Array, size: number, place: Mat5Place): Uint8Array {
  const expected = 8 + size;
  let inflated: Uint8Array;
  try {
    inflated = inflateSync(data, { maxOutputLength: expected + TRAILING_ALLOWANCE });
  } catch (error) {
    if ((error as { code?: string }).code === "ERR_BUFFER_TOO_LARGE") {
      throw mat5Error(place, `its compressed data inflate to more than the ${expected} bytes its tag claims`);
    }
    throw mat5Error(place, `its compressed data are damaged or cut short (zlib: ${zlibReason(error)})`);
  }
  if (inflated.length < expected) {
    throw mat5Error(place, `its compressed data inflate to ${inflated.length} bytes where its tag claims ${expected}`);
  }
  return inflated;
}
