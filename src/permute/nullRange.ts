import type { Tail } from "../io/designFile.js";
import { NullMaxima, type NullMeasureOptions } from "./nullMaxima.js";
import type { EnhancementParameters } from "../inference/thresholdFree.js";
import type { KernelData } from "./permutedStatistics.js";
import { twoLevelEffect } from "./kernels/groupSums.js";
import { selectKernel, type KernelChoice } from "./kernels/selectKernel.js";
import { Relabeler, type RelabelingPlan } from "./relabelings.js";

/** Everything needed to compute null rows for one contrast (plain data; shareable with workers). */
export interface NullContext {
  kernel: KernelData;
  /** x̃ then the nuisance basis vectors the relabeling must carry (see permutedStatistics). */
  vectors: Float64Array[];
  plan: RelabelingPlan;
  regionA: Uint32Array;
  regionB: Uint32Array;
  regionCount: number;
  threshold: number;
  /** Every primary threshold of a sweep, the primary (`threshold`) first; absent means [threshold]. */
  thresholds?: number[];
  /** Threshold-free enhancement parameters, when the method needs the enhanced null. */
  enhancement?: EnhancementParameters;
  tail: Tail;
  /** The observed statistic, used as is for the identity (relabeling 1 in exact mode). */
  observed: Float64Array;
}

/** Null rows for relabelings from..to−1 (1-based k), in order. */
export interface NullChunk {
  from: number;
  to: number;
  maxExtent: Float64Array;
  maxMass: Float64Array;
  maxStatistic: Float64Array;
  /** Extra null columns (threshold sweep, enhanced maximum), named in `extraNames`. */
  extraNames: string[];
  extra: Float64Array[];
}

/** The null-measure options of a context. */
export function measureOptions(context: NullContext): NullMeasureOptions {
  return { thresholds: context.thresholds ?? [context.threshold], tail: context.tail, enhancement: context.enhancement };
}

/** Relabelings per call of the TypeScript kernel (the SIMD kernel takes more: see kernels/selectKernel.ts). */
export const RELABELING_BATCH = 8;

export interface NullRangeOptions {
  /** The kernel (default "auto": WebAssembly SIMD where available; PLEXUS_KERNEL overrides). Results are identical. */
  kernel?: KernelChoice;
  /** Take the two-level path where it applies (default true); false forces dot products (for comparisons). */
  groupSums?: boolean;
}

/**
 * Permutations of a lone two-valued effect regressor (`model: group`) take the
 * two-level path: group sums instead of dot products (kernels/groupSums.ts).
 * Both kernels implement both paths with the same operations.
 */
function twoLevelOf(context: NullContext) {
  return context.plan.kind === "permute" && context.vectors.length === 1 && (context.kernel.effectVectors ?? 1) === 1
    ? twoLevelEffect(context.vectors[0])
    : undefined;
}

export function computeNullRange(context: NullContext, from: number, to: number, options: NullRangeOptions = {}): NullChunk {
  const { kernel, vectors, plan } = context;
  const S = kernel.subjects;
  const E = kernel.edges;
  const c = vectors.length;
  const count = to - from;
  const maxima = new NullMaxima(context.regionA, context.regionB, context.regionCount, measureOptions(context));
  const chunk: NullChunk = {
    from,
    to,
    maxExtent: new Float64Array(count),
    maxMass: new Float64Array(count),
    maxStatistic: new Float64Array(count),
    extraNames: maxima.extraNames,
    extra: maxima.extraNames.map(() => new Float64Array(count)),
  };
  const extraRow = new Float64Array(maxima.extraNames.length);
  const relabeler = new Relabeler(plan);
  // An F contrast (several effect vectors) runs on the TypeScript kernel, which holds the F formula.
  const statisticsKernel = selectKernel((kernel.effectVectors ?? 1) > 1 ? "typescript" : options.kernel);
  const batchSize = statisticsKernel.batchSize(c, E);
  const level = options.groupSums === false ? undefined : twoLevelOf(context);
  const groups = level ? statisticsKernel.prepareGroups(kernel, batchSize, level) : undefined;
  const { weights, statistics, run } = groups
    ? { weights: new Float64Array(0), statistics: groups.statistics, run: groups.run }
    : statisticsKernel.prepare(kernel, batchSize, c);
  const permutation = new Int32Array(S);
  const signs = new Float64Array(S);

  const record = (k: number, row: Float64Array) => {
    const m = maxima.measure(row, extraRow);
    chunk.maxExtent[k - from] = m.maxExtent;
    chunk.maxMass[k - from] = m.maxMass;
    chunk.maxStatistic[k - from] = m.maxStatistic;
    for (let j = 0; j < extraRow.length; j++) chunk.extra[j][k - from] = extraRow[j];
  };

  let k = from;
  while (k < to) {
    // The identity of an exact enumeration takes the observed values themselves.
    if (k === 1 && plan.exact) {
      record(k, context.observed);
      k++;
      continue;
    }
    const batch = Math.min(batchSize, to - k);
    for (let b = 0; b < batch; b++) {
      if (groups && level) {
        // The summed group of relabeling k + b: subjects whose relabeled effect value is the group's, ascending.
        relabeler.permutation(k + b, permutation);
        const effect = vectors[0];
        let n = b * level.groupSize;
        for (let s = 0; s < S; s++) if (effect[permutation[s]] === level.inGroup) groups.members[n++] = s;
      } else if (plan.kind === "permute") {
        relabeler.permutation(k + b, permutation);
        for (let j = 0; j < c; j++) {
          const v = vectors[j];
          const at = (b * c + j) * S;
          for (let s = 0; s < S; s++) weights[at + s] = v[permutation[s]];
        }
      } else {
        relabeler.signs(k + b, signs);
        for (let j = 0; j < c; j++) {
          const v = vectors[j];
          const at = (b * c + j) * S;
          for (let s = 0; s < S; s++) weights[at + s] = signs[s] * v[s];
        }
      }
    }
    run(batch);
    for (let b = 0; b < batch; b++) record(k + b, statistics.subarray(b * E, (b + 1) * E));
    k += batch;
  }
  return chunk;
}
