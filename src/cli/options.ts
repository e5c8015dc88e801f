import { InputError } from "../errors.js";
import type { InferenceOverrides } from "../common/inferenceOverrides.js";
import { INFERENCE_KEYS } from "../io/design/designKeys.js";

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

/** `--memory GB`: the memory to plan for, in gigabytes (10^9 bytes), instead of this machine's. */
export function parseMemory(text: string): number {
  const value = /^\s*\d+(\.\d+)?\s*$/.test(text) ? Number(text) : NaN;
  if (!(value >= 0.1 && value <= 1e6)) {
    throw new InputError(`--memory takes the gigabytes to plan for, a number from 0.1 to 1000000 (e.g. 64), found '${text}'`, { key: "--memory" });
  }
  return value;
}

export const MEMORY_FLAG = ["--memory <GB>", "memory to plan for, in GB, instead of this machine's (a cluster task's request)"] as const;

/** `--permutations N`: the design key's own rule (a whole number from 1 to the limit). */
export function parsePermutations(text: string): number {
  const value = /^\s*\d+\s*$/.test(text) ? Number(text) : NaN;
  if (!INFERENCE_KEYS.permutations.test(value)) {
    throw new InputError(`--permutations takes ${INFERENCE_KEYS.permutations.rule}, found '${text}'`, { key: "--permutations" });
  }
  return value;
}

/** `--seed N`: the design key's own rule (a whole number ≥ 0). */
export function parseSeed(text: string): number {
  const value = /^\s*\d+\s*$/.test(text) ? Number(text) : NaN;
  if (!INFERENCE_KEYS.seed.test(value)) {
    throw new InputError(`--seed takes ${INFERENCE_KEYS.seed.rule} (at most ${Number.MAX_SAFE_INTEGER}), found '${text}'`, { key: "--seed" });
  }
  return value;
}

/** The `--permutations`/`--seed` flags as overrides of the design's inference (undefined when neither is given). */
export function parseOverrides(flags: { permutations?: string; seed?: string }): InferenceOverrides | undefined {
  if (flags.permutations === undefined && flags.seed === undefined) return undefined;
  return {
    ...(flags.permutations !== undefined ? { permutations: parsePermutations(flags.permutations) } : {}),
    ...(flags.seed !== undefined ? { seed: parseSeed(flags.seed) } : {}),
  };
}

export const PERMUTATIONS_FLAG = ["--permutations <n>", "relabelings to draw, instead of the design's inference.permutations (a trial run; recorded in the results)"] as const;
export const SEED_FLAG = ["--seed <n>", "seed of the relabelings, instead of the design's inference.seed (recorded in the results)"] as const;
