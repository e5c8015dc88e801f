import type { InferenceSpec } from "./inferenceOptions.js";

// `--permutations N` and `--seed N` on the command line: a quick trial run of a design without editing it.
// An override that differs from the design's value replaces it in the resolved inference options, so the
// null, the checkpoint and shard fingerprint and every writer see the value that ran; the record of what
// was overridden (with the design's values) travels beside it into summary.json, shard.json, the methods
// text and the report.

/** The values given on the command line (either may be absent). */
export interface InferenceOverrides {
  permutations?: number;
  seed?: number;
}

/**
 * The overrides that changed the run: the command line's value of each, and
 * the design's (resolved: its default where the design sets none). summary.json
 * writes it as `options.inference.command_line_overrides`.
 */
export interface AppliedOverrides {
  permutations?: number;
  seed?: number;
  design: { permutations?: number; seed?: number };
}

/**
 * The inference options with the overrides applied. A value equal to the
 * design's changes nothing and is not recorded (the run is the design's own);
 * `applied` is absent when nothing changed.
 */
export function applyInferenceOverrides(
  inference: InferenceSpec,
  overrides: InferenceOverrides | undefined,
): { inference: InferenceSpec; applied?: AppliedOverrides } {
  const applied: AppliedOverrides = { design: {} };
  let changed = false;
  if (overrides?.permutations !== undefined && overrides.permutations !== inference.permutations) {
    applied.permutations = overrides.permutations;
    applied.design.permutations = inference.permutations;
    changed = true;
  }
  if (overrides?.seed !== undefined && overrides.seed !== inference.seed) {
    applied.seed = overrides.seed;
    applied.design.seed = inference.seed;
    changed = true;
  }
  if (!changed) return { inference };
  return {
    inference: {
      ...inference,
      ...(applied.permutations !== undefined ? { permutations: applied.permutations } : {}),
      ...(applied.seed !== undefined ? { seed: applied.seed } : {}),
    },
    applied,
  };
}

/** The overrides as command-line flags, e.g. `--permutations 200 --seed 7` (for shard.json and messages). */
export function overrideFlags(applied: Pick<AppliedOverrides, "permutations" | "seed"> | undefined): string {
  if (!applied) return "";
  const flags: string[] = [];
  if (applied.permutations !== undefined) flags.push(`--permutations ${applied.permutations}`);
  if (applied.seed !== undefined) flags.push(`--seed ${applied.seed}`);
  return flags.join(" ");
}

/**
 * The warning printed on stderr (and kept in summary.json's warnings): the design says otherwise; or, for a
 * design whose method draws no relabelings (fdr), that the flags change nothing.
 */
export function overrideWarning(applied: AppliedOverrides, designFile: string, drawsRelabelings = true): string {
  if (!drawsRelabelings) return `${overrideFlags(applied)} changes nothing here: the inference of ${designFile} (method fdr) draws no relabelings`;
  const parts: string[] = [];
  if (applied.permutations !== undefined) parts.push(`${applied.permutations} permutations (the design says ${applied.design.permutations})`);
  if (applied.seed !== undefined) parts.push(`seed ${applied.seed} (the design says ${applied.design.seed})`);
  return `the command line overrides the inference of ${designFile}: ${parts.join(" and ")}; the results are not those of the design as written`;
}
