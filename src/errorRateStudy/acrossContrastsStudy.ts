import seedrandom from "seedrandom";
import { DEFAULT_INFERENCE } from "../io/designFile.js";
import { type InferenceSpec } from "../common/inferenceOptions.js";
import { fitEdges } from "../edges/fitEdges.js";
import { jointNull } from "../inference/jointNull.js";
import { parseContrast } from "../model/contrast.js";
import type { NullChunk } from "../permute/nullRangeTypes.js";
import type { ObservedContrast } from "../output/contrastResults.js";
import { observeContrastOn } from "../run/analyzeContrasts.js";
import { familywiseInference, wholeNullInMemory } from "../run/permutationInference.js";
import type { SimulationOptions } from "../simulate/simulateCohort.js";
import { studyCohort } from "./studyCohort.js";

/**
 * The family-wise error rate over several contrasts of one null cohort,
 * with and without `inference.across_contrasts` (the joint null of the
 * maxima, Winkler et al. 2016, Hum. Brain Mapp. 37:1486): each contrast is
 * analysed as `plexus run` does (Freedman–Lane on the same relabelings), and
 * a cohort counts as a family-wise error when any contrast rejects.
 */
export interface AcrossContrastsCondition {
  name: string;
  simulation: SimulationOptions;
  model: string;
  levels?: Record<string, string[]>;
  /** The contrasts of the family (expressions). */
  contrasts: string[];
  inference: Partial<InferenceSpec>;
}

export interface AcrossContrastsOutcome {
  /** Any contrast with a component (or, for max-t, an edge) at p_FWE ≤ alpha, each contrast on its own null. */
  separate: { component: boolean; edge: boolean };
  /** The same, every contrast on the family null. */
  joint: { component: boolean; edge: boolean };
}

export function analyseAcrossContrastsCohort(condition: AcrossContrastsCondition, seed: number, permutations: number): AcrossContrastsOutcome {
  const inference: InferenceSpec = { ...DEFAULT_INFERENCE, ...condition.inference, method: "max-t", permutations, seed, acrossContrasts: true };
  const cohort = studyCohort(
    condition.simulation,
    { model: condition.model, contrast: condition.contrasts[0], levels: condition.levels },
    seedrandom(`plexus-study/${condition.name}/${seed}`),
  );
  const { matrix, data, pairs } = cohort;
  const fit = fitEdges(matrix.values, matrix.rows, matrix.cols, data, pairs.edgeCount);
  const observed: ObservedContrast[] = [];
  const nulls: NullChunk[] = [];
  let exact = false;
  condition.contrasts.forEach((expression, i) => {
    const contrast = parseContrast(`contrast_${i + 1}`, expression, matrix, { key: "contrast" });
    const seen = observeContrastOn(fit, contrast, pairs, inference);
    // The null overwrites the data it is given: each contrast but the last works on a copy.
    const own = i === condition.contrasts.length - 1 ? data : Float64Array.from(data);
    const drawn = wholeNullInMemory({ matrix, contrast, data: own, pairs, observed: seen, inference, where: { key: condition.name } });
    observed.push(seen);
    nulls.push(drawn.rows);
    exact = drawn.exact;
  });
  const family = jointNull(nulls);
  const rejects = (rows: (i: number) => NullChunk) => {
    let component = false;
    let edge = false;
    observed.forEach((seen, i) => {
      const fwe = familywiseInference(inference, seen, rows(i), exact);
      if (fwe.componentP.some((r) => r.p <= inference.alpha)) component = true;
      if (fwe.edgeP!.some((p) => p <= inference.alpha)) edge = true;
    });
    return { component, edge };
  };
  return { separate: rejects((i) => nulls[i]), joint: rejects(() => family) };
}

export function runAcrossContrastsCondition(
  condition: AcrossContrastsCondition,
  cohorts: number,
  permutations: number,
  onCohort?: (done: number) => void,
): AcrossContrastsOutcome[] {
  const outcomes: AcrossContrastsOutcome[] = [];
  for (let k = 1; k <= cohorts; k++) {
    outcomes.push(analyseAcrossContrastsCohort(condition, k, permutations));
    onCohort?.(k);
  }
  return outcomes;
}
