import path from "node:path";
import type { InferenceSpec } from "../common/inferenceOptions.js";
import type { PreparedAnalysis } from "./preparedAnalysis.js";
import type { InputRecord } from "./provenance.js";

/** summary.json's `inputs`: every input with its role and SHA-256, paths relative to the design file's folder. */
export function inputsSummary(inputs: InputRecord[], designFile: string): { role: string; path: string; sha256: string }[] {
  const designDir = path.dirname(path.resolve(designFile));
  return inputs.map((input) => ({
    role: input.role,
    path: path.relative(designDir, input.path) || path.basename(input.path),
    sha256: input.sha256,
  }));
}

/** summary.json's `subjects`: those in the table, those used, and those left out with line and reason. */
export function subjectsSummary(prepared: PreparedAnalysis): Record<string, unknown> {
  return {
    in_table: prepared.participants.ids.length,
    used: prepared.kept.length,
    used_ids: prepared.kept.map((k) => k.id),
    excluded: prepared.excluded.map((x) => ({ participant_id: x.id, line: x.line, reason: x.reason })),
  };
}

/**
 * summary.json's `options.inference`: the resolved inference options, in the
 * same keys for every command; `thresholds` adds the primary threshold, its
 * sweep, the enhancement and the size measure (analyses that form components).
 */
export function inferenceSummary(inference: InferenceSpec, include: { thresholds: boolean }): Record<string, unknown> {
  return {
    method: inference.method,
    ...(include.thresholds
      ? {
          threshold: inference.thresholds[0],
          thresholds: inference.thresholds,
          ...(inference.method === "threshold-free"
            ? {
                enhancement: {
                  extent_exponent: inference.enhancement.extentExponent,
                  height_exponent: inference.enhancement.heightExponent,
                  step: inference.enhancement.step,
                },
              }
            : {}),
          size: inference.size,
        }
      : {}),
    tail: inference.tail,
    fdr: inference.fdr,
    alpha: inference.alpha,
    permutations: inference.permutations,
    seed: inference.seed,
    scheme: inference.scheme,
    blocks: inference.blocks ?? null,
    block_permutation: inference.blockPermutation,
  };
}
