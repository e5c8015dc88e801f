import { edgePairs } from "../src/edges/edgeIndex.js";
import { partitionEffect, reducedResiduals } from "../src/permute/effectPartition.js";
import { sharedFloat64 } from "../src/permute/nullContext.js";
import type { NullContext } from "../src/permute/nullRangeTypes.js";
import { permutedStatistics } from "../src/permute/permutedStatistics.js";
import { designRowTypes, planRelabelings } from "../src/permute/relabelings.js";
import { uniformSource } from "./uniformSource.js";

/**
 * A permutation null context of a given shape with invented data, for timing
 * the permutation engine alone (the scaling table): half the subjects in each
 * group, and with `covariates` an age and a sex column (c = 3 vectors per
 * relabeling, as for `group + age + sex`), else c = 1 (`group`).
 */
export function syntheticNull(options: { subjects: number; regions: number; covariates: boolean; permutations: number }): NullContext {
  const { subjects: S, regions } = options;
  const random = uniformSource(S * 7919 + regions);
  const pairs = edgePairs(regions);
  const E = pairs.edgeCount;
  const p = options.covariates ? 4 : 2;
  const design = new Float64Array(S * p);
  for (let s = 0; s < S; s++) {
    design[s * p] = 1;
    design[s * p + 1] = s % 2;
    if (options.covariates) {
      design[s * p + 2] = 55 + 30 * random();
      design[s * p + 3] = random() < 0.5 ? 1 : 0;
    }
  }
  const contrast = new Float64Array(p);
  contrast[1] = 1;
  // Edge-major data, overwritten in place by the residuals as the run does for its last contrast.
  const data = sharedFloat64(S * E);
  for (let e = 0; e < E; e++) {
    const shift = e % 97 === 0 ? 0.6 : 0;
    for (let s = 0; s < S; s++) data[e * S + s] = random() + random() + random() - 1.5 + shift * (s % 2);
  }
  const partition = partitionEffect(design, S, p, contrast);
  const nuisance = partition.constantInNuisance ? partition.nuisanceBasis.slice(1) : partition.nuisanceBasis;
  const { residuals, sumSquares } = reducedResiduals(data, S, E, partition.nuisanceBasis, data);
  const vectors = [partition.effect, ...nuisance];
  const kernel = {
    subjects: S,
    edges: E,
    residuals,
    sumSquares,
    valid: new Uint8Array(E).fill(1),
    effectNorm2: partition.effectNorm2,
    df: partition.df,
  };
  const identity = new Float64Array(vectors.length * S);
  vectors.forEach((v, j) => identity.set(v, j * S));
  const observed = new Float64Array(E);
  permutedStatistics(kernel, identity, 1, vectors.length, observed);
  return {
    kernel,
    vectors,
    plan: planRelabelings({
      kind: "permute",
      rowTypes: designRowTypes(design, S, p),
      wholeBlocks: false,
      seed: 1,
      requested: options.permutations,
    }),
    regionA: pairs.regionA,
    regionB: pairs.regionB,
    regionCount: regions,
    thresholds: [3],
    tail: "upper",
    observed,
  };
}
