import seedrandom from "seedrandom";
import { DEFAULT_INFERENCE } from "../io/designFile.js";
import { type InferenceSpec } from "../common/inferenceOptions.js";
import { fitEdges } from "../edges/fitEdges.js";
import { clopperPearson } from "../inference/familywiseP.js";
import { observeContrastOn } from "../run/analyzeContrasts.js";
import { familywiseInference, thresholdFreeInference, wholeNullInMemory } from "../run/permutationInference.js";
import type { SimulationOptions } from "../simulate/simulateCohort.js";
import { studyCohort, type StudyDesign } from "./studyCohort.js";
import { repeatedStudyCohort, type RepeatedStudyOptions } from "./repeatedStudyCohort.js";

/**
 * Simulation studies of the error rates and power of the inference methods,
 * in the manner of published evaluations of permutation inference (e.g.
 * Winkler et al. 2014, NeuroImage 92:381, §3): many simulated cohorts, each
 * analysed exactly as `plexus run` does, and the share of cohorts with a
 * rejection compared with alpha through its binomial confidence interval.
 */
export interface StudyCondition {
  name: string;
  simulation: SimulationOptions;
  design: StudyDesign;
  inference: Partial<InferenceSpec>;
  /** Use the site column as exchangeability blocks. */
  blocks?: boolean;
  /** Several scans per person (`repeated:`): the cohort comes from repeatedStudyCohort.ts instead of the simulator. */
  repeated?: RepeatedStudyOptions;
}

export interface CohortOutcome {
  /** Any component with p_fwe ≤ alpha. */
  componentRejected: boolean;
  /** Any edge with max-t p_fwe ≤ alpha. */
  edgeRejected: boolean;
  /** Any edge with threshold-free p_fwe ≤ alpha (only when the condition's method is threshold-free). */
  enhancedRejected: boolean;
  /** Edges declared by each method, and how many of them are planted. */
  components: { declared: number; truePositive: number };
  maxT: { declared: number; truePositive: number };
  fdr: { declared: number; truePositive: number };
  planted: number;
}

export function analyseStudyCohort(condition: StudyCondition, seed: number, permutations: number): CohortOutcome {
  const random = seedrandom(`plexus-study/${condition.name}/${seed}`);
  const cohort = condition.repeated ? repeatedStudyCohort(condition.repeated, random) : studyCohort(condition.simulation, condition.design, random);
  const wholeBlocks = "wholeBlocks" in cohort && cohort.wholeBlocks === true;
  const inference: InferenceSpec = { ...DEFAULT_INFERENCE, ...condition.inference, permutations, seed, ...(wholeBlocks ? { blockPermutation: "whole" as const } : {}) };
  const { matrix, contrast, data, pairs } = cohort;
  const S = matrix.rows;
  const E = pairs.edgeCount;
  const fit = fitEdges(matrix.values, S, matrix.cols, data, E);
  const observed = observeContrastOn(fit, contrast, pairs, inference);
  const { rows, exact } = wholeNullInMemory({
    matrix,
    contrast,
    data,
    pairs,
    observed,
    inference,
    blocks: condition.blocks || condition.repeated ? cohort.blocks : undefined,
    where: { key: condition.name },
  });
  const fwe = familywiseInference({ ...inference, method: "max-t" }, observed, rows, exact);
  const free = inference.method === "threshold-free" ? thresholdFreeInference(inference, observed, rows, exact, pairs, inference.tail) : undefined;
  const significantComponents = new Set(
    observed.components.filter((_, k) => fwe.componentP[k].p <= inference.alpha).map((c) => c.id),
  );
  const count = (declared: (e: number) => boolean) => {
    let n = 0;
    let hits = 0;
    for (let e = 0; e < E; e++) {
      if (!declared(e)) continue;
      n++;
      if (cohort.planted.has(e)) hits++;
    }
    return { declared: n, truePositive: hits };
  };
  return {
    componentRejected: significantComponents.size > 0,
    edgeRejected: fwe.edgeP!.some((p) => p <= inference.alpha),
    enhancedRejected: free ? free.edgeP.some((p) => p <= inference.alpha) : false,
    components: count((e) => significantComponents.has(observed.labels[e])),
    maxT: count((e) => fwe.edgeP![e] <= inference.alpha),
    fdr: count((e) => observed.qFdr[e] <= inference.alpha),
    planted: cohort.planted.size,
  };
}

export interface RateSummary {
  rejections: number;
  cohorts: number;
  rate: number;
  low: number;
  high: number;
}

/** A rejection rate with its 95% Clopper–Pearson interval. */
export function rateOf(rejections: number, cohorts: number): RateSummary {
  const { low, high } = clopperPearson(rejections, cohorts, 0.95);
  return { rejections, cohorts, rate: rejections / cohorts, low, high };
}

export function runCondition(
  condition: StudyCondition,
  cohorts: number,
  permutations: number,
  onCohort?: (done: number) => void,
): CohortOutcome[] {
  const outcomes: CohortOutcome[] = [];
  for (let k = 1; k <= cohorts; k++) {
    outcomes.push(analyseStudyCohort(condition, k, permutations));
    onCohort?.(k);
  }
  return outcomes;
}
