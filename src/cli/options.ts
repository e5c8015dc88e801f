import { InputError } from "../errors.js";

// Values of the options several commands share, checked where the command line is read.

export function parseThreads(text: string): number {
  const value = Number(text);
  if (!Number.isInteger(value) || value < 1 || value > 256) {
    throw new InputError(`--threads takes a whole number from 1 to 256, found '${text}'`, { key: "--threads" });
  }
  return value;
}

export function parseShard(text: string): { index: number; count: number } {
  const match = /^(\d+)\/(\d+)$/.exec(text.trim());
  const index = match ? Number(match[1]) : NaN;
  const count = match ? Number(match[2]) : NaN;
  if (!match || count < 1 || index < 1 || index > count || count > 100_000) {
    throw new InputError(`--shard takes k/n with 1 ≤ k ≤ n (e.g. 3/10), found '${text}'`, { key: "--shard" });
  }
  return { index, count };
}
