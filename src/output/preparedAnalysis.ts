import type { LoadedConnectomes } from "../io/connectomes.js";
import type { DesignSpec } from "../io/designFile.js";
import type { ParticipantsTable } from "../io/participants.js";
import type { Region } from "../io/regions.js";
import type { EdgePairs } from "../edges/edgeIndex.js";
import type { EdgeFit } from "../edges/fitEdges.js";
import type { Contrast } from "../model/contrast.js";
import type { DesignMatrix } from "../model/designMatrix.js";
import type { Formula } from "../model/formula.js";
import type { AppliedOverrides } from "../common/inferenceOverrides.js";
import type { ContrastRelabelings } from "../permute/exchangeability.js";

// The validated inputs of an analysis, as run/prepareAnalysis.ts makes them and the writers of
// the results (subjects, regions, summary.json) read them. The type lives with its readers so
// that output/ never imports the pipeline.

export interface ExcludedSubject {
  id: string;
  /** 1-based line in the participants table. */
  line: number;
  reason: string;
}

export interface KeptSubject {
  id: string;
  /** 0-based row of the participants table. */
  tableRow: number;
}

/** Table 1 (the cohort table) as the design chose it or its defaults gave it (run/cohortTableChoice.ts). */
export interface CohortTableChoice {
  /** The grouping column; null for one column describing every analysed participant ("All"). */
  by: string | null;
  /** Where `by` came from: the design's `cohort_table.by`, the first t contrast that compares a factor's levels, or neither. */
  byFrom: "design" | "first contrast" | "none";
  /** The columns described, in order (never `by`). */
  variables: string[];
}

/**
 * A design with several scans per person (`repeated:`): "paired differences"
 * (two levels: each person's difference is analysed) or "repeated measures"
 * (three or more: person effects, relabelings within each person).
 */
export interface RepeatedDesign {
  participant: string;
  within: string;
  /** The within factor's levels in order. */
  levels: string[];
  design: "paired differences" | "repeated measures";
  /** People and scans analysed. */
  people: number;
  scans: number;
  /** Repeated measures: scans permuted within each person (within-person contrasts) or whole people exchanged (between-person contrasts). */
  exchange?: "within each person" | "whole people";
  /** Paired differences: which difference each person contributes, e.g. "post - pre". */
  difference?: string;
  /** Paired differences: the mean subtracted from each between-person column of the change model. */
  centred?: Record<string, number>;
}

/** Everything a run needs, validated: the `check` command stops here. */
export interface PreparedAnalysis {
  design: DesignSpec;
  formula: Formula;
  participants: ParticipantsTable;
  kept: KeptSubject[];
  excluded: ExcludedSubject[];
  /** Participants the design's `select` leaves out (not analysed by design; never counted as excluded). */
  notSelected: ExcludedSubject[];
  /** Table 1's grouping and variables. */
  cohortTable: CohortTableChoice;
  matrix: DesignMatrix;
  contrasts: Contrast[];
  regions: Region[];
  pairs: EdgePairs;
  connectomes: LoadedConnectomes;
  /** Exchangeability block of each kept subject (0-based codes), when `inference.blocks` is set. */
  blocks?: { column: string; codes: Int32Array; labels: string[] };
  /**
   * Input files with their roles, for provenance; `sha256` is set where it is
   * known from loading (text matrices), the writer hashes the rest.
   */
  inputs: { role: string; path: string; sha256?: string }[];
  warnings: string[];
  /** The coverage rules as applied, when the design has `edges:`. */
  edgeRules?: AppliedEdgeRules;
  /** Several scans per person: the design and its counts (`kept` then lists scans, the design matrix's rows people or scans). */
  repeated?: RepeatedDesign;
  /** The fit of every edge, when preparation needed it (threshold-free: the step's bound); the run reuses it. */
  fit?: EdgeFit;
  /** `--permutations`/`--seed` that replaced the design's values (already applied to `design.inference`). */
  overrides?: AppliedOverrides;
  /** Each contrast's relabelings as the run will draw them (absent for `method: fdr`), for `plexus check`. */
  relabelings?: ContrastRelabelings[];
}

/**
 * The coverage rules as applied (`edges:` in the design): the analysis sees the
 * kept edges only (`PreparedAnalysis.pairs` and the connectome data hold them,
 * with their real regions); the writers list every edge, the dropped ones
 * with their reason.
 */
export interface AppliedEdgeRules {
  missing: "error" | "drop";
  presentIn?: number;
  /** Every edge of the matrices, in the fixed edge order. */
  allPairs: EdgePairs;
  /** Full edge index of each kept edge, ascending (kept edge k is allPairs' edge kept[k]). */
  kept: Uint32Array;
  /** Per edge of allPairs: why it was left out ("" when kept), e.g. "missing in 3 participants". */
  reasons: string[];
  dropped: { missing: number; rare: number };
  /** Regions (0-based) of which no edge is kept. */
  regionsWithoutEdges: number[];
}
