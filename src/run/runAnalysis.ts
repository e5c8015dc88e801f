import { inputsSummary, subjectsSummary } from "../output/summaryParts.js";
import { createHash } from "node:crypto";
import path from "node:path";
import { InputError } from "../errors.js";
import { VERSION } from "../version.js";
import { finiteOrNull } from "../common/finiteOrNull.js";
import { silentProgress, type Progress } from "../common/progress.js";
import { Checkpoint } from "../permute/checkpoint.js";
import { defaultThreads } from "../permute/nullEngine.js";
import { hashInputs, type InputRecord } from "../output/provenance.js";
import { sha256Text } from "../common/sha256.js";
import { ResultsFolder } from "../output/resultsFolder.js";
import { onInterrupt } from "../output/interruptCleanup.js";
import { relabelingSummary, smallestPossibleP } from "../output/relabelingSummary.js";
import { formatTsv, type Cell } from "../output/tsvWriter.js";
import { nullTable } from "../output/nullTable.js";
import { componentsTable, edgeColumnsReadBack, edgesTable, regionsTable, subjectsTable, type ExtraEdgeColumn } from "../output/resultTables.js";
import { SHARD_MANIFEST, type ShardManifest } from "../output/shardManifest.js";
import { fitAll, observeContrast, type ObservedContrast } from "./analyzeContrasts.js";
import {
  computeNull,
  familywiseInference,
  sweepInference,
  thresholdFreeInference,
  type SweepLevel,
  type ThresholdFreeResult,
  needsPermutations,
  setupNull,
  type ContrastNull,
  type FamilywiseResult,
} from "./permutationInference.js";
import { prepareAnalysis, type PreparedAnalysis } from "./prepareAnalysis.js";
import { writeReport } from "../report/writeReport.js";
import type { KnownResults } from "../report/loadResults.js";

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
  /** Relabelings per checkpoint chunk. */
  chunkSize?: number;
  /** The command line as typed, for provenance. */
  commandLine?: string[];
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

/**
 * The fingerprint that ties a checkpoint or a shard to its run: the tool
 * version, the inputs' hashes and every option that changes the null.
 */
export function runFingerprint(prepared: PreparedAnalysis, inputs: InputRecord[]): string {
  const { inference } = prepared.design;
  const payload = {
    version: VERSION,
    inputs: inputs.map((i) => [i.role, i.sha256]),
    model: prepared.matrix.columns.map((c) => c.name),
    contrasts: prepared.contrasts.map((c) => [c.name, c.rows.map((r) => [...r])]),
    transform: prepared.design.transform,
    symmetrize: prepared.design.symmetrize,
    inference: {
      threshold: inference.thresholds[0],
      thresholds: inference.thresholds,
      enhancement: inference.method === "threshold-free" ? inference.enhancement : null,
      tail: inference.tail,
      permutations: inference.permutations,
      seed: inference.seed,
      scheme: inference.scheme,
      blocks: inference.blocks ?? null,
      blockPermutation: inference.blockPermutation,
    },
  };
  return createHash("sha256").update(JSON.stringify(payload)).digest("hex");
}

