import type { InferenceSpec } from "../../common/inferenceOptions.js";

export interface ContrastSpec {
  name: string;
  /**
   * An expression such as `group[patient] - group[control]`, a numeric vector
   * over the design columns, or a list of rows (expressions or vectors) for an F contrast.
   */
  expression: string | number[] | (string | number[])[];
  /** Design key, e.g. `contrasts.patient_gt_control`, and its line, for errors. */
  key: string;
  line?: number;
}

/** One column of `select`: the participants kept have one of these cell texts in it. */
export interface SelectionSpec {
  column: string;
  values: string[];
  /** Line of `select.<column>`, for errors. */
  line?: number;
}

/** `cohort_table` as written: `by` null means one column of every analysed participant; absent keys take defaults. */
export interface CohortTableSpec {
  by?: string | null;
  variables?: string[];
}

/** `edges: { missing, present_in }`. */
export interface EdgeRulesSpec {
  missing: "error" | "drop";
  /** Keep only edges non-zero (and not missing) in at least this fraction of the analysed participants. */
  presentIn?: number;
}

/** `repeated: { participant, within }`: column names of the participants table. */
export interface RepeatedSpec {
  participant: string;
  within: string;
}

/** A design file read and checked for shape; columns and files are checked later against the data. */
export interface DesignSpec {
  file: string;
  baseDir: string;
  subjects: string;
  connectomes: string;
  /** `connectomes.variable`: the array to read in a container (a variable name or an HDF5 path). */
  connectomeVariable?: string;
  /** `connectomes.subjects_axis`: which axis of a stack runs over participants. */
  subjectsAxis?: "first" | "last";
  regions?: string;
  model: string;
  /** Cell texts of the participants table read as missing (`missing_values`). */
  missingValues: string[];
  levels: Record<string, string[]>;
  center: string[];
  /** `select`: the analysed subset (every column must hold); empty when every participant is analysed. */
  select: SelectionSpec[];
  /** `cohort_table` as written (defaults resolved in preparation, where the contrasts are known). */
  cohortTable: CohortTableSpec;
  contrasts: ContrastSpec[];
  transform: "none" | "fisher-z" | "log1p";
  /** `scale`: each participant's kept edges divided by their sum (`total`), after the edge rules. */
  scale: "none" | "total";
  /** `edges`: the coverage rules; absent when the design has no `edges:` key. */
  edges?: EdgeRulesSpec;
  symmetrize: boolean;
  asymmetryTolerance: number;
  inference: InferenceSpec;
  /** `repeated`: the person and the within-person factor of a long-form table (one row per scan). */
  repeated?: RepeatedSpec;
  /** 1-based line of each key path (`inference.threshold`), for located errors later. */
  lines: Map<string, number>;
}

/** The location of a design key, for errors raised after parsing. */
export function designKeyLocation(design: DesignSpec, key: string) {
  return { file: design.file, key, line: design.lines.get(key) };
}
