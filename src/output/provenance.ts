import { createHash } from "node:crypto";
import { closeSync, openSync, readSync } from "node:fs";

/** SHA-256 (FIPS 180-4) of a file's bytes, hex; read in 8 MiB pieces, so any size works. */
export function sha256File(file: string): string {
  const hash = createHash("sha256");
  const buffer = Buffer.allocUnsafe(8 * 1024 * 1024);
  const fd = openSync(file, "r");
  try {
    for (;;) {
      const read = readSync(fd, buffer, 0, buffer.length, null);
      if (read === 0) break;
      hash.update(buffer.subarray(0, read));
    }
  } finally {
    closeSync(fd);
  }
  return hash.digest("hex");
}

export function sha256Text(text: string | Uint8Array): string {
  return createHash("sha256").update(text).digest("hex");
}

export interface InputRecord {
  role: string;
  path: string;
  sha256: string;
}

/**
 * Each input with its SHA-256: the one given (taken from the bytes loaded, as
 * for text matrices) or else the file's, read now (sha256File).
 */
export function hashInputs(inputs: { role: string; path: string; sha256?: string }[]): InputRecord[] {
  return inputs.map((input) => ({ ...input, sha256: input.sha256 ?? sha256File(input.path) }));
}
