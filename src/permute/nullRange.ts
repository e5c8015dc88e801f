import type { Tail } from "../io/designFile.js";
import { NullMaxima } from "./nullMaxima.js";
import type { KernelData } from "./permutedStatistics.js";
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
}

/** Relabelings per call of the TypeScript kernel (the SIMD kernel takes more: see kernels/selectKernel.ts). */
export const RELABELING_BATCH = 8;

export interface NullRangeOptions {
  /** The kernel (default "auto": WebAssembly SIMD where available; PLEXUS_KERNEL overrides). Results are identical. */
  kernel?: KernelChoice;
}

export function computeNullRange(context: NullContext, from: number, to: number, options: NullRangeOptions = {}): NullChunk {
  const { kernel, vectors, plan } = context;
  const S = kernel.subjects;
  const E = kernel.edges;
  const c = vectors.length;
  const count = to - from;
  const chunk: NullChunk = {
    from,
    to,
    maxExtent: new Float64Array(count),
    maxMass: new Float64Array(count),
    maxStatistic: new Float64Array(count),
  };
  const relabeler = new Relabeler(plan);
  const maxima = new NullMaxima(context.regionA, context.regionB, context.regionCount, context.threshold, context.tail);
  const statisticsKernel = selectKernel(options.kernel);
  const batchSize = statisticsKernel.batchSize(c, E);
  const { weights, statistics, run } = statisticsKernel.prepare(kernel, batchSize, c);
  const permutation = new Int32Array(S);
  const signs = new Float64Array(S);

  const record = (k: number, row: Float64Array) => {
    const m = maxima.measure(row);
    chunk.maxExtent[k - from] = m.maxExtent;
    chunk.maxMass[k - from] = m.maxMass;
    chunk.maxStatistic[k - from] = m.maxStatistic;
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
      if (plan.kind === "permute") {
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
