import type { InputRecord } from "./provenance.js";

/** shard.json: what a shard folder holds and what it must match to be merged. */
export const SHARD_MANIFEST = "shard.json";

export interface ShardManifest {
  tool: { name: string; version: string };
  /** Absolute path of the design file the shard ran. */
  design: string;
  fingerprint: string;
  seed: number;
  /**
   * `--permutations`/`--seed` the shard ran with in place of the design's (absent when none):
   * merge applies them again, and shards with different ones have different fingerprints.
   */
  command_line_overrides?: { permutations?: number; seed?: number };
  shard: { index: number; count: number };
  /** 1-based, inclusive range of relabelings computed. */
  range: { from: number; to: number };
  total: number;
  mode: "exact" | "monte-carlo";
  contrasts: string[];
  inputs: InputRecord[];
  /** Every other file of the shard folder (`<contrast>/null.tsv`, `/`-separated) with its SHA-256; merge checks them before reading. */
  files: ShardFile[];
}

export interface ShardFile {
  path: string;
  sha256: string;
}
