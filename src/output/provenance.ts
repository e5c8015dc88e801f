import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";

/** SHA-256 (FIPS 180-4) of a file's bytes, hex. */
export function sha256File(file: string): string {
  return createHash("sha256").update(readFileSync(file)).digest("hex");
}

export function sha256Text(text: string | Uint8Array): string {
  return createHash("sha256").update(text).digest("hex");
}

export interface InputRecord {
  role: string;
  path: string;
  sha256: string;
}

export function hashInputs(inputs: { role: string; path: string }[]): InputRecord[] {
  return inputs.map((input) => ({ ...input, sha256: sha256File(input.path) }));
}
