import { DEFAULT_MISSING_VALUES } from "../participants.js";

// The design file's keys in one table: what each holds, its allowed values, its
// limits and its default. The unknown-key hints list these names (in this order),
// the checks (checkDesign.ts) read the allowed values and limits, and the defaults
// (resolveDesign.ts) come from here. A new key is added here first.

/** At most this many missing-value codes, each at most this many characters. */
export const MISSING_VALUES_LIMIT = 100;
export const MISSING_VALUE_LENGTH_LIMIT = 100;
/** At most this many thresholds in a sweep. */
export const THRESHOLD_LIST_LIMIT = 20;
/** At most this many permutations. */
export const PERMUTATIONS_LIMIT = 10_000_000;
/** At most this many contrasts (each has its own permutations). */
export const CONTRASTS_LIMIT = 1000;
/** At most this many levels listed for one factor. */
export const LEVELS_LIMIT = 10_000;
/** At most this many values kept for one `select` column. */
export const SELECT_VALUES_LIMIT = 10_000;
/** At most this many columns described by the cohort table. */
export const COHORT_VARIABLES_LIMIT = 1000;

/** A key taking one of a few words. */
interface ChoiceKey<T extends string> {
  kind: "choice";
  allowed: readonly T[];
  default: T;
  /** A YAML null (`key: ~`) reads as the default rather than as a wrong value. */
  nullIsDefault?: boolean;
}

/** A key taking a finite number that passes `test` (`rule` says which, in words). */
interface NumberKey {
  kind: "number";
  test: (value: number) => boolean;
  rule: string;
  default: number;
  nullIsDefault?: boolean;
}

const choice = <T extends string>(allowed: readonly T[], fallback: T, nullIsDefault?: true): ChoiceKey<T> => ({
  kind: "choice",
  allowed,
  default: fallback,
  ...(nullIsDefault ? { nullIsDefault } : {}),
});
const number = (test: (value: number) => boolean, rule: string, fallback: number, nullIsDefault?: true): NumberKey => ({
  kind: "number",
  test,
  rule,
  default: fallback,
  ...(nullIsDefault ? { nullIsDefault } : {}),
});

/** `inference.enhancement`: threshold-free enhancement's parameters. */
export const ENHANCEMENT_KEYS = {
  extent_exponent: number((v) => v > 0 && v <= 10, "a number in (0, 10]", 0.5),
  height_exponent: number((v) => v >= 0 && v <= 10, "a number in [0, 10]", 2),
  step: number((v) => v > 0 && v <= 1, "a number in (0, 1]", 0.1),
};

/** `inference`: how the test is made. */
export const INFERENCE_KEYS = {
  method: choice(["components", "fdr", "max-t", "threshold-free"] as const, "components"),
  /** One positive number, or a sweep of up to `limit` different ones (the first is the primary threshold). */
  threshold: {
    ...number((v) => v > 0, "a positive number (the primary threshold on the statistic), or a list of them", 3),
    kind: "thresholds",
    limit: THRESHOLD_LIST_LIMIT,
  },
  size: choice(["extent", "mass"] as const, "extent"),
  permutations: number(
    (v) => Number.isInteger(v) && v >= 1 && v <= PERMUTATIONS_LIMIT,
    `a whole number from 1 to ${PERMUTATIONS_LIMIT.toLocaleString("en-US")}`,
    5000,
  ),
  seed: number((v) => Number.isInteger(v) && v >= 0 && v <= Number.MAX_SAFE_INTEGER, "a whole number ≥ 0", 1),
  alpha: number((v) => v > 0 && v < 1, "between 0 and 1 (exclusive)", 0.05),
  /** A column of the participants table; no default (no blocks). */
  blocks: { kind: "column" },
  block_permutation: choice(["within", "whole"] as const, "within"),
  tail: choice(["upper", "lower", "both"] as const, "upper"),
  fdr: choice(["bh", "by"] as const, "bh"),
  scheme: choice(["auto", "permute", "sign-flip"] as const, "auto"),
  enhancement: { kind: "section", keys: ENHANCEMENT_KEYS },
  /** Take each relabeling's maxima over every t contrast too (family-wise error across contrasts). */
  across_contrasts: { kind: "boolean", default: false, nullIsDefault: true },
} as const;

/** `connectomes` as a mapping: the file or template, the array in it, and its participants' axis. */
export const CONNECTOMES_KEYS = {
  path: { kind: "text", required: true },
  /** A variable name (.mat, .npz) or an HDF5 path (/group/conn). */
  variable: { kind: "text" },
  subjects_axis: { kind: "choice", allowed: ["first", "last"] as const },
} as const;

/** `cohort_table`: the grouping of the participant-characteristics table and the columns it describes. */
export const COHORT_TABLE_KEYS = {
  /** A column of the participants table, or null for one column of everyone; default from the contrasts. */
  by: { kind: "column" },
  /** Columns of the participants table; default: the model's (and blocks') columns. */
  variables: { kind: "columns", limit: COHORT_VARIABLES_LIMIT },
} as const;

/** `edges`: which edges enter the analysis when some are missing or rarely present (coverage rules). */
export const EDGES_KEYS = {
  missing: choice(["error", "drop"] as const, "error"),
  /** A fraction in (0, 1]; no default (no prevalence rule). */
  present_in: { kind: "fraction" },
} as const;

/** `repeated`: several scans per person in a long-form participants table (one row per scan). */
export const REPEATED_KEYS = {
  /** The column naming the person each scan belongs to. */
  participant: { kind: "column", required: true },
  /** The column naming the session or condition of each scan (a factor of the model). */
  within: { kind: "column", required: true },
} as const;

/** The top level of a design file. */
export const DESIGN_KEYS = {
  subjects: { kind: "text", required: true },
  /** A path or template (text), or a mapping of CONNECTOMES_KEYS. */
  connectomes: { kind: "text or section", keys: CONNECTOMES_KEYS, required: true },
  regions: { kind: "text" },
  /** A formula (text; the number 1 is read as the text "1"). */
  model: { kind: "formula", required: true },
  missing_values: {
    kind: "texts",
    default: DEFAULT_MISSING_VALUES,
    limit: MISSING_VALUES_LIMIT,
    lengthLimit: MISSING_VALUE_LENGTH_LIMIT,
  },
  /** Factor → its levels in order; none by default. */
  levels: { kind: "levels", limit: LEVELS_LIMIT },
  /** Numeric columns to centre; none by default. */
  center: { kind: "columns" },
  /** Column → the cell texts kept (all columns must hold); none by default (every participant). */
  select: { kind: "selection", limit: SELECT_VALUES_LIMIT },
  cohort_table: { kind: "section", keys: COHORT_TABLE_KEYS },
  contrasts: { kind: "contrasts", required: true, limit: CONTRASTS_LIMIT },
  transform: choice(["none", "fisher-z", "log1p"] as const, "none", true),
  scale: choice(["none", "total"] as const, "none", true),
  edges: { kind: "section", keys: EDGES_KEYS },
  symmetrize: { kind: "boolean", default: false, nullIsDefault: true },
  asymmetry_tolerance: number((v) => v >= 0, "a finite number ≥ 0", 1e-6, true),
  inference: { kind: "section", keys: INFERENCE_KEYS },
  repeated: { kind: "section", keys: REPEATED_KEYS },
} as const;

/** The names a section allows, in the table's order. */
export function keyNames(keys: object): readonly string[] {
  return Object.keys(keys);
}
