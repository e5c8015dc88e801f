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

/** SHA-256 (FIPS 180-4) of a text (UTF-8) or bytes, hex. */
export function sha256Text(text: string | Uint8Array): string {
  return createHash("sha256").update(text).digest("hex");
}

