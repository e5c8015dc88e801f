import { readFileSync } from "node:fs";
import { InputError } from "../errors.js";

/**
 * Reading a user's input file: any failure of the operating system (missing
 * file, no permission, a directory) becomes an InputError that names the file
 * and the system's reason, so the CLI prints one line and no stack.
 */
export function readTextFile(path: string, hint?: string): string {
  try {
    return readFileSync(path, "utf8");
  } catch (error) {
    throw cannotRead(path, error, hint);
  }
}

/** The bytes of a user's input file; failures as for `readTextFile`. */
export function readBinaryFile(path: string, hint?: string): Uint8Array {
  try {
    return readFileSync(path);
  } catch (error) {
    throw cannotRead(path, error, hint);
  }
}

function cannotRead(path: string, error: unknown, hint?: string): InputError {
  return new InputError(`cannot read ${path}: ${systemReason(error)}`, { file: path }, hint);
}

/**
 * Node words system errors as `ENOENT: no such file or directory, open '/x'`;
 * keep the readable middle ("no such file or directory") and the code.
 */
export function systemReason(error: unknown): string {
  if (!(error instanceof Error)) return String(error);
  const code = (error as NodeJS.ErrnoException).code;
  let reason = error.message;
  if (code !== undefined && reason.startsWith(`${code}: `)) {
    reason = reason.slice(code.length + 2);
    const comma = reason.lastIndexOf(", ");
    if (comma > 0) reason = reason.slice(0, comma);
    return `${reason} (${code})`;
  }
  return reason;
}
