import type { Progress } from "../common/progress.js";
import { criticalValue, familywiseP } from "../inference/familywiseP.js";
import { Checkpoint } from "../output/checkpoint.js";
import { buildNullContext, type NullSetup } from "../permute/nullContext.js";
import { runNullEngine } from "../permute/nullEngine.js";
import type { NullChunk } from "../permute/nullRangeTypes.js";
import type { InputLocation } from "../errors.js";
import type { Contrast } from "../model/contrast.js";
import type { DesignMatrix } from "../model/designMatrix.js";
import { computeNullRange } from "../permute/nullRange.js";
import type { EdgePairs } from "../edges/edgeIndex.js";
import { observedComponents, signsOfTail } from "../network/components.js";
import { ThresholdFreeEnhancer } from "../network/thresholdFree.js";
import { thresholdSweep } from "../inference/thresholdSweep.js";
import { type InferenceSpec } from "../common/inferenceOptions.js";
import type {
  ContrastInference,
  ContrastNull,
  FamilywiseResult,
  ObservedContrast,
  ThresholdFreeResult,
} from "../output/contrastResults.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";


export interface NullRunOptions {
  threads: number;
  chunkSize: number;
  /** 1-based shard index and count; the whole range when absent. */
  shard?: { index: number; count: number };
  checkpoint?: Checkpoint;
  progress: Progress;
}

/**
 * Relabelings per chunk: the run's chunk size, cut so that a run has at least MIN_CHUNKS chunks (500
 * relabelings of a large cohort would otherwise be one chunk on one thread). That depends on the count
 * alone, so a checkpoint's grid is the same whatever the threads of the resumed run. A shard (never
 * checkpointed) cuts its share finer still when that keeps more threads busy (250 relabelings on 4
 * threads: chunks of 63), so a cluster task's cores all work. The null rows do not depend on the chunks.
 */
export function engineChunkSize(relabelings: number, options: { threads: number; chunkSize: number; shard?: unknown; checkpoint?: unknown }): number {
  const perChunk = Math.max(1, Math.min(options.chunkSize, Math.ceil(relabelings / MIN_CHUNKS)));
  if (!options.shard || options.checkpoint) return perChunk;
  return Math.max(1, Math.min(perChunk, Math.ceil(relabelings / Math.max(1, options.threads))));
}
/** Chunks a run is cut into at least (fewer only when it has fewer relabelings). */
const MIN_CHUNKS = 8;

export function needsPermutations(prepared: PreparedAnalysis): boolean {
  return prepared.design.inference.method !== "fdr";
}

/**
 * `lastUse`: no later step needs the connectome data, so the residuals may
 * overwrite it (peak memory of one copy of the data for a single contrast).
 */
export function setupNull(prepared: PreparedAnalysis, observed: ObservedContrast, lastUse = false): NullSetup {
  const spec = prepared.design.contrasts.find((c) => c.name === observed.contrast.name)!;
  return buildNullContext({
    matrix: prepared.matrix,
    contrast: observed.contrast.vector,
    contrastRows: observed.contrast.kind === "F" ? observed.contrast.rows : undefined,
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
    chunkSize: engineChunkSize(range.to - range.from, options),
    done,
    onChunk: (chunk, fresh) => {
      if (fresh) options.checkpoint?.save(contrastName, chunk);
      options.progress.advance(chunk.to - chunk.from, !fresh);
    },
  });
  options.progress.finish();
  return { setup, rows };
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


/**
 * p_fwe per edge from the null of the largest enhanced value (Smith & Nichols
 * 2009; the maximum statistic of Westfall & Young 1993). Components are
 * formed from the significant edges (never mixing signs); their `mass` is the
 * sum of |enhanced| over their edges and their p_fwe the smallest edge p_fwe.
 */
export function thresholdFreeInference(
  inference: InferenceSpec,
  observed: ObservedContrast,
  nullRows: NullChunk,
  exact: boolean,
  pairs: EdgePairs,
  tail: InferenceSpec["tail"],
): ThresholdFreeResult {
  const enhancer = new ThresholdFreeEnhancer(pairs.regionA, pairs.regionB, pairs.regionCount, inference.enhancement);
  const statistic = observed.statistics.statistic;
  const enhanced = enhancer.enhanceTail(statistic, signsOfTail(tail), new Float64Array(statistic.length));
  const column = nullRows.extraNames.indexOf("max_enhanced");
  const nullEnhanced = nullRows.extra[column];
  const query = Float64Array.from(enhanced, (v, e) => (Number.isFinite(statistic[e]) ? Math.abs(v) : NaN));
  const edgeP = Float64Array.from(familywiseP(nullEnhanced, query, exact), (r) => r.p);
  const marks = Float64Array.from(statistic, (t, e) => (edgeP[e] <= inference.alpha ? Math.sign(t) : 0));
  const { labels, components } = observedComponents(marks, pairs.regionA, pairs.regionB, pairs.regionCount, 0.5, tail, "extent");
  const componentP = components.map(() => 1);
  for (const c of components) c.mass = 0;
  for (let e = 0; e < labels.length; e++) {
    const id = labels[e];
    if (id === 0) continue;
    components[id - 1].mass += Math.abs(enhanced[e]);
    componentP[id - 1] = Math.min(componentP[id - 1], edgeP[e]);
  }
  return { enhanced, edgeP, labels, components, componentP, criticalEnhanced: criticalValue(nullEnhanced, inference.alpha, exact) };
}


/** Every permutation-based result the design asks for of a contrast with a null; none without one. */
export function contrastInference(
  inference: InferenceSpec,
  observed: ObservedContrast,
  contrastNull: ContrastNull | undefined,
  pairs: EdgePairs,
): ContrastInference {
  if (!contrastNull) return {};
  const exact = contrastNull.setup.context.plan.exact;
  const tail = observed.contrast.kind === "F" ? "upper" : inference.tail;
  return {
    fwe: familywiseInference(inference, observed, contrastNull.rows, exact),
    free: inference.method === "threshold-free" ? thresholdFreeInference(inference, observed, contrastNull.rows, exact, pairs, tail) : undefined,
    sweep: thresholdSweep(inference, observed.statistics.statistic, contrastNull.rows, exact, pairs, tail),
  };
}

/**
 * The whole null of a contrast on the calling thread, for analyses held in
 * memory (simulation studies, power planning): the same context and
 * relabelings as a run; `data` is overwritten by the residuals.
 */
export function wholeNullInMemory(options: {
  matrix: DesignMatrix;
  contrast: Contrast;
  data: Float64Array;
  pairs: EdgePairs;
  observed: ObservedContrast;
  inference: InferenceSpec;
  blocks?: Int32Array;
  where: InputLocation;
}): { setup: NullSetup; rows: NullChunk; exact: boolean } {
  const setup = buildNullContext({
    matrix: options.matrix,
    contrast: options.contrast.vector,
    contrastRows: options.contrast.kind === "F" ? options.contrast.rows : undefined,
    data: options.data,
    edges: options.pairs.edgeCount,
    pairs: options.pairs,
    observed: options.observed.statistics.statistic,
    inference: options.inference,
    blocks: options.blocks,
    where: options.where,
    inPlace: true,
  });
  const rows = computeNullRange(setup.context, 1, setup.context.plan.count + 1);
  return { setup, rows, exact: setup.context.plan.exact };
}
