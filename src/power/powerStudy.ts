import seedrandom from "seedrandom";
import { DEFAULT_INFERENCE } from "../io/designFile.js";
import { type InferenceSpec } from "../common/inferenceOptions.js";
import { edgePairs } from "../edges/edgeIndex.js";
import { fitEdges } from "../edges/fitEdges.js";
import { clopperPearson } from "../inference/familywiseP.js";
import { parseContrast } from "../model/contrast.js";
import { buildDesignMatrix, type DesignMatrix } from "../model/designMatrix.js";
import { parseFormula } from "../model/formula.js";
import { codeVariable, type Variable } from "../model/variables.js";
import { observeContrastOn } from "../run/analyzeContrasts.js";
import { familywiseInference, wholeNullInMemory } from "../run/permutationInference.js";
import { simulatePowerCohort } from "./powerCohort.js";

/**
 * Power by simulation (e.g. Zalesky et al. 2010, §2.5, who estimated power
 * of network inference the same way): for each sample size, simulate
 * cohorts with a planted subnetwork, analyse each exactly as `plexus run`
 * does (two-group model, one-sided t contrast patients > controls), and
 * count how often each method detects the effect: at least one planted edge
 * declared significant (in a significant component; with edge p_fwe, q or
 * uncorrected p at most alpha). Cohort k of a sample size is a function of
 * (seed, n, k) alone.
 */
export const POWER_METHODS = ["components", "max-t", "fdr", "uncorrected"] as const;
export type PowerMethod = (typeof POWER_METHODS)[number];

/** Plain data describing one power study (sent to worker threads as is). */
export interface PowerPlan {
  regionCount: number;
  planted: number[];
  effectSize: number;
  threshold: number;
  size: "extent" | "mass";
  alpha: number;
  permutations: number;
  seed: number;
  pilot: { subjects: number; residuals: Float64Array } | null;
}

export type CohortDetections = Record<PowerMethod, boolean>;

const designCache = new Map<number, DesignMatrix>();

/** The two-group design (controls first) for n per group, with treatment coding. */
export function twoGroupDesign(perGroup: number): DesignMatrix {
  let design = designCache.get(perGroup);
  if (!design) {
    const values = [...Array<string>(perGroup).fill("control"), ...Array<string>(perGroup).fill("patient")];
    const variables = new Map<string, Variable>([
      [
        "group",
        codeVariable("group", { values, lines: values.map((_, i) => i + 2), file: "power" }, { levels: ["control", "patient"], center: false, levelsKey: {}, centerKey: {} }),
      ],
    ]);
    design = buildDesignMatrix(parseFormula("group"), variables, values.length, { key: "model" });
    designCache.set(perGroup, design);
  }
  return design;
}

export function analysePowerCohort(plan: PowerPlan, perGroup: number, k: number): CohortDetections {
  const pairs = edgePairs(plan.regionCount);
  const planted = new Set(plan.planted);
  const random = seedrandom(`plexus-power/${plan.seed}/${perGroup}/${k}`);
  const data = simulatePowerCohort({ pairs, perGroup, effectSize: plan.effectSize, planted, pilot: plan.pilot }, random);
  const matrix = twoGroupDesign(perGroup);
  const contrast = parseContrast("power", "group[patient] - group[control]", matrix, {});
  const inference: InferenceSpec = {
    ...DEFAULT_INFERENCE,
    method: "max-t",
    thresholds: [plan.threshold],
    size: plan.size,
    alpha: plan.alpha,
    permutations: plan.permutations,
    seed: plan.seed + k,
  };
  const S = matrix.rows;
  const E = pairs.edgeCount;
  const fit = fitEdges(matrix.values, S, matrix.cols, data, E);
  const observed = observeContrastOn(fit, contrast, pairs, inference);
  const anyPlanted = (declared: (e: number) => boolean) => plan.planted.some((e) => declared(e));
  const detections: CohortDetections = {
    components: false,
    "max-t": false,
    fdr: anyPlanted((e) => observed.qFdr[e] <= plan.alpha),
    uncorrected: anyPlanted((e) => observed.pUncorrected[e] <= plan.alpha),
  };
  if (plan.permutations > 0) {
    const { rows, exact } = wholeNullInMemory({ matrix, contrast, data, pairs, observed, inference, where: {} });
    const fwe = familywiseInference(inference, observed, rows, exact);
    const significant = new Set(observed.components.filter((_, c) => fwe.componentP[c].p <= plan.alpha).map((c) => c.id));
    detections.components = anyPlanted((e) => significant.has(observed.labels[e]));
    detections["max-t"] = anyPlanted((e) => fwe.edgeP![e] <= plan.alpha);
  }
  return detections;
}

