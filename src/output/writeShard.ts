import path from "node:path";
import { sha256Text } from "../common/sha256.js";
import { VERSION } from "../version.js";
import type { ContrastNull, ObservedContrast } from "./contrastResults.js";
import { nullTable } from "./nullTable.js";
import type { PreparedAnalysis } from "./preparedAnalysis.js";
import type { InputRecord } from "./provenance.js";
import type { ResultsFolder } from "./resultsFolder.js";
import { SHARD_MANIFEST, type ShardManifest } from "./shardManifest.js";

/** A shard folder: each contrast's share of the null, and shard.json naming the run (its fingerprint) and every file's SHA-256. */
export function writeShard(
  folder: ResultsFolder,
  prepared: PreparedAnalysis,
  contrasts: ObservedContrast[],
  nulls: (ContrastNull | undefined)[],
  inputs: InputRecord[],
  fingerprint: string,
  shard: { index: number; count: number },
): void {
  const first = nulls[0]!;
  const tables = contrasts.map((observed, i) => ({ path: `${observed.contrast.name}/null.tsv`, text: nullTable(nulls[i]!.rows) }));
  const manifest: ShardManifest = {
    tool: { name: "plexus", version: VERSION },
    design: path.resolve(prepared.design.file),
    fingerprint,
    seed: prepared.design.inference.seed,
    ...(prepared.overrides
      ? {
          command_line_overrides: {
            ...(prepared.overrides.permutations !== undefined ? { permutations: prepared.overrides.permutations } : {}),
            ...(prepared.overrides.seed !== undefined ? { seed: prepared.overrides.seed } : {}),
          },
        }
      : {}),
    shard,
    range: { from: first.rows.from, to: first.rows.to - 1 },
    total: first.setup.context.plan.count,
    mode: first.setup.context.plan.exact ? "exact" : "monte-carlo",
    contrasts: contrasts.map((c) => c.contrast.name),
    inputs,
    files: tables.map((table) => ({ path: table.path, sha256: sha256Text(table.text) })),
  };
  folder.write(SHARD_MANIFEST, `${JSON.stringify(manifest, null, 2)}\n`);
  for (const table of tables) folder.write(table.path, table.text);
}
