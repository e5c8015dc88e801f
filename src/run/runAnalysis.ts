import { InputError } from "../errors.js";
import { silentProgress, type Progress } from "../common/progress.js";
import { Checkpoint } from "../output/checkpoint.js";
import { defaultThreads } from "../permute/nullEngine.js";
import { givenMemory } from "./memoryPlan.js";
import type { ContrastInference, ContrastNull, ObservedContrast } from "../output/contrastResults.js";
import { onInterrupt } from "../output/interruptCleanup.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import { hashInputs, type InputRecord } from "../output/provenance.js";
import { ResultsFolder } from "../output/resultsFolder.js";
import { writeResults } from "../output/writeResults.js";
import { writeShard } from "../output/writeShard.js";
import { writeReport } from "../output/report/writeReport.js";
import { fitAll, observeContrast } from "./analyzeContrasts.js";
import { inferContrasts } from "./acrossContrasts.js";
import { computeNull, needsPermutations, setupNull } from "./permutationInference.js";
import { prepareAnalysis } from "./prepareAnalysis.js";
import { resultLines } from "./resultLines.js";
import { runFingerprint } from "./runFingerprint.js";
import { captureSubnetworkEdges, subnetworkValues } from "./subnetworkValues.js";
import type { InferenceOverrides } from "../common/inferenceOverrides.js";

/** What the user asked for (CLI flags or library call). */
export interface RunOptions {
  designFile: string;
  out: string;
  force?: boolean;
  quiet?: boolean;
  /** Worker threads for the permutations (default: the available cores). */
  threads?: number;
  /** Compute only this share of the permutations and write a shard folder for `merge`. */
  shard?: { index: number; count: number };
  /** Continue an interrupted run from its checkpoint. */
  resume?: boolean;
  /** `--memory`: the gigabytes to plan for instead of this machine's (memoryPlan.ts). */
  memoryGigabytes?: number;
  /** Relabelings per checkpoint chunk. */
  chunkSize?: number;
  /** The command line as typed, for provenance. */
  commandLine?: string[];
  /** `--permutations`/`--seed`: replace the design's values for a trial run (recorded in every output). */
  overrides?: InferenceOverrides;
}

export interface RunLog {
  info(text: string): void;
  warn(text: string): void;
}

export interface RunResult {
  /** The prepared analysis; after a permutation run its connectome data are released (emptied) to save memory. */
  prepared: PreparedAnalysis;
  contrasts: ObservedContrast[];
  nulls: (ContrastNull | undefined)[];
  outputFolder: string;
  inputs: InputRecord[];
}

/**
 * Relabelings per chunk: the unit of checkpoints, progress and hand-out to
 * threads. 500 lets the single-precision screen work in batches of 500
 * (its subset tables and its second look at a few relabelings are paid once
 * per chunk): about a fifth faster than 250 for `model: group` (bench/README.md).
 */
export const DEFAULT_CHUNK_SIZE = 500;

