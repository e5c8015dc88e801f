import path from "node:path";
import type { InferenceSpec } from "../common/inferenceOptions.js";
import type { AppliedOverrides } from "../common/inferenceOverrides.js";
import type { MatrixReading } from "../io/arrays/containerConnectomes.js";
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

/** summary.json's `matrices_read`: the reader, the variable, the array's shape and axis, and where the region labels came from. */
export function readingSummary(reading: MatrixReading): Record<string, unknown> {
  return {
    reader: reading.reader,
    variable: reading.variable ?? null,
    shape: reading.shape,
    subjects_axis: reading.subjectsAxis ?? null,
    labels: reading.labels,
    reordered: reading.reordered ?? false,
  };
}

/** summary.json's `subjects`: those in the table, those used, and those left out with line and reason. */
export function subjectsSummary(prepared: PreparedAnalysis): Record<string, unknown> {
  return {
    in_table: prepared.participants.ids.length,
    used: prepared.kept.length,
    used_ids: prepared.kept.map((k) => k.id),
    excluded: prepared.excluded.map((x) => ({ participant_id: x.id, line: x.line, reason: x.reason })),
    // `select`: the analysed subset (column → values kept), or null; the participants it leaves out are not excluded.
    selection: prepared.design.select.length > 0 ? Object.fromEntries(prepared.design.select.map((s) => [s.column, s.values])) : null,
    not_selected: prepared.notSelected.length,
  };
}

/** summary.json's `cohort_table`: Table 1's grouping column (or null), where it came from, and the columns it describes. */
export function cohortTableSummary(prepared: PreparedAnalysis): Record<string, unknown> {
  const { by, byFrom, variables } = prepared.cohortTable;
  return { by, by_from: byFrom, variables };
}

/**
 * summary.json's `options.inference`: the resolved inference options, in the
 * same keys for every command; `components` adds the primary threshold, its
 * sweep, the enhancement and the size measure (analyses that form components).
 */
export function inferenceSummary(inference: InferenceSpec, include: { components: boolean }): Record<string, unknown> {
  return {
    method: inference.method,
    ...(include.components
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

/** The options that change a contrast's null (for the fingerprint that ties a checkpoint or shard to its run). */
export function nullOptions(inference: InferenceSpec): Record<string, unknown> {
  return {
    threshold: inference.thresholds[0],
    thresholds: inference.thresholds,
    enhancement: inference.method === "threshold-free" ? inference.enhancement : null,
    tail: inference.tail,
    permutations: inference.permutations,
    seed: inference.seed,
    scheme: inference.scheme,
    blocks: inference.blocks ?? null,
    blockPermutation: inference.blockPermutation,
  };
}

/** The primary threshold as a rule on the statistic, e.g. "t > 3", "t < -3", "|t| > 3". */
export function thresholdRule(tail: string, threshold: number): string {
  if (tail === "both") return `|t| > ${threshold}`;
  if (tail === "lower") return `t < -${threshold}`;
  return `t > ${threshold}`;
}

/** The design's primary threshold as a rule on the statistic of its tail. */
export function primaryRule(inference: InferenceSpec): string {
  return thresholdRule(inference.tail, inference.thresholds[0]);
}

/** One line of the resolved inference options, e.g. "components, threshold 3, size extent, tail both, alpha 0.05". */
export function inferenceLine(inference: InferenceSpec): string {
  return `${inference.method}, threshold ${inference.thresholds.join(", ")}, size ${inference.size}, tail ${inference.tail}, alpha ${inference.alpha}${inference.acrossContrasts ? ", p_fwe corrected across contrasts" : ""}`;
}

/**
 * summary.json's `options.inference.command_line_overrides`: the `--permutations`/`--seed` values
 * that replaced the design's (`permutations`, `seed`; only those given and different), with the
 * design's own under `design`; null when the run used the design as written.
 */
export function overridesSummary(overrides: AppliedOverrides | undefined): Record<string, unknown> | null {
  if (!overrides) return null;
  return {
    ...(overrides.permutations !== undefined ? { permutations: overrides.permutations } : {}),
    ...(overrides.seed !== undefined ? { seed: overrides.seed } : {}),
    design: { ...overrides.design },
  };
}
