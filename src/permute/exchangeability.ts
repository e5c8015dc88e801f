import { InputError, type InputLocation } from "../errors.js";
import type { InferenceSpec } from "../common/inferenceOptions.js";
import type { Contrast } from "../model/contrast.js";
import type { DesignMatrix } from "../model/designMatrix.js";
import { partitionEffect, partitionEffectRows, type EffectPartition } from "./effectPartition.js";
import { designRowTypes, planRelabelings, type RelabelingPlan, type SchemeKind } from "./relabelings.js";

/** The relabelings a contrast's null will use: the scheme, why, and the plan (exact or Monte Carlo, count, seed, blocks). */
export interface ContrastRelabelings {
  scheme: SchemeKind;
  reason: string;
  plan: RelabelingPlan;
}

/**
 * Chooses the scheme (Winkler et al. 2014): a contrast on the constant term
 * (the one-sample case, or paired differences) cannot be tested by permuting
 * rows and is tested by sign flips; any other contrast by Freedman–Lane
 * permutation of the reduced-model residuals.
 */
export function chooseScheme(partition: Pick<EffectPartition, "constantInModel" | "constantInNuisance" | "effectNorm2">, requested: InferenceSpec["scheme"], where: InputLocation): {
  scheme: SchemeKind;
  reason: string;
} {
  const testsConstant = partition.constantInModel && !partition.constantInNuisance;
  if (requested === "permute") {
    if (testsConstant || !(partition.effectNorm2 > 0)) {
      throw new InputError(
        "this contrast tests the constant term (a one-sample mean), which permuting rows cannot change",
        where,
        "use `scheme: sign-flip` (or leave `scheme: auto`)",
      );
    }
    return { scheme: "permute", reason: "requested in the design" };
  }
  if (requested === "sign-flip") return { scheme: "sign-flip", reason: "requested in the design" };
  return testsConstant
    ? { scheme: "sign-flip", reason: "the contrast tests the constant term (one-sample design), so signs are flipped" }
    : { scheme: "permute", reason: "Freedman–Lane permutation of the reduced-model residuals" };
}

/**
 * Whole-block permutation moves blocks as units, so they must be of equal
 * size (Winkler et al. 2015, NeuroImage 123:253); an InputError at
 * `inference.block_permutation` otherwise.
 */
export function checkWholeBlockSizes(blocks: ArrayLike<number>, where: InputLocation): void {
  const sizes = new Map<number, number>();
  for (let s = 0; s < blocks.length; s++) sizes.set(blocks[s], (sizes.get(blocks[s]) ?? 0) + 1);
  if (new Set(sizes.values()).size > 1) {
    const listed = [...new Set(sizes.values())].sort((a, b) => a - b).join(", ");
    throw new InputError(
      `whole-block permutation needs exchangeability blocks of equal size; these blocks hold ${listed} subjects`,
      { ...where, key: "inference.block_permutation" },
      "use `block_permutation: within`, or blocks of equal size",
    );
  }
}

/** The effect/nuisance partition of a contrast, as the null of `nullContext.ts` builds it. */
export function contrastPartition(matrix: DesignMatrix, contrast: Contrast): Pick<EffectPartition, "constantInModel" | "constantInNuisance" | "effectNorm2"> {
  if (contrast.kind === "F" && contrast.rows.length > 1) {
    const multi = partitionEffectRows(matrix.values, matrix.rows, matrix.cols, contrast.rows);
    return { constantInModel: multi.constantInModel, constantInNuisance: multi.constantInNuisance, effectNorm2: 1 };
  }
  return partitionEffect(matrix.values, matrix.rows, matrix.cols, contrast.vector);
}

/**
 * Everything about the relabelings that can be checked before any statistic
 * is computed (so `plexus check` finds it, and no checkpoint is made first):
 * the scheme each contrast can use, equal block sizes for whole-block
 * permutation, and at least one relabeling besides the identity (blocks of
 * one subject each, such as `blocks: participant_id`, allow no permutation).
 * Returns each contrast's plan, the one `nullContext.ts` makes from the same
 * inputs (so `plexus check` prints what a run would do).
 */
export function checkRelabelings(options: {
  matrix: DesignMatrix;
  contrasts: Contrast[];
  contrastWhere: InputLocation[];
  inference: InferenceSpec;
  blocks?: Int32Array;
  where: (key: string) => InputLocation;
}): ContrastRelabelings[] {
  const { matrix, inference, blocks } = options;
  const whole = inference.blockPermutation === "whole" && blocks !== undefined;
  if (blocks && whole) checkWholeBlockSizes(blocks, options.where("inference.block_permutation"));
  const rowTypes = designRowTypes(matrix.values, matrix.rows, matrix.cols);
  const blockList = blocks ? [...blocks] : undefined;
  return options.contrasts.map((contrast, k) => {
    const { scheme, reason } = chooseScheme(contrastPartition(matrix, contrast), inference.scheme, options.contrastWhere[k]);
    const plan = planRelabelings({ kind: scheme, rowTypes, blocks: blockList, wholeBlocks: whole, seed: inference.seed, requested: inference.permutations });
    if (plan.distinct < 2) {
      const key = blocks ? "inference.blocks" : "inference.scheme";
      throw new InputError(
        blocks
          ? `with these exchangeability blocks the only ${scheme === "sign-flip" ? "sign flip" : "permutation"} for '${contrast.name}' is the identity (${whole ? "whole blocks cannot be exchanged" : "each block's subjects cannot be reordered: one subject, or one kind of subject, per block"}), so there is no null distribution`
          : `the only ${scheme === "sign-flip" ? "sign flip" : "permutation"} for '${contrast.name}' is the identity, so there is no null distribution`,
        options.where(key),
        blocks ? "name a column that groups several subjects (e.g. family or site), or remove `blocks:`" : undefined,
      );
    }
    if (scheme === "permute" && blocks && !whole && testedColumnsConstantWithinBlocks(matrix, contrast, blocks)) {
      throw new InputError(
        `'${contrast.name}' tests columns that do not vary within any exchangeability block (every block holds one value of them), so permuting within blocks cannot change its statistic and its null distribution would be the observed value alone`,
        options.where("inference.blocks"),
        "block on a column that groups subjects of both kinds (e.g. family or site), use `block_permutation: whole` to exchange whole blocks, or remove `blocks:`",
      );
    }
    return { scheme, reason, plan };
  });
}

/**
 * True when every design column the contrast weights is constant within each
 * block: permutations within blocks then leave the tested effect where it is.
 */
function testedColumnsConstantWithinBlocks(matrix: DesignMatrix, contrast: Contrast, blocks: Int32Array): boolean {
  const { rows, cols, values } = matrix;
  for (let j = 0; j < cols; j++) {
    if (contrast.rows.every((row) => row[j] === 0)) continue;
    const first = new Map<number, number>();
    for (let s = 0; s < rows; s++) {
      const value = values[s * cols + j];
      const seen = first.get(blocks[s]);
      if (seen === undefined) first.set(blocks[s], value);
      else if (seen !== value) return false;
    }
  }
  return true;
}
