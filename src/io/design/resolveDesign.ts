import path from "node:path";
import type { InferenceSpec } from "../../common/inferenceOptions.js";
import type { CheckedDesign, CheckedInference } from "./checkDesign.js";
import { DESIGN_KEYS, ENHANCEMENT_KEYS, INFERENCE_KEYS } from "./designKeys.js";
import type { DesignSpec } from "./designSpec.js";

/** The inference options with every default of the key table applied, the thresholds resolved to one list (primary first). */
export function resolveInference(checked: CheckedInference = {}): InferenceSpec {
  const enhancement = checked.enhancement ?? {};
  const inference: InferenceSpec = {
    method: checked.method ?? INFERENCE_KEYS.method.default,
    thresholds: checked.thresholds ?? [INFERENCE_KEYS.threshold.default],
    enhancement: {
      extentExponent: enhancement.extentExponent ?? ENHANCEMENT_KEYS.extent_exponent.default,
      heightExponent: enhancement.heightExponent ?? ENHANCEMENT_KEYS.height_exponent.default,
      step: enhancement.step ?? ENHANCEMENT_KEYS.step.default,
    },
    size: checked.size ?? INFERENCE_KEYS.size.default,
    permutations: checked.permutations ?? INFERENCE_KEYS.permutations.default,
    seed: checked.seed ?? INFERENCE_KEYS.seed.default,
    alpha: checked.alpha ?? INFERENCE_KEYS.alpha.default,
    blockPermutation: checked.blockPermutation ?? INFERENCE_KEYS.block_permutation.default,
    tail: checked.tail ?? INFERENCE_KEYS.tail.default,
    fdr: checked.fdr ?? INFERENCE_KEYS.fdr.default,
    scheme: checked.scheme ?? INFERENCE_KEYS.scheme.default,
    acrossContrasts: checked.acrossContrasts ?? INFERENCE_KEYS.across_contrasts.default,
  };
  if (checked.blocks !== undefined) inference.blocks = checked.blocks;
  return inference;
}

/** The inference options of a design that sets none. */
export const DEFAULT_INFERENCE: InferenceSpec = resolveInference();

/** The DesignSpec of a checked design: every default applied; `lines` holds the line of every key path. */
export function resolveDesign(checked: CheckedDesign, file: string, lines: Map<string, number>): DesignSpec {
  return {
    file,
    baseDir: path.dirname(path.resolve(file)),
    subjects: checked.subjects,
    connectomes: checked.connectomes,
    ...(checked.connectomeVariable !== undefined ? { connectomeVariable: checked.connectomeVariable } : {}),
    ...(checked.subjectsAxis !== undefined ? { subjectsAxis: checked.subjectsAxis } : {}),
    regions: checked.regions,
    missingValues: checked.missingValues ?? [...DESIGN_KEYS.missing_values.default],
    model: checked.model,
    levels: checked.levels ?? {},
    center: checked.center ?? [],
    select: checked.select ?? [],
    cohortTable: checked.cohortTable ?? {},
    contrasts: checked.contrasts,
    transform: checked.transform ?? DESIGN_KEYS.transform.default,
    scale: checked.scale ?? DESIGN_KEYS.scale.default,
    ...(checked.edges ? { edges: checked.edges } : {}),
    symmetrize: checked.symmetrize ?? DESIGN_KEYS.symmetrize.default,
    asymmetryTolerance: checked.asymmetryTolerance ?? DESIGN_KEYS.asymmetry_tolerance.default,
    inference: resolveInference(checked.inference),
    ...(checked.repeated ? { repeated: checked.repeated } : {}),
    lines,
  };
}
