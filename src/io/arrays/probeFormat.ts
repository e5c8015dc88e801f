import { InputFile } from "../readInputFile.js";
import { detectFormat, FORMAT_PROBE_BYTES, type FileFormat } from "./fileFormat.js";

/** The format of a file from its first bytes (the file is opened, checked to be a regular file, and closed). */
export function probeFormat(file: string, hint?: string): FileFormat {
  const input = InputFile.open(file, hint);
  try {
    const prefix = new Uint8Array(Math.min(input.size, FORMAT_PROBE_BYTES));
    const read = input.readAt(prefix, 0);
    return detectFormat(prefix.subarray(0, read));
  } finally {
    input.close();
  }
}