/** Runs a design end to end and writes the results (or one shard) folder atomically. */
export async function runAnalysis(options: RunOptions, log: RunLog, progress: Progress = silentProgress): Promise<RunResult> {
  const opened: { folder?: ResultsFolder } = {};
  let checkpoint: Checkpoint | undefined;
  let removeInterruptNote: (() => void) | undefined;
  try {
    // The output is checked (inputs, lock, --force rule, checkpoint) before any matrix is read.
    const prepared = prepareAnalysis(options.designFile, {
      ...(options.overrides ? { overrides: options.overrides } : {}),
      memory: { threads: options.threads ?? defaultThreads(), ...(options.memoryGigabytes !== undefined ? { limit: givenMemory(options.memoryGigabytes) } : {}) },
      beforeMatrices: (design, inputs) => {
        opened.folder = ResultsFolder.open(options.out, { force: options.force ?? false, inputs, warn: log.warn });
        if (design.inference.method !== "fdr" && !options.shard && !options.resume && !options.force) refuseUnfinishedCheckpoint(options.out);
      },
    });
    for (const warning of prepared.warnings) log.warn(warning);
    const permutations = needsPermutations(prepared);
    if (options.shard && !permutations) {
      throw new InputError("--shard splits the permutations, but this design's method (fdr) draws none", {
        file: prepared.design.file,
        key: "inference.method",
      });
    }
    const chunkSize = options.chunkSize ?? DEFAULT_CHUNK_SIZE;
    const threads = options.threads ?? defaultThreads();
    const output = opened.folder;
    if (!output) throw new Error("the output folder was not opened before the matrices were read");
    const inputs = hashInputs(prepared.inputs);
    const fingerprint = runFingerprint(prepared, inputs);
    if (permutations && !options.shard) {
      checkpoint = options.resume ? Checkpoint.resume(options.out, fingerprint) : Checkpoint.create(options.out, fingerprint);
      removeInterruptNote = onInterrupt(() => (checkpoint?.hasChunks() ? "the finished permutations are kept: add --resume to continue" : undefined));
    }
    const fit = fitAll(prepared);
    const contrasts = prepared.contrasts.map((contrast) => observeContrast(prepared, fit, contrast, { effectSizes: !options.shard }));
    // The data of the edges a significant subnetwork can hold, kept before the permutations overwrite the data.
    const captured = options.shard ? undefined : captureSubnetworkEdges(prepared, contrasts);
    const nulls: (ContrastNull | undefined)[] = [];
    for (const [index, observed] of contrasts.entries()) {
      if (!permutations) {
        nulls.push(undefined);
        continue;
      }
      const setup = setupNull(prepared, observed, index === contrasts.length - 1);
      nulls.push(
        await computeNull(setup, observed.contrast.name, {
          threads,
          chunkSize,
          shard: options.shard,
          checkpoint,
          progress: options.quiet ? silentProgress : progress,
        }),
      );
      // The residuals (in the last contrast, the connectome data themselves) are no longer needed: let them go
      // before the results and the report are written, so peak memory stays at one copy of the data.
      setup.context.kernel.residuals = new Float64Array(0);
    }
    if (permutations) prepared.connectomes.data = new Float64Array(0);
    let inferred: ContrastInference[] = [];
    if (options.shard) {
      writeShard(output, prepared, contrasts, nulls, inputs, fingerprint, options.shard);
    } else {
      const family = inferContrasts(prepared, contrasts, nulls);
      inferred = family.inferred;
      const values = captured ? subnetworkValues(prepared, contrasts, inferred, captured) : undefined;
      const written = writeResults(output, { prepared, contrasts, nulls, inferred, familyNull: family.familyNull, inputs, subnetworkValues: values, commandLine: options.commandLine ?? null });
      await output.readingBack(() => writeReport(output.staging, (relative, content) => output.write(relative, content), {}, written));
    }
    output.commit();
    checkpoint?.remove();
    removeInterruptNote?.();
    if (!options.quiet) {
      if (!options.shard) for (const line of resultLines(prepared, contrasts, inferred)) log.info(line);
      log.info(`${options.shard ? "shard" : "results"} written to ${output.target}`);
    }
    for (const observed of contrasts) {
      const degenerate = observed.statistics.degenerate;
      if (degenerate > 0) {
        log.warn(
          `${observed.contrast.name}: ${degenerate} edge${degenerate > 1 ? "s have" : " has"} zero residual variance (e.g. absent in every subject) and no statistic`,
        );
      }
    }
    return { prepared, contrasts, nulls, outputFolder: output.target, inputs };
  } catch (error) {
    // A checkpoint with no finished permutation holds nothing worth resuming: it goes with the failed run.
    if (checkpoint && !checkpoint.hasChunks()) checkpoint.remove();
    removeInterruptNote?.();
    opened.folder?.abandon();
    throw error;
  }
}

/**
 * Without --resume or --force, a checkpoint holding finished permutations is
 * not thrown away silently; one holding none (left by a run that failed
 * early) is simply replaced.
 */
function refuseUnfinishedCheckpoint(out: string): void {
  if (!Checkpoint.exists(out) || !Checkpoint.holdsChunks(out)) return;
  throw new InputError(
    "an interrupted run left a checkpoint for this output folder",
    { file: Checkpoint.folderFor(out) },
    "add --resume to continue it, or --force to start over",
  );
}


