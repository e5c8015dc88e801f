import { sha256File } from "../common/sha256.js";

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
