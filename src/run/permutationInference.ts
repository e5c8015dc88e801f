import type { Progress } from "../cli/progress.js";
import { InputError } from "../errors.js";
import { criticalValue, familywiseP, type FamilywiseP } from "../inference/familywiseP.js";
import { Checkpoint } from "../permute/checkpoint.js";
import { buildNullContext, type NullSetup } from "../permute/nullContext.js";
import { runNullEngine } from "../permute/nullEngine.js";
import type { NullChunk } from "../permute/nullRange.js";
import type { ObservedContrast } from "./analyzeContrasts.js";
import type { InferenceSpec } from "../io/designFile.js";
import type { PreparedAnalysis } from "./prepareAnalysis.js";

/** A contrast's null distribution (full, or one shard's share) with how it was drawn. */
export interface ContrastNull {
  setup: NullSetup;
  rows: NullChunk;
}

export interface NullRunOptions {
  threads: number;
  chunkSize: number;
  /** 1-based shard index and count; the whole range when absent. */
  shard?: { index: number; count: number };
  checkpoint?: Checkpoint;
  progress: Progress;
}

export function needsPermutations(prepared: PreparedAnalysis): boolean {
  return prepared.design.inference.method !== "fdr";
}

/**
 * `lastUse`: no later step needs the connectome data, so the residuals may
 * overwrite it (peak memory of one copy of the data for a single contrast).
 */
export function setupNull(prepared: PreparedAnalysis, observed: ObservedContrast, lastUse = false): NullSetup {
  const spec = prepared.design.contrasts.find((c) => c.name === observed.contrast.name)!;
  if (observed.contrast.kind === "F") {
    throw new InputError(
      `'${observed.contrast.name}' is an F contrast; permutation inference for F contrasts is not available yet`,
      { file: prepared.design.file, key: spec.key, line: spec.line },
      "use `method: fdr` for this design, or test the rows as separate t contrasts",
    );
  }
  return buildNullContext({
    matrix: prepared.matrix,
    contrast: observed.contrast.vector,
    data: prepared.connectomes.data,
    edges: prepared.connectomes.edgeCount,
    pairs: prepared.pairs,
    observed: observed.statistics.statistic,
    inference: prepared.design.inference,
    blocks: prepared.blocks?.codes,
    where: { file: prepared.design.file, key: spec.key, line: spec.line },
    inPlace: lastUse,
  });
}

/** The share of relabelings 1..M that shard `index` of `count` computes (contiguous, in order). */
export function shardRange(total: number, shard?: { index: number; count: number }): { from: number; to: number } {
  if (!shard) return { from: 1, to: total + 1 };
  const from = Math.floor(((shard.index - 1) * total) / shard.count) + 1;
  const to = Math.floor((shard.index * total) / shard.count) + 1;
  return { from, to };
}

export async function computeNull(setup: NullSetup, contrastName: string, options: NullRunOptions): Promise<ContrastNull> {
  const { plan } = setup.context;
  const range = shardRange(plan.count, options.shard);
  const done = options.checkpoint?.load(contrastName);
  options.progress.start(contrastName, range.to - range.from);
  const rows = await runNullEngine(setup.context, {
    threads: options.threads,
    from: range.from,
    to: range.to,
    chunkSize: options.chunkSize,
    done,
    onChunk: (chunk, fresh) => {
      if (fresh) options.checkpoint?.save(contrastName, chunk);
      options.progress.advance(chunk.to - chunk.from, !fresh);
    },
  });
  options.progress.finish();
  return { setup, rows };
}

/** Component and edge p-values from a complete null. */
export interface FamilywiseResult {
  exact: boolean;
  count: number;
  componentP: FamilywiseP[];
  edgeP?: Float64Array;
  criticalSize: number;
  criticalStatistic: number;
}

export function familywiseInference(
  inference: InferenceSpec,
  observed: ObservedContrast,
  nullRows: NullChunk,
  exact: boolean,
): FamilywiseResult {
  const sizeNull = inference.size === "mass" ? nullRows.maxMass : nullRows.maxExtent;
  const sizes = observed.components.map((c) => (inference.size === "mass" ? c.mass : c.extent));
  const componentP = familywiseP(sizeNull, sizes, exact);
  let edgeP: Float64Array | undefined;
  if (inference.method === "max-t") {
    const t = observed.statistics.statistic;
    const query = Float64Array.from(t, (v) =>
      inference.tail === "both" ? Math.abs(v) : inference.tail === "lower" ? -v : v,
    );
    edgeP = Float64Array.from(familywiseP(nullRows.maxStatistic, query, exact), (r) => r.p);
  }
  return {
    exact,
    count: nullRows.maxExtent.length,
    componentP,
    edgeP,
    criticalSize: criticalValue(sizeNull, inference.alpha, exact),
    criticalStatistic: criticalValue(nullRows.maxStatistic, inference.alpha, exact),
  };
}