export interface PowerEstimate {
  perGroup: number;
  method: PowerMethod;
  detected: number;
  cohorts: number;
  power: number;
  low: number;
  high: number;
}

/** Power with its 95% Clopper–Pearson interval, per sample size and method. */
export function summarizePower(perGroup: number, outcomes: CohortDetections[]): PowerEstimate[] {
  return POWER_METHODS.map((method) => {
    const detected = outcomes.filter((o) => o[method]).length;
    const { low, high } = clopperPearson(detected, outcomes.length, 0.95);
    return { perGroup, method, detected, cohorts: outcomes.length, power: detected / outcomes.length, low, high };
  });
}

/**
 * The smallest sample size per group whose whole 95% interval of power (Clopper–Pearson lower bound)
 * reaches the target, per method (null when none does): where the simulation shows the target is met,
 * not only estimated to be.
 */
export function sampleSizeWithInterval(estimates: PowerEstimate[], target = 0.8): Record<PowerMethod, number | null> {
  const out = {} as Record<PowerMethod, number | null>;
  for (const method of POWER_METHODS) {
    const reaching = estimates.filter((e) => e.method === method && e.low >= target).map((e) => e.perGroup);
    out[method] = reaching.length > 0 ? Math.min(...reaching) : null;
  }
  return out;
}

/**
 * power.md's line for one method: a sample size is said to reach the target only when its interval
 * does; a point estimate that reaches it is said to be one, with its interval.
 */
export function sampleSizeSentence(method: PowerMethod, estimates: PowerEstimate[], target: number): string {
  const percent = (x: number) => `${(100 * x).toFixed(1)}%`;
  const point = sampleSizeFor(estimates, target)[method];
  const sure = sampleSizeWithInterval(estimates, target)[method];
  const at = (n: number) => estimates.find((e) => e.method === method && e.perGroup === n)!;
  const interval = (n: number) => `${percent(at(n).power)}, 95% interval ${percent(at(n).low)}–${percent(at(n).high)}`;
  if (point === null) return `- ${method}: no sample size in the grid reaches ${percent(target)} power, even as a point estimate.`;
  if (sure === point) {
    return `- ${method}: ${point} participants per group (${2 * point} in all) reach ${percent(target)} power, with the whole 95% interval at or above it (${interval(point)}).`;
  }
  const pointText = `the point estimate of power first reaches ${percent(target)} at ${point} participants per group (${2 * point} in all; ${interval(point)}), but the interval still includes lower power there`;
  if (sure === null) return `- ${method}: ${pointText}; no sample size in the grid reaches ${percent(target)} with its whole interval.`;
  return `- ${method}: ${pointText}; ${sure} participants per group (${2 * sure} in all) reach ${percent(target)} with the whole interval at or above it (${interval(sure)}).`;
}

/** The smallest sample size per group whose estimated power reaches the target, per method (null when none does). */
export function sampleSizeFor(estimates: PowerEstimate[], target = 0.8): Record<PowerMethod, number | null> {
  const out = {} as Record<PowerMethod, number | null>;
  for (const method of POWER_METHODS) {
    const reaching = estimates.filter((e) => e.method === method && e.power >= target).map((e) => e.perGroup);
    out[method] = reaching.length > 0 ? Math.min(...reaching) : null;
  }
  return out;
}
