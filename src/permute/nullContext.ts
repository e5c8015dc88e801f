import type { InputLocation } from "../errors.js";
import { type InferenceSpec } from "../common/inferenceOptions.js";
import type { EdgePairs } from "../edges/edgeIndex.js";
import type { DesignMatrix } from "../model/designMatrix.js";
import { partitionEffect, partitionEffectRows, reducedResiduals, type EffectPartition } from "./effectPartition.js";
import { nullMeasureOptions } from "./nullMaxima.js";
import type { NullContext } from "./nullRangeTypes.js";
import { checkWholeBlockSizes, chooseScheme } from "./exchangeability.js";
import { designRowTypes, planRelabelings, type SchemeKind } from "./relabelings.js";

export { chooseScheme } from "./exchangeability.js";

export interface NullSetup {
  context: NullContext;
  partition: EffectPartition;
  scheme: SchemeKind;
  /** Why this scheme (for summary.json and the methods text). */
  schemeReason: string;
}

/** Allocates a Float64Array that worker threads can read without copying. */
export function sharedFloat64(length: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(length * Float64Array.BYTES_PER_ELEMENT));
}

export function buildNullContext(options: {
  matrix: DesignMatrix;
  contrast: Float64Array;
  /** All rows of an F contrast (two or more); absent for a t contrast. */
  contrastRows?: Float64Array[];
  data: Float64Array;
  edges: number;
  pairs: EdgePairs;
  observed: Float64Array;
  inference: InferenceSpec;
  blocks?: Int32Array;
  where: InputLocation;
  /** Overwrite `data` with the residuals (when no later step needs the data; must be shared memory). */
  inPlace?: boolean;
  /** Record only the largest statistic per relabeling (no component forms): the maximum-statistic null of measures. */
  largestStatisticOnly?: boolean;
}): NullSetup {
  const { matrix, contrast, data, edges, pairs, observed, inference } = options;
  const S = matrix.rows;
  const multi = options.contrastRows && options.contrastRows.length > 1 ? partitionEffectRows(matrix.values, S, matrix.cols, options.contrastRows) : undefined;
  const partition: EffectPartition = multi
    ? {
        subjects: S,
        effect: multi.effectBasis[0],
        effectNorm2: 1,
        nuisanceBasis: multi.nuisanceBasis,
        constantInNuisance: multi.constantInNuisance,
        constantInModel: multi.constantInModel,
        df: multi.df,
      }
    : partitionEffect(matrix.values, S, matrix.cols, contrast);
  const { scheme, reason } = chooseScheme(partition, inference.scheme, options.where);
  const usesConstant = scheme === "sign-flip" || !partition.constantInNuisance;
  const nuisance = usesConstant ? partition.nuisanceBasis : partition.nuisanceBasis.slice(1);
  const effectVectors = multi ? multi.effectBasis : [partition.effect];
  const reuse = options.inPlace === true && data.buffer instanceof SharedArrayBuffer;
  const residuals = reuse ? data : sharedFloat64(S * edges);
  const reduced = reducedResiduals(data, S, edges, partition.nuisanceBasis, residuals);
  const valid = Uint8Array.from(observed, (t) => (Number.isFinite(t) ? 1 : 0));
  const blocks = options.blocks ? [...options.blocks] : undefined;
  if (blocks && inference.blockPermutation === "whole") checkWholeBlockSizes(blocks, options.where);
  const plan = planRelabelings({
    kind: scheme,
    rowTypes: designRowTypes(matrix.values, S, matrix.cols),
    blocks,
    wholeBlocks: inference.blockPermutation === "whole" && blocks !== undefined,
    seed: inference.seed,
    requested: inference.permutations,
  });
  return {
    partition,
    scheme,
    schemeReason: reason,
    context: {
      kernel: {
        subjects: S,
        edges,
        residuals,
        sumSquares: reduced.sumSquares,
        valid,
        effectNorm2: partition.effectNorm2,
        df: partition.df,
        effectVectors: effectVectors.length,
      },
      vectors: [...effectVectors, ...nuisance],
      plan,
      regionA: pairs.regionA,
      regionB: pairs.regionB,
      regionCount: pairs.regionCount,
      ...nullMeasureOptions(inference, multi ? "upper" : inference.tail, options.largestStatisticOnly),
      observed,
    },
  };
}
