import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import { InputError } from "../errors.js";
import { concatenateChunks } from "../permute/nullEngine.js";
import type { NullChunk } from "../permute/nullRange.js";
import { parseNullTable } from "../output/nullTable.js";
import { hashInputs } from "../output/provenance.js";
import { ResultsFolder } from "../output/resultsFolder.js";
import { SHARD_MANIFEST, type ShardManifest } from "../output/shardManifest.js";
import { fitAll, observeContrast } from "./analyzeContrasts.js";
import { setupNull, type ContrastNull } from "./permutationInference.js";
import { prepareAnalysis } from "./prepareAnalysis.js";
import { writeReport } from "../report/writeReport.js";
import { runFingerprint, writeResults, type RunLog } from "./runAnalysis.js";

function readManifest(folder: string): ShardManifest {
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

/**
 * Merges shard folders into the results of an unsharded run: checks that
 * the shards come from the same design, inputs (SHA-256) and seed, that none
 * is missing or repeated, then writes the same outputs a single run writes.
 */
export function mergeShards(
  shardFolders: string[],
  options: { out: string; force?: boolean; quiet?: boolean; commandLine?: string[] },
  log: RunLog,
): string {
  if (shardFolders.length === 0) throw new InputError("name the shard folders to merge");
  const manifests = shardFolders.map((folder) => ({ folder, manifest: readManifest(folder) }));
  const first = manifests[0].manifest;
  for (const { folder, manifest } of manifests.slice(1)) {
    if (manifest.fingerprint !== first.fingerprint || manifest.design !== first.design) {
      throw new InputError(
        "this shard belongs to a different design, inputs, seed or options than the first shard",
        { file: path.join(folder, SHARD_MANIFEST) },
        `first shard: ${manifests[0].folder}`,
      );
    }
    if (manifest.shard.count !== first.shard.count) {
      throw new InputError(
        `this shard is one of ${manifest.shard.count}, the first is one of ${first.shard.count}`,
        { file: path.join(folder, SHARD_MANIFEST) },
      );
    }
  }
  const byIndex = new Map<number, { folder: string; manifest: ShardManifest }>();
  for (const entry of manifests) {
    const previous = byIndex.get(entry.manifest.shard.index);
    if (previous) {
      throw new InputError(`shard ${entry.manifest.shard.index}/${first.shard.count} is given twice`, { file: entry.folder }, `also in ${previous.folder}`);
    }
    byIndex.set(entry.manifest.shard.index, entry);
  }
  const missing: number[] = [];
  for (let k = 1; k <= first.shard.count; k++) if (!byIndex.has(k)) missing.push(k);
  if (missing.length > 0) {
    throw new InputError(`shard${missing.length > 1 ? "s" : ""} ${missing.map((k) => `${k}/${first.shard.count}`).join(", ")} missing`, {
      file: manifests[0].folder,
    });
  }
  const opened: { folder?: ResultsFolder } = {};
  try {
    // The output is checked (inputs and shards, lock, --force rule) before any matrix is read.
    const prepared = prepareAnalysis(first.design, {
      beforeMatrices: (_design, inputs) => {
        opened.folder = ResultsFolder.open(options.out, {
          force: options.force ?? false,
          inputs: { files: inputs.files, folders: [...inputs.folders, ...shardFolders] },
          warn: log.warn,
        });
      },
    });
    const folder = opened.folder;
    if (!folder) throw new Error("the output folder was not opened before the matrices were read");
    const inputs = hashInputs(prepared.inputs);
    if (runFingerprint(prepared, inputs) !== first.fingerprint) {
      const changed = first.inputs.filter((recorded) => !inputs.some((now) => now.path === recorded.path && now.sha256 === recorded.sha256));
      throw new InputError(
        changed.length > 0
          ? `the inputs changed since the shards ran: ${changed.map((c) => c.path).join(", ")}`
          : "the design file's options changed since the shards ran",
        { file: first.design },
      );
    }
    for (const warning of prepared.warnings) log.warn(warning);
    const fit = fitAll(prepared);
    const contrasts = prepared.contrasts.map((contrast) => observeContrast(prepared, fit, contrast));
    const nulls: ContrastNull[] = contrasts.map((observed, index) => {
      const setup = setupNull(prepared, observed, index === contrasts.length - 1);
      const chunks: NullChunk[] = [];
      for (let k = 1; k <= first.shard.count; k++) {
        const { folder: shardFolder } = byIndex.get(k)!;
        const file = path.join(shardFolder, observed.contrast.name, "null.tsv");
        if (!existsSync(file)) throw new InputError("the shard has no null distribution for this contrast", { file });
        const chunk = parseNullTable(readFileSync(file, "utf8"), file);
        const expectedFrom = k === 1 ? 1 : chunks[chunks.length - 1].to;
        if (chunk.from !== expectedFrom && chunk.to > chunk.from) {
          throw new InputError(`expected relabelings from ${expectedFrom}, found from ${chunk.from}`, { file });
        }
        chunks.push(chunk);
      }
      const total = setup.context.plan.count;
      const last = chunks[chunks.length - 1];
      if (last.to !== total + 1) {
        throw new InputError(`the shards hold ${last.to - 1} relabelings, the run needs ${total}`, { file: byIndex.get(first.shard.count)!.folder });
      }
      return { setup, rows: concatenateChunks(chunks, 1, total + 1) };
    });
    writeResults(folder, prepared, contrasts, nulls, inputs, options.commandLine ?? null);
    writeReport(folder.staging, (relative, content) => folder.write(relative, content));
    folder.commit();
    if (!options.quiet) log.info(`merged ${first.shard.count} shards into ${folder.target}`);
    return folder.target;
  } catch (error) {
    opened.folder?.abandon();
    throw error;
  }
}
