import { isInputError } from "../../errors.js";
import { printable } from "../printable.js";
import type { ArrayContainer, ArrayEntry, NumericArray } from "./arrayContainer.js";
import { compressedHeader, inflateVariable } from "./mat5Compressed.js";
import { MAT5_FORMAT, mat5Error, segment, type Mat5Place, type Segment } from "./mat5Elements.js";
import { describeMatrix, readMatrixHeader, readMatrixValues, type MatrixHeader } from "./mat5Matrix.js";
import { MI_COMPRESSED, MI_MATRIX } from "./mat5Types.js";

// A MATLAB level-5 .mat file ("MATLAB MAT-File Format", The MathWorks, Level 5;
// what MATLAB's save -v6 and -v7 and SciPy's savemat write): a 128-byte header
// (text, subsystem offset, version 0x0100 and the endian indicator "IM" or "MI"
// at byte 126, as the writer's byte order shows it), then one element per
// variable: an miMATRIX, or an miCOMPRESSED holding one. Opening lists every
// variable from its header; reading one converts its values.

const HEADER_BYTES = 128;

interface Variable {
  entry: ArrayEntry;
  compressed: boolean;
  read: () => NumericArray;
}

/** The variable in the element at `at` (its header read, its values left for `read`), and where the next element starts. */
function readVariable(file: Segment, at: number, place: Mat5Place): { variable: Variable; next: number } {
  const { bytes, view, littleEndian } = file;
  const remaining = bytes.length - at;
  if (remaining < 8) throw mat5Error(place, `the file ends ${remaining} bytes after byte ${at}, too few for a variable's tag (it is truncated)`);
  const type = view.getUint32(at, littleEndian);
  const size = view.getUint32(at + 4, littleEndian);
  if (type !== MI_MATRIX && type !== MI_COMPRESSED) {
    throw mat5Error(place, `the element at byte ${at} is data type ${type}, not a variable (miMATRIX or miCOMPRESSED)`);
  }
  const compressed = type === MI_COMPRESSED;
  const start = at + 8;
  const end = start + size;
  if (end > bytes.length) {
    const variable = nameIfReadable(file, start, compressed, place);
    throw mat5Error({ ...place, variable, compressed }, `its element claims ${size} bytes but only ${bytes.length - start} remain (the file is truncated)`);
  }
  if (!compressed) {
    const header = readMatrixHeader(file, start, end, place);
    const named = { ...place, variable: header.name };
    return { variable: { entry: entryOf(header), compressed, read: () => readMatrixValues(file, header, named) }, next: end };
  }
  const data = bytes.subarray(start, end);
  const { header, size: inflatedSize } = compressedHeader(data, littleEndian, place);
  const named = { ...place, variable: header.name, compressed };
  const read = (): NumericArray => {
    const inflated = segment(inflateVariable(data, inflatedSize, named), littleEndian);
    return readMatrixValues(inflated, readMatrixHeader(inflated, 8, 8 + inflatedSize, named), named);
  };
  return { variable: { entry: entryOf(header), compressed, read }, next: end };
}

function entryOf(header: MatrixHeader): ArrayEntry {
  return { name: header.name, shape: header.dims, ...describeMatrix(header) };
}

/** The name of a variable whose element is cut short, when its header is all there. */
function nameIfReadable(file: Segment, start: number, compressed: boolean, place: Mat5Place): string | undefined {
  try {
    const data = file.bytes.subarray(start);
    return compressed ? compressedHeader(data, file.littleEndian, place).header.name : readMatrixHeader(file, start, file.bytes.length, place).name;
  } catch (error) {
    if (isInputError(error)) return undefined;
    throw error;
  }
}

/** A MATLAB level-5 .mat file as a container of its variables (numeric ones readable, the rest listed). */
export function mat5Container(bytes: Uint8Array, file: string): ArrayContainer {
  const place: Mat5Place = { file };
  if (bytes.length < HEADER_BYTES) throw mat5Error(place, `the file has ${bytes.length} bytes, fewer than the ${HEADER_BYTES}-byte header`);
  const indicator = String.fromCharCode(bytes[126], bytes[127]);
  if (indicator !== "IM" && indicator !== "MI") {
    throw mat5Error(place, `the endian indicator at byte 126 is '${printable(indicator)}' (expected IM or MI)`);
  }
  const fileBytes = segment(bytes, indicator === "IM");
  const version = fileBytes.view.getUint16(124, fileBytes.littleEndian);
  if (version !== 0x0100) throw mat5Error(place, `the header gives version 0x${version.toString(16).padStart(4, "0")} (level 5 is 0x0100)`);
  const variables: Variable[] = [];
  for (let at = HEADER_BYTES; at < bytes.length; ) {
    const { variable, next } = readVariable(fileBytes, at, place);
    // An unnamed element is the subsystem data MATLAB writes for objects and function handles, not a variable.
    if (variable.entry.name !== "") variables.push(variable);
    at = next;
  }
  const allCompressed = variables.length > 0 && variables.every((v) => v.compressed);
  return {
    format: allCompressed ? `${MAT5_FORMAT} (compressed)` : MAT5_FORMAT,
    entries: variables.map((v) => v.entry),
    read: (name) => {
      const variable = variables.find((v) => v.entry.name === name);
      if (!variable) throw mat5Error({ file, variable: name }, "there is no such variable");
      return variable.read();
    },
  };
}
