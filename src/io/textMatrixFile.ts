import { isAscii, isUtf8 } from "node:buffer";
import { InputError, isInputError } from "../errors.js";
import { detectFormat, FORMAT_NAMES, FORMAT_PROBE_BYTES } from "./arrays/fileFormat.js";
import { parseMatrixBytes, type MatrixTextOptions, type ParsedMatrixText } from "./matrixText.js";
import { decodeUtf8 } from "./readInputFile.js";

/**
 * One participant's text matrix from its file's bytes (parseMatrixBytes). When
 * the text cannot be read and the bytes are no text at all (another format's
 * signature, a NUL byte, bytes that are not UTF-8), the error says so instead
 * of quoting binary bytes as a cell; labels must be valid UTF-8.
 */
export function parseMatrixFile(bytes: Uint8Array, file: string, options: MatrixTextOptions, reuse?: ParsedMatrixText): ParsedMatrixText {
  let matrix: ParsedMatrixText;
  try {
    matrix = parseMatrixBytes(bytes, file, options, reuse);
  } catch (error) {
    if (isInputError(error)) throw notTextProblem(bytes, file) ?? error;
    throw error;
  }
  // Numbers are ASCII: only a label can hold bytes that are not UTF-8 (decoded as U+FFFD).
  if (matrix.labels && !isAscii(bytes) && !isUtf8(bytes)) decodeUtf8(bytes, file);
  return matrix;
}

/** Where every participant's file is read as text, what to do with one that is not. */
const TEMPLATE_HINT =
  "the first participant's file decides how every file is read, and it is text here: save this file as text like the others, " +
  "or give every participant a file in one binary format (the format comes from the bytes, not the name; see the README's Inputs section)";

/**
 * The problem with bytes read as a text matrix that are not text: the format
 * their signature names (fileFormat.ts), a NUL byte, or bytes that are not
 * UTF-8; undefined for text.
 */
export function notTextProblem(bytes: Uint8Array, file: string, hint: string = TEMPLATE_HINT): InputError | undefined {
  const format = detectFormat(bytes.subarray(0, FORMAT_PROBE_BYTES));
  if (format !== "text") return new InputError(`this file is ${FORMAT_NAMES[format]}, not a text matrix`, { file }, hint);
  const nul = bytes.indexOf(0);
  if (nul >= 0) {
    return new InputError(`this file holds binary data (a NUL byte on line ${lineOf(bytes, nul)}), not text`, { file, line: lineOf(bytes, nul) }, hint);
  }
  if (!isUtf8(bytes)) {
    try {
      decodeUtf8(bytes, file);
    } catch (error) {
      if (isInputError(error)) return error;
      throw error;
    }
  }
  return undefined;
}

function lineOf(bytes: Uint8Array, offset: number): number {
  let line = 1;
  for (let p = bytes.indexOf(10); p >= 0 && p < offset; p = bytes.indexOf(10, p + 1)) line++;
  return line;
}
