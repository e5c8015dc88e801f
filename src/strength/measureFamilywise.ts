import type { Progress } from "../common/progress.js";
import type { InputLocation } from "../errors.js";
import { criticalValue, familywiseP } from "../inference/familywiseP.js";
import type { InferenceSpec, Tail } from "../common/inferenceOptions.js";
import type { Contrast } from "../model/contrast.js";
import type { DesignMatrix } from "../model/designMatrix.js";
import { buildNullContext, type NullSetup } from "../permute/nullContext.js";
import { computeNull } from "../run/permutationInference.js";

/**
 * Family-wise error control across measures (e.g. every region's strength)
 * by the single-step maximum statistic (Westfall & Young 1993, Resampling-
 * Based Multiple Testing, Wiley): the measures go through the same
 * permutation engine as the edges (Freedman–Lane or sign flips, the design's
 * seed, exchangeability blocks and exact enumeration), each relabeling
 * records its largest statistic, and a measure's p_fwe is the share of
 * relabelings whose maximum reaches its statistic (src/inference/familywiseP.ts).
 * The null is drawn as `plexus run` draws it (src/run/permutationInference.ts computeNull).
 * Measures are not edges of a graph, so no component is ever formed
 * (`largestStatisticOnly`): only the maximum statistic is used.
 */
export interface MeasureFamilywise {
  setup: NullSetup;
  exact: boolean;
  /** Relabelings drawn (M exact, K Monte Carlo). */
  count: number;
  pFwe: Float64Array;
  /** Statistics above this value have p_fwe ≤ alpha (on the tail's scale: |t| for both, −t for lower). */
  criticalStatistic: number;
}

/** The statistic on the scale the null maximum is taken on. */
export function tailScaled(statistic: Float64Array, tail: Tail): Float64Array {
  return Float64Array.from(statistic, (t) => (tail === "both" ? Math.abs(t) : tail === "lower" ? -t : t));
}

export async function measureFamilywise(options: {
  matrix: DesignMatrix;
  contrast: Contrast;
  /** Measure-major values: values[m·S + s]. */
  values: Float64Array;
  measures: number;
  observed: Float64Array;
  inference: InferenceSpec;
  blocks?: Int32Array;
  where: InputLocation;
  threads: number;
  chunkSize: number;
  progress: Progress;
}): Promise<MeasureFamilywise> {
  const { inference, measures } = options;
  const setup = buildNullContext({
    matrix: options.matrix,
    contrast: options.contrast.vector,
    data: options.values,
    edges: measures,
    pairs: { regionCount: 0, edgeCount: measures, regionA: new Uint32Array(0), regionB: new Uint32Array(0) },
    observed: options.observed,
    inference,
    largestStatisticOnly: true,
    blocks: options.blocks,
    where: options.where,
  });
  const { plan } = setup.context;
  const { rows } = await computeNull(setup, options.contrast.name, {
    threads: options.threads,
    chunkSize: options.chunkSize,
    progress: options.progress,
  });
  const pFwe = Float64Array.from(familywiseP(rows.maxStatistic, tailScaled(options.observed, inference.tail), plan.exact), (r) => r.p);
  return {
    setup,
    exact: plan.exact,
    count: plan.count,
    pFwe,
    criticalStatistic: criticalValue(rows.maxStatistic, inference.alpha, plan.exact),
  };
}
