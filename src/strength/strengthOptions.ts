import type { InferenceOverrides } from "../common/inferenceOverrides.js";
import { InputError } from "../errors.js";

/**
 * What a user asks of `plexus strength` (CLI flags or a library call), and
 * the checks that do not need the data: which measure, and which options go
 * with it. Every mistake names the command-line option.
 */
export type MeasureKind = "nodal" | "global" | "subnetwork";
export const MEASURE_KINDS: readonly MeasureKind[] = ["nodal", "global", "subnetwork"];

/** Edge sets for subnetwork strength (and for `plexus extract`); any combination, each giving one or more measures. */
export interface EdgeSelection {
  /** Systems of the regions table: every edge within each. */
  systems?: string[];
  /** Two systems: every edge between them. */
  between?: [string, string];
  /** A TSV of region-label pairs (`region_a region_b`). */
  pairs?: string;
  /** A contrast folder of an earlier results folder (RESULTS_DIR/<contrast>). */
  from?: string;
  /** Component ids of `from`; default every component with p_fwe ≤ that run's alpha. */
  components?: number[];
}

export interface StrengthOptions {
  designFile: string;
  out: string;
  /** Default: subnetwork when an edge set is chosen, else nodal. */
  measure?: MeasureKind;
  /** Count negative weights as 0. */
  positiveOnly?: boolean;
  /** Nodal strength as the mean over the N − 1 possible neighbours instead of the sum. */
  mean?: boolean;
  selection?: EdgeSelection;
  /** Worker threads for the permutations (default: the available cores). */
  threads?: number;
  force?: boolean;
  quiet?: boolean;
  /** Relabelings per engine chunk. */
  chunkSize?: number;
  /** The command line as typed, for provenance. */
  commandLine?: string[];
  /** `--permutations`/`--seed` in place of the design's values (recorded in summary.json and results.md). */
  overrides?: InferenceOverrides;
}

/** The option names the CLI uses, for located errors. */
export const OPTION = {
  measure: "--measure",
  positiveOnly: "--positive-only",
  mean: "--mean",
  system: "--system",
  between: "--between",
  pairs: "--pairs",
  from: "--from",
  component: "--component",
  threads: "--threads",
  out: "--out",
} as const;

export function hasEdgeSet(selection: EdgeSelection | undefined): boolean {
  return Boolean(selection && ((selection.systems?.length ?? 0) > 0 || selection.between || selection.pairs || selection.from));
}

/** Chosen options named, e.g. "--system, --pairs". */
function chosenSelectors(selection: EdgeSelection | undefined): string {
  if (!selection) return "";
  return [
    (selection.systems?.length ?? 0) > 0 ? OPTION.system : "",
    selection.between ? OPTION.between : "",
    selection.pairs ? OPTION.pairs : "",
    selection.from ? OPTION.from : "",
  ]
    .filter(Boolean)
    .join(", ");
}

/** The measure in force, after checking that the other options fit it. */
export function resolveMeasure(options: Pick<StrengthOptions, "measure" | "mean" | "selection">): MeasureKind {
  const { selection } = options;
  const withSet = hasEdgeSet(selection);
  const measure = options.measure ?? (withSet ? "subnetwork" : "nodal");
  if (!MEASURE_KINDS.includes(measure)) {
    throw new InputError(`expected one of ${MEASURE_KINDS.join(", ")}, found '${String(measure)}'`, { key: OPTION.measure });
  }
  if (measure !== "subnetwork" && withSet) {
    throw new InputError(
      `the edge-set options (${chosenSelectors(selection)}) are for subnetwork strength, but the measure is ${measure}`,
      { key: OPTION.measure },
      "use --measure subnetwork (or leave --measure out), or drop the edge-set options",
    );
  }
  if (measure === "subnetwork" && !withSet) {
    throw new InputError(
      "subnetwork strength needs a set of edges",
      { key: OPTION.measure },
      "add --system NAME, --between A,B, --pairs FILE or --from RESULTS_DIR/<contrast>",
    );
  }
  if (options.mean && measure !== "nodal") {
    throw new InputError(
      `--mean applies to nodal strength; ${measure} strength is a mean over edges already`,
      { key: OPTION.mean },
    );
  }
  if ((selection?.components?.length ?? 0) > 0 && !selection?.from) {
    throw new InputError("--component picks components of the results folder given with --from", { key: OPTION.component }, "add --from RESULTS_DIR/<contrast>");
  }
  return measure;
}
