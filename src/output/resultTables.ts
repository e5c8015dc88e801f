import type { Region } from "../io/regions.js";
import { formulaVariables } from "../model/formula.js";
import type { PreparedAnalysis } from "../run/prepareAnalysis.js";
import type { EdgePairs } from "../edges/edgeIndex.js";
import type { ComponentSummary } from "../inference/components.js";
import { formatTsv, type Cell } from "./tsvWriter.js";

/** Extra per-edge columns after the contract columns, in order. */
export interface ExtraEdgeColumn {
  name: string;
  values: ArrayLike<number>;
}

export const EDGE_COLUMNS = ["region_a", "region_b", "statistic", "estimate", "p_unc", "q_fdr", "component"] as const;

/** edges.tsv: one row per edge i<j in the fixed order. */
export function edgesTable(
  pairs: EdgePairs,
  regions: Region[],
  statistic: Float64Array,
  estimate: Float64Array,
  pUncorrected: Float64Array,
  qFdr: Float64Array,
  labels: Int32Array,
  extra: ExtraEdgeColumn[],
): string {
  const rows: Cell[][] = new Array(pairs.edgeCount);
  for (let e = 0; e < pairs.edgeCount; e++) {
    const finite = Number.isFinite(statistic[e]);
    const row: Cell[] = [
      regions[pairs.regionA[e]].label,
      regions[pairs.regionB[e]].label,
      finite ? statistic[e] : null,
      estimate[e],
      finite ? pUncorrected[e] : null,
      finite ? qFdr[e] : null,
      labels[e] > 0 ? labels[e] : null,
    ];
    for (const column of extra) row.push(column.values[e]);
    rows[e] = row;
  }
  return formatTsv([...EDGE_COLUMNS, ...extra.map((c) => c.name)], rows);
}

export const COMPONENT_COLUMNS = ["component", "extent", "nodes", "mass", "p_fwe"] as const;

export interface ComponentInference {
  pFwe?: ArrayLike<number>;
  pFweLow?: ArrayLike<number>;
  pFweHigh?: ArrayLike<number>;
}

/** components.tsv: largest first; p_fwe empty without permutations; `sign` column after the contract ones. */
export function componentsTable(components: ComponentSummary[], inference: ComponentInference): string {
  const extraNames = ["sign", ...(inference.pFweLow ? ["p_fwe_low", "p_fwe_high"] : [])];
  const rows: Cell[][] = components.map((c, k) => [
    c.id,
    c.extent,
    c.nodes,
    c.mass,
    inference.pFwe ? inference.pFwe[k] : null,
    c.sign > 0 ? "positive" : "negative",
    ...(inference.pFweLow ? [inference.pFweLow[k], inference.pFweHigh![k]] : []),
  ]);
  return formatTsv([...COMPONENT_COLUMNS, ...extraNames], rows);
}

/**
 * subjects.tsv: every participant of the table with the model (and block)
 * columns as read, whether the analysis used them, and why not.
 */
export function subjectsTable(prepared: PreparedAnalysis): string {
  const columns = formulaVariables(prepared.formula);
  if (prepared.blocks && !columns.includes(prepared.blocks.column)) columns.push(prepared.blocks.column);
  const excluded = new Map(prepared.excluded.map((x) => [x.id, x.reason]));
  const { participants } = prepared;
  const rows: Cell[][] = participants.ids.map((id, row) => [
    id,
    ...columns.map((name) => participants.columns.get(name)![row] ?? "n/a"),
    excluded.has(id) ? "no" : "yes",
    excluded.get(id) ?? "",
  ]);
  return formatTsv(["participant_id", ...columns, "included", "exclusion_reason"], rows);
}

/** regions.tsv: the regions in matrix order, as used (generated labels when none were given). */
export function regionsTable(regions: Region[]): string {
  const hasCoordinates = regions.some((r) => r.x !== undefined);
  const hasHemisphere = regions.some((r) => r.hemisphere !== undefined);
  const hasSystem = regions.some((r) => r.system !== undefined);
  const header = ["index", "label", ...(hasCoordinates ? ["x", "y", "z"] : []), ...(hasHemisphere ? ["hemisphere"] : []), ...(hasSystem ? ["system"] : [])];
  const rows: Cell[][] = regions.map((r, i) => [
    i + 1,
    r.label,
    ...(hasCoordinates ? [r.x ?? null, r.y ?? null, r.z ?? null] : []),
    ...(hasHemisphere ? [r.hemisphere ?? ""] : []),
    ...(hasSystem ? [r.system ?? ""] : []),
  ]);
  return formatTsv(header, rows);
}
