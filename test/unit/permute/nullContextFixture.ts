// A small Freedman–Lane (or sign-flip) null context for the kernel tests, built
// the way src/permute/nullContext.ts builds one, from invented data.
import seedrandom from "seedrandom";
import { edgePairs } from "../../../src/edges/edgeIndex.js";
import type { Tail } from "../../../src/common/inferenceOptions.js";
import { partitionEffect, reducedResiduals } from "../../../src/permute/effectPartition.js";
import type { NullContext } from "../../../src/permute/nullRangeTypes.js";
import { permutedStatistics, type KernelData } from "../../../src/permute/permutedStatistics.js";
import { designRowTypes, planRelabelings, type SchemeKind } from "../../../src/permute/relabelings.js";

/** A small Freedman–Lane (or sign-flip) null context built the way nullContext.ts builds it. */
export interface NullContextOptions {
  S: number;
  regions: number;
  scheme: SchemeKind;
  covariates: boolean;
  permutations: number;
  /** Primary threshold (default 1.5) and the rest of a sweep. */
  thresholds?: number[];
  tail?: Tail;
}

export function nullContext(options: NullContextOptions): NullContext {
  const { S, regions, scheme } = options;
  const random = seedrandom(`null-context-${JSON.stringify(options)}`);
  const pairs = edgePairs(regions);
  const E = pairs.regionA.length;
  const p = options.covariates ? 4 : 2;
  const design = new Float64Array(S * p);
  for (let s = 0; s < S; s++) {
    design[s * p] = 1;
    design[s * p + 1] = scheme === "sign-flip" ? random() - 0.3 : s % 3 === 0 ? 1 : 0;
    if (options.covariates) {
      design[s * p + 2] = 40 + 20 * random();
      design[s * p + 3] = random() < 0.5 ? 1 : 0;
    }
  }
  const contrast = new Float64Array(p);
  contrast[scheme === "sign-flip" ? 0 : 1] = 1;
  const data = new Float64Array(S * E);
  for (let i = 0; i < data.length; i++) data[i] = random() + (i % 5 === 0 ? 0.8 * design[Math.floor(i / E) * p + 1] : 0);
  // One constant edge: zero variance, a NaN statistic the kernel must carry through.
  for (let s = 0; s < S; s++) data[s * E + 3] = 0.25;
  const partition = partitionEffect(design, S, p, contrast);
  const usesConstant = scheme === "sign-flip" || !partition.constantInNuisance;
  const nuisance = usesConstant ? partition.nuisanceBasis : partition.nuisanceBasis.slice(1);
  const { residuals, sumSquares } = reducedResiduals(data, S, E, partition.nuisanceBasis);
  const vectors = [partition.effect, ...nuisance];
  // The observed statistic: the identity relabeling through the reference kernel.
  const observed = new Float64Array(E);
  const identity = new Float64Array(vectors.length * S);
  vectors.forEach((v, j) => identity.set(v, j * S));
  const kernel: KernelData = {
    subjects: S,
    edges: E,
    residuals,
    sumSquares,
    valid: new Uint8Array(E).fill(1),
    effectNorm2: partition.effectNorm2,
    df: partition.df,
  };
  permutedStatistics(kernel, identity, 1, vectors.length, observed);
  kernel.valid = Uint8Array.from(observed, (t) => (Number.isFinite(t) ? 1 : 0));
  return {
    kernel,
    vectors,
    plan: planRelabelings({
      kind: scheme,
      rowTypes: designRowTypes(design, S, p),
      wholeBlocks: false,
      seed: 7,
      requested: options.permutations,
    }),
    regionA: pairs.regionA,
    regionB: pairs.regionB,
    regionCount: regions,
    thresholds: options.thresholds ?? [1.5],
    tail: options.tail ?? "both",
    observed,
  };
}
