import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import { sha256Text } from "../common/sha256.js";
import { InputError, inputErrors } from "../errors.js";
import { SHARD_MANIFEST, type ShardFile, type ShardManifest } from "./shardManifest.js";

// Reading back the shard folders `plexus run --shard` wrote: the manifest, and every file it lists checked against its SHA-256.

export function readShardManifest(folder: string): ShardManifest {
  const file = path.join(folder, SHARD_MANIFEST);
  if (!existsSync(file)) {
    throw new InputError(`not a shard folder (no ${SHARD_MANIFEST})`, { file: folder }, "pass the folders written by `plexus run --shard K/N`");
  }
  try {
    return JSON.parse(readFileSync(file, "utf8")) as ShardManifest;
  } catch (error) {
    throw new InputError(`the shard manifest is not valid JSON: ${(error as Error).message}`, { file });
  }
}

/** A `files` entry of shard.json: a relative `/`-separated path that stays inside the folder, and a hex SHA-256. */
function isShardFile(entry: unknown): entry is ShardFile {
  if (typeof entry !== "object" || entry === null) return false;
  const { path: relative, sha256 } = entry as Record<string, unknown>;
  return (
    typeof relative === "string" &&
    typeof sha256 === "string" &&
    /^[0-9a-f]{64}$/.test(sha256) &&
    relative.split("/").every((part) => part !== "" && part !== "." && part !== ".." && !part.includes("\\"))
  );
}

/**
 * Reads every file a shard's manifest lists and checks its SHA-256 against
 * the manifest, so a truncated or damaged file is blamed on its own shard
 * before anything is read from it. Returns the verified texts by full path;
 * every mismatch of every shard is reported in one error.
 */
export function verifyShardFiles(shards: { folder: string; manifest: ShardManifest }[], count: number): Map<string, string> {
  const texts = new Map<string, string>();
  const problems: InputError[] = [];
  for (const { folder, manifest } of shards) {
    const which = `shard ${manifest.shard.index}/${count}`;
    if (!Array.isArray(manifest.files)) {
      problems.push(
        new InputError(`${SHARD_MANIFEST} of ${which} lists no SHA-256 of its files (an older plexus wrote it)`, { file: path.join(folder, SHARD_MANIFEST) }, "run this shard again"),
      );
      continue;
    }
    for (const [k, listed] of (manifest.files as unknown[]).entries()) {
      if (!isShardFile(listed)) {
        problems.push(new InputError(`${SHARD_MANIFEST} of ${which}: files[${k}] is not a file inside the shard folder with its SHA-256`, { file: path.join(folder, SHARD_MANIFEST) }));
        continue;
      }
      const file = path.join(folder, ...listed.path.split("/"));
      const name = path.basename(listed.path);
      if (!existsSync(file)) {
        problems.push(new InputError(`${name} of ${which} is missing (it is listed in ${SHARD_MANIFEST})`, { file }));
        continue;
      }
      const bytes = readFileSync(file);
      if (sha256Text(bytes) !== listed.sha256) {
        problems.push(new InputError(`${name} of ${which} is damaged or truncated: its SHA-256 differs from ${SHARD_MANIFEST}`, { file }, "run this shard again"));
        continue;
      }
      texts.set(file, bytes.toString("utf8"));
    }
  }
  const error = inputErrors(problems);
  if (error) throw error;
  return texts;
}
