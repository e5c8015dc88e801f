import { formatTsv, type Cell } from "./tsvWriter.js";

/**
 * The data behind each significant subnetwork of a t contrast, written to
 * `<contrast>/subnetwork_values.tsv` (README: Results folder) and drawn by the
 * report (report/figures/subnetworkDataFigure.ts): per analysed row of the
 * design (a participant; a person's difference for paired differences; a scan
 * for repeated measures) and subnetwork, the mean of the analysed edge values
 * over the subnetwork's edges, the same adjusted for the nuisance columns
 * (model/covariateAdjusted.ts) and the model's fitted value with its 95%
 * confidence interval. The pipeline (run/subnetworkValues.ts) computes it.
 */
export interface SubnetworkValues {
  /** How the values are shown (model/dataViewColumns.ts). */
  plot: "groups" | "covariate" | "mean";
  /** The factor or numeric variable shown; null for "mean". */
  variable: string | null;
  /** The factor's levels in order ("groups"). */
  levels: string[];
  /** The nuisance variables adjusted for. */
  adjustedFor: string[];
  /** How the subnetworks were chosen (README). */
  selection: "components p_fwe" | "threshold-free components" | "fdr components";
  /** The confidence level of fitted_lower/fitted_upper. */
  level: number;
  /** Per design row: its identifier (participant_id, or the person for paired differences). */
  ids: string[];
  /** Per design row: the factor level ("groups"), else empty. */
  groups: string[];
  /** Per design row: the variable's value ("covariate"), else NaN. */
  covariate: Float64Array;
  subnetworks: SubnetworkRowValues[];
}

export interface SubnetworkRowValues {
  /** The subnetwork's number (components.tsv's `component` for permutation methods). */
  id: number;
  /** Number of edges averaged. */
  edges: number;
  mean: Float64Array;
  adjusted: Float64Array;
  fitted: Float64Array;
  lower: Float64Array;
  upper: Float64Array;
}

export const SUBNETWORK_VALUES_FILE = "subnetwork_values.tsv";

/** The columns of subnetwork_values.tsv, in order (a contract: README, Results folder). */
export const SUBNETWORK_VALUES_COLUMNS = [
  "participant_id",
  "subnetwork",
  "group",
  "covariate",
  "mean_connectivity",
  "adjusted_connectivity",
  "fitted_connectivity",
  "fitted_lower",
  "fitted_upper",
] as const;

/** subnetwork_values.tsv: subnetwork by subnetwork, rows in design order. */
export function subnetworkValuesTable(values: SubnetworkValues): string {
  const rows: Cell[][] = [];
  for (const s of values.subnetworks) {
    values.ids.forEach((id, i) => {
      rows.push([id, s.id, values.groups[i], values.covariate[i], s.mean[i], s.adjusted[i], s.fitted[i], s.lower[i], s.upper[i]]);
    });
  }
  return formatTsv([...SUBNETWORK_VALUES_COLUMNS], rows);
}

/** The contrast's `subnetwork_values` block of summary.json (null when the contrast has none). */
export function subnetworkValuesSummary(name: string, values: SubnetworkValues | undefined) {
  if (!values) return null;
  return {
    file: `${name}/${SUBNETWORK_VALUES_FILE}`,
    plot: values.plot,
    variable: values.variable,
    levels: values.levels,
    adjusted_for: values.adjustedFor,
    selection: values.selection,
    confidence_level: values.level,
    subnetworks: values.subnetworks.map((s) => ({ subnetwork: s.id, edges: s.edges })),
  };
}