/** Runs a design end to end and writes the results (or one shard) folder atomically. */
export async function runAnalysis(options: RunOptions, log: RunLog, progress: Progress = silentProgress): Promise<RunResult> {
  const opened: { folder?: ResultsFolder } = {};
  let checkpoint: Checkpoint | undefined;
  let removeInterruptNote: (() => void) | undefined;
  try {
    // The output is checked (inputs, lock, --force rule, checkpoint) before any matrix is read.
    const prepared = prepareAnalysis(options.designFile, {
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
    const contrasts = prepared.contrasts.map((contrast) => observeContrast(prepared, fit, contrast));
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
    if (options.shard) {
      writeShard(output, prepared, contrasts, nulls, inputs, fingerprint, options);
    } else {
      const written = writeResults(output, prepared, contrasts, nulls, inputs, options.commandLine ?? null);
      output.readingBack(() => writeReport(output.staging, (relative, content) => output.write(relative, content), {}, written));
    }
    output.commit();
    checkpoint?.remove();
    removeInterruptNote?.();
    if (!options.quiet) {
      if (!options.shard) for (const line of resultLines(prepared, contrasts, nulls)) log.info(line);
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

function resultLines(prepared: PreparedAnalysis, contrasts: ObservedContrast[], nulls: (ContrastNull | undefined)[]): string[] {
  const { inference } = prepared.design;
  return contrasts.map((observed, i) => {
    const threshold = inference.thresholds[0];
    const rule = inference.tail === "both" ? `|t| > ${threshold}` : inference.tail === "lower" ? `t < -${threshold}` : `t > ${threshold}`;
    const head = `${observed.contrast.name}: ${observed.components.length} supra-threshold component(s) at ${rule}`;
    const rows = nulls[i]?.rows;
    if (!rows) {
      const significant = observed.qFdr.filter((q) => q <= inference.alpha).length;
      return `${head}; ${significant} edge(s) with q_fdr ≤ ${inference.alpha}`;
    }
    const fwe = familywiseInference(inference, observed, rows, nulls[i]!.setup.context.plan.exact);
    const significant = fwe.componentP.filter((r) => r.p <= inference.alpha).length;
    const edges = fwe.edgeP ? `; ${fwe.edgeP.filter((p) => p <= inference.alpha).length} edge(s) with p_fwe ≤ ${inference.alpha}` : "";
    return `${head}; ${significant} with p_fwe ≤ ${inference.alpha}${edges}`;
  });
}

/**
 * Writes every result file into the (staging) results folder; returns what the
 * report needs of them (their texts, and each contrast's edge columns as they
 * read back), so that writeReport need not read them from disk.
 */
export function writeResults(
  folder: ResultsFolder,
  prepared: PreparedAnalysis,
  contrasts: ObservedContrast[],
  nulls: (ContrastNull | undefined)[],
  inputs: InputRecord[],
  commandLine: string[] | null,
): KnownResults {
  const known: KnownResults = { texts: new Map(), edges: new Map() };
  const write = (relative: string, text: string): void => {
    folder.write(relative, text);
    known.texts.set(folder.pathOf(relative), text);
  };
  const fwes: (FamilywiseResult | undefined)[] = [];
  const extras: ContrastExtras[] = [];
  const { inference } = prepared.design;
  contrasts.forEach((observed, i) => {
    const contrastNull = nulls[i];
    const exact = contrastNull?.setup.context.plan.exact ?? false;
    const tail = observed.contrast.kind === "F" ? "upper" : inference.tail;
    const fwe = contrastNull ? familywiseInference(inference, observed, contrastNull.rows, exact) : undefined;
    fwes.push(fwe);
    const free =
      contrastNull && inference.method === "threshold-free"
        ? thresholdFreeInference(inference, observed, contrastNull.rows, exact, prepared.pairs, tail)
        : undefined;
    const sweep =
      contrastNull && inference.thresholds.length > 1 ? sweepInference(inference, observed, contrastNull.rows, exact, prepared.pairs, tail) : undefined;
    extras.push({ free, sweep });
    const { statistics } = observed;
    const extra: ExtraEdgeColumn[] = [];
    if (free) extra.push({ name: "enhanced", values: free.enhanced }, { name: "p_fwe", values: free.edgeP });
    else if (fwe?.edgeP) extra.push({ name: "p_fwe", values: fwe.edgeP });
    if (observed.contrast.kind === "F") extra.push({ name: "partial_eta_squared", values: statistics.partialR });
    else extra.push({ name: "partial_r", values: statistics.partialR }, { name: "standard_error", values: statistics.standardError });
    const name = observed.contrast.name;
    const labels = free ? free.labels : observed.labels;
    folder.write(
      `${name}/edges.tsv`,
      edgesTable(prepared.pairs, prepared.regions, statistics.statistic, statistics.estimate, observed.pUncorrected, observed.qFdr, labels, extra),
    );
    // The report takes this table's columns, not its text (which it would have to parse).
    known.edges.set(
      name,
      edgeColumnsReadBack(prepared.pairs, statistics.statistic, statistics.estimate, observed.pUncorrected, observed.qFdr, labels, extra),
    );
    write(
      `${name}/components.tsv`,
      free
        ? componentsTable(free.components, { pFwe: free.componentP })
        : componentsTable(
            observed.components,
            fwe
              ? {
                  pFwe: fwe.componentP.map((r) => r.p),
                  ...(fwe.exact ? {} : { pFweLow: fwe.componentP.map((r) => r.low), pFweHigh: fwe.componentP.map((r) => r.high) }),
                }
              : {},
          ),
    );
    if (sweep) {
      for (const level of sweep) {
        write(
          `${name}/threshold-${level.threshold}/components.tsv`,
          componentsTable(level.components, {
            pFwe: level.componentP.map((r) => r.p),
            ...(exact ? {} : { pFweLow: level.componentP.map((r) => r.low), pFweHigh: level.componentP.map((r) => r.high) }),
          }),
        );
      }
      write(`${name}/threshold_robustness.tsv`, robustnessTable(prepared, observed, sweep, inference.alpha));
    }
    if (contrastNull) write(`${name}/null.tsv`, nullTable(contrastNull.rows));
  });
  write("subjects.tsv", subjectsTable(prepared));
  write("regions.tsv", regionsTable(prepared.regions));
  const summary = buildSummary(prepared, contrasts, nulls, fwes, inputs, commandLine, extras);
  write("summary.json", `${JSON.stringify(summary, null, 2)}\n`);
  return known;
}

/** Threshold-free and sweep results of a contrast, when the design asks for them. */
export interface ContrastExtras {
  free?: ThresholdFreeResult;
  sweep?: SweepLevel[];
}

/**
 * threshold_robustness.tsv: every edge in a significant component at one or
 * more of the swept thresholds, with the component holding it at each
 * threshold (empty when not significant there) and how many thresholds agree.
 */
function robustnessTable(prepared: PreparedAnalysis, observed: ObservedContrast, sweep: SweepLevel[], alpha: number): string {
  const significantSets = sweep.map((level) => new Set(level.components.filter((_, k) => level.componentP[k].p <= alpha).map((c) => c.id)));
  const rows: Cell[][] = [];
  for (let e = 0; e < prepared.pairs.edgeCount; e++) {
    const ids = sweep.map((level, i) => (significantSets[i].has(level.labels[e]) ? level.labels[e] : null));
    const count = ids.filter((id) => id !== null).length;
    if (count === 0) continue;
    rows.push([
      prepared.regions[prepared.pairs.regionA[e]].label,
      prepared.regions[prepared.pairs.regionB[e]].label,
      observed.statistics.statistic[e],
      ...ids,
      count,
    ]);
  }
  return formatTsv(["region_a", "region_b", "statistic", ...sweep.map((l) => `component_t${l.threshold}`), "significant_thresholds"], rows);
}

function writeShard(
  folder: ResultsFolder,
  prepared: PreparedAnalysis,
  contrasts: ObservedContrast[],
  nulls: (ContrastNull | undefined)[],
  inputs: InputRecord[],
  fingerprint: string,
  options: RunOptions,
): void {
  const first = nulls[0]!;
  const tables = contrasts.map((observed, i) => ({ path: `${observed.contrast.name}/null.tsv`, text: nullTable(nulls[i]!.rows) }));
  const manifest: ShardManifest = {
    tool: { name: "plexus", version: VERSION },
    design: path.resolve(prepared.design.file),
    fingerprint,
    seed: prepared.design.inference.seed,
    shard: options.shard!,
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

export function buildSummary(
  prepared: PreparedAnalysis,
  contrasts: ObservedContrast[],
  nulls: (ContrastNull | undefined)[],
  fwes: (FamilywiseResult | undefined)[],
  inputs: InputRecord[],
  commandLine: string[] | null,
  extras: ContrastExtras[] = [],
): Record<string, unknown> {
  const { design, matrix, connectomes } = prepared;
  const centers: Record<string, number> = {};
  const levels: Record<string, string[]> = {};
  for (const variable of matrix.variables.values()) {
    if (variable.kind === "numeric" && design.center.includes(variable.name)) centers[variable.name] = variable.center;
    if (variable.kind === "factor") levels[variable.name] = variable.levels;
  }
  const { inference } = design;
  return {
    tool: { name: "plexus", version: VERSION },
    command: commandLine,
    inputs: inputsSummary(inputs, design.file),
    subjects: subjectsSummary(prepared),
    regions: connectomes.regionCount,
    edges: connectomes.edgeCount,
    design: {
      model: design.model,
      intercept: prepared.formula.intercept,
      columns: matrix.columns.map((c) => c.name),
      coding: "treatment (first level is the reference)",
      levels,
      centered: centers,
      rank: matrix.cols,
    },
    df: matrix.rows - matrix.cols,
    contrasts: contrasts.map((observed, i) => {
      const contrastNull = nulls[i];
      const fwe = fwes[i];
      const plan = contrastNull?.setup.context.plan;
      return {
        name: observed.contrast.name,
        expression: observed.contrast.expression,
        statistic: observed.contrast.kind,
        // t: the contrast vector; F: every row of the contrast matrix (the same list as `rows`).
        vector: observed.contrast.kind === "F" ? observed.contrast.rows.map((r) => [...r]) : [...observed.contrast.vector],
        ...(observed.contrast.kind === "F" ? { rows: observed.contrast.rows.map((r) => [...r]), df1: observed.contrast.rows.length } : {}),
        df: observed.statistics.df,
        edges_without_statistic: observed.statistics.degenerate,
        supra_threshold_components: observed.components.length,
        significant_components: fwe ? fwe.componentP.filter((r) => r.p <= inference.alpha).length : null,
        significant_edges_fdr: observed.qFdr.filter((q) => q <= inference.alpha).length,
        ...(contrastNull && plan && fwe
          ? {
              ...relabelingSummary(contrastNull.setup, prepared.blocks, inference.blockPermutation),
              critical_size: finiteOrNull(fwe.criticalSize),
              critical_size_measure: inference.size,
              critical_statistic: finiteOrNull(fwe.criticalStatistic),
              smallest_possible_p: smallestPossibleP(contrastNull.setup),
            }
          : { mode: null }),
        ...(extras[i]?.free
          ? {
              threshold_free: {
                extent_exponent: inference.enhancement.extentExponent,
                height_exponent: inference.enhancement.heightExponent,
                step: inference.enhancement.step,
                significant_edges: extras[i]!.free!.edgeP.filter((p) => p <= inference.alpha).length,
                critical_enhanced: finiteOrNull(extras[i]!.free!.criticalEnhanced),
              },
            }
          : {}),
        ...(extras[i]?.sweep
          ? {
              threshold_sweep: extras[i]!.sweep!.map((level) => ({
                threshold: level.threshold,
                supra_threshold_components: level.components.length,
                significant_components: level.componentP.filter((r) => r.p <= inference.alpha).length,
                critical_size: finiteOrNull(level.criticalSize),
              })),
            }
          : {}),
      };
    }),
    options: {
      transform: design.transform,
      symmetrize: design.symmetrize,
      asymmetry_tolerance: design.asymmetryTolerance,
      inference: {
        method: inference.method,
        threshold: inference.thresholds[0],
        thresholds: inference.thresholds,
        ...(inference.method === "threshold-free"
          ? {
              enhancement: {
                extent_exponent: inference.enhancement.extentExponent,
                height_exponent: inference.enhancement.heightExponent,
                step: inference.enhancement.step,
              },
            }
          : {}),
        size: inference.size,
        tail: inference.tail,
        fdr: inference.fdr,
        alpha: inference.alpha,
        permutations: inference.permutations,
        seed: inference.seed,
        scheme: inference.scheme,
        blocks: inference.blocks ?? null,
        block_permutation: inference.blockPermutation,
      },
    },
    warnings: prepared.warnings,
  };
}
