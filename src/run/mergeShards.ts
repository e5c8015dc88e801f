import path from "node:path";
import { InputError } from "../errors.js";
import { concatenateChunks } from "../permute/nullEngine.js";
import type { NullChunk } from "../permute/nullRangeTypes.js";
import { parseNullTable } from "../output/nullTable.js";
import { hashInputs } from "../output/provenance.js";
import { ResultsFolder } from "../output/resultsFolder.js";
import { readShardManifest, verifyShardFiles } from "../output/shardFiles.js";
import { SHARD_MANIFEST, type ShardManifest } from "../output/shardManifest.js";
import { fitAll, observeContrast } from "./analyzeContrasts.js";
import type { ContrastNull } from "../output/contrastResults.js";
import { writeResults } from "../output/writeResults.js";
import { inferContrasts } from "./acrossContrasts.js";
import { setupNull } from "./permutationInference.js";
import { prepareAnalysis } from "./prepareAnalysis.js";
import { captureSubnetworkEdges, subnetworkValues } from "./subnetworkValues.js";
import { writeReport } from "../output/report/writeReport.js";
import type { RunLog } from "./runAnalysis.js";
import { runFingerprint } from "./runFingerprint.js";
import { overrideFlags, type InferenceOverrides } from "../common/inferenceOverrides.js";
import { INFERENCE_KEYS, PERMUTATIONS_LIMIT } from "../io/design/designKeys.js";

/**
 * Merges shard folders into the results of an unsharded run: checks that
 * the shards come from the same design, inputs (SHA-256) and seed, that none
 * is missing or repeated and that every file still has the SHA-256 its
 * manifest recorded, then writes the same outputs a single run writes.
 */
export async function mergeShards(
  shardFolders: string[],
  options: { out: string; force?: boolean; quiet?: boolean; commandLine?: string[] },
  log: RunLog,
): Promise<string> {
  if (shardFolders.length === 0) throw new InputError("name the shard folders to merge");
  const manifests = shardFolders.map((folder) => ({ folder, manifest: readShardManifest(folder) }));
  const first = manifests[0].manifest;
  const overrides = manifestOverrides(manifests[0].folder, first);
  for (const { folder, manifest } of manifests.slice(1)) {
    const flags = overrideFlags(manifestOverrides(folder, manifest));
    if (flags !== overrideFlags(overrides)) {
      throw new InputError(
        `this shard ran with ${flags || "no --permutations or --seed"} on the command line, the first shard with ${overrideFlags(overrides) || "none"}: their relabelings differ`,
        { file: path.join(folder, SHARD_MANIFEST) },
        `first shard: ${manifests[0].folder}; run every shard with the same options`,
      );
    }
    if (manifest.fingerprint !== first.fingerprint) {
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
    const given = [...byIndex.keys()].sort((a, b) => a - b).map((k) => `${k}/${first.shard.count}`);
    throw new InputError(
      `shard${missing.length > 1 ? "s" : ""} ${missing.map((k) => `${k}/${first.shard.count}`).join(", ")} missing: the folders given hold shard${given.length > 1 ? "s" : ""} ${given.join(", ")}`,
      {},
      "add the missing shard folders to the command (each shard folder has a shard.json naming its k/n)",
    );
  }
  const verified = verifyShardFiles(
    [...byIndex.keys()].sort((a, b) => a - b).map((k) => byIndex.get(k)!),
    first.shard.count,
  );
  const opened: { folder?: ResultsFolder } = {};
  try {
    // The output is checked (inputs and shards, lock, --force rule) before any matrix is read.
    const prepared = prepareAnalysis(first.design, {
      ...(overrides ? { overrides } : {}),
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
    const captured = captureSubnetworkEdges(prepared, contrasts);
    const nulls: ContrastNull[] = contrasts.map((observed, index) => {
      const setup = setupNull(prepared, observed, index === contrasts.length - 1);
      const chunks: NullChunk[] = [];
      for (let k = 1; k <= first.shard.count; k++) {
        const { folder: shardFolder } = byIndex.get(k)!;
        const file = path.join(shardFolder, observed.contrast.name, "null.tsv");
        const text = verified.get(file);
        if (text === undefined) throw new InputError(`the shard has no null distribution for this contrast (none is listed in ${SHARD_MANIFEST})`, { file });
        const chunk = parseNullTable(text, file);
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
    const { inferred, familyNull } = inferContrasts(prepared, contrasts, nulls);
    const values = subnetworkValues(prepared, contrasts, inferred, captured);
    writeResults(folder, { prepared, contrasts, nulls, inferred, familyNull, inputs, subnetworkValues: values, commandLine: options.commandLine ?? null });
    await folder.readingBack(() => writeReport(folder.staging, (relative, content) => folder.write(relative, content)));
    folder.commit();
    if (!options.quiet) log.info(`merged ${first.shard.count} shards into ${folder.target}`);
    return folder.target;
  } catch (error) {
    opened.folder?.abandon();
    throw error;
  }
}

/** The `--permutations`/`--seed` a shard ran with (shard.json `command_line_overrides`), checked as the command line checks them. */
function manifestOverrides(folder: string, manifest: ShardManifest): InferenceOverrides | undefined {
  const recorded: unknown = manifest.command_line_overrides;
  if (recorded === undefined) return undefined;
  const file = path.join(folder, SHARD_MANIFEST);
  if (typeof recorded !== "object" || recorded === null) throw new InputError("command_line_overrides is not an object", { file });
  const { permutations, seed } = recorded as Record<string, unknown>;
  // The design keys' own rules, as the command line applies them (cli/options.ts).
  const valid = (value: unknown, key: { test: (v: number) => boolean }) => typeof value === "number" && key.test(value);
  if (permutations !== undefined && !valid(permutations, INFERENCE_KEYS.permutations)) {
    throw new InputError(`command_line_overrides.permutations is not a whole number from 1 to ${PERMUTATIONS_LIMIT}`, { file });
  }
  if (seed !== undefined && !valid(seed, INFERENCE_KEYS.seed)) throw new InputError("command_line_overrides.seed is not a whole number ≥ 0", { file });
  return {
    ...(permutations !== undefined ? { permutations: permutations as number } : {}),
    ...(seed !== undefined ? { seed: seed as number } : {}),
  };
}
