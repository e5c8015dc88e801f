import type { Region } from "../io/regions.js";
import { formulaVariables } from "../model/formula.js";
import type { PreparedAnalysis } from "./preparedAnalysis.js";
import type { EdgePairs } from "../edges/edgeIndex.js";
import type { ComponentSummary } from "../network/components.js";
import type { EdgeColumns, ExtraEdgeColumn } from "./edgeColumns.js";
import { readEffectSizeColumns } from "./effectSizeColumns.js";
import { formatCell, formatNumber, formatTsv, NumberTexts, TsvBytes, utf8Field, type Cell } from "./tsvWriter.js";

export type { ExtraEdgeColumn };

export const EDGE_COLUMNS = ["region_a", "region_b", "statistic", "estimate", "p_unc", "q_fdr", "component"] as const;
/** The last column of edges.tsv when the design has `edges:`: why the edge was left out (empty when analysed). */
export const REASON_COLUMN = "reason";

/**
 * edges.tsv, as UTF-8 bytes: one row per edge i<j in the fixed order. Written
 * field by field rather than through formatTsv's cells (79,800 rows for 400
 * regions): each region label is formatted once and q_fdr (few distinct
 * values) through a cache; the bytes are those of formatTsv's text for the
 * same rows.
 */
export function edgesTable(
  pairs: EdgePairs,
  regions: Region[],
  statistic: Float64Array,
  estimate: Float64Array,
  pUncorrected: Float64Array,
  qFdr: Float64Array,
  labels: Int32Array,
  extra: ExtraEdgeColumn[],
  reasons?: readonly string[],
): Uint8Array {
  const labelBytes = regions.map((region) => utf8Field(formatCell(region.label)));
  const qText = new NumberTexts();
  // About 20 bytes a number: a first guess at the size, grown as needed.
  const out = new TsvBytes(pairs.edgeCount * (24 + 20 * (5 + extra.length)));
  // `reason` (why an edge was left out by the edge rules) is always the last column.
  out.header([...EDGE_COLUMNS, ...extra.map((c) => c.name), ...(reasons ? [REASON_COLUMN] : [])]);
  for (let e = 0; e < pairs.edgeCount; e++) {
    const t = statistic[e];
    const finite = Number.isFinite(t);
    out.field(labelBytes[pairs.regionA[e]]);
    out.tab();
    out.field(labelBytes[pairs.regionB[e]]);
    out.tab();
    if (finite) out.ascii(String(t));
    out.tab();
    out.ascii(formatNumber(estimate[e]));
    out.tab();
    if (finite) out.ascii(formatNumber(pUncorrected[e]));
    out.tab();
    if (finite) out.ascii(qText.text(qFdr[e]));
    out.tab();
    if (labels[e] > 0) out.ascii(String(labels[e]));
    for (let c = 0; c < extra.length; c++) {
      out.tab();
      out.ascii(formatNumber(extra[c].values[e]));
    }
    if (reasons) {
      out.tab();
      if (reasons[e] !== "") out.field(utf8Field(formatCell(reasons[e])));
    }
    out.newline();
  }
  return out.result();
}

/** A number as it reads back from its cell: the same double, but −0 (written "0") is 0 and a non-finite one (an empty cell) is NaN. */
function readBack(value: number): number {
  return Number.isFinite(value) ? value + 0 : NaN;
}

/**
 * The columns that src/output/report/loadResults.ts reads from the text edgesTable
 * writes for the same arguments, computed without writing or parsing it, so a
 * report made right after the run need not read edges.tsv back. Number::toString
 * gives the shortest text that reads back as the same double (ECMA-262,
 * Number::toString), so only −0 and the empty cells of non-finite numbers change.
 */
export function edgeColumnsReadBack(
  pairs: EdgePairs,
  statistic: Float64Array,
  estimate: Float64Array,
  pUncorrected: Float64Array,
  qFdr: Float64Array,
  labels: Int32Array,
  extra: ExtraEdgeColumn[],
): EdgeColumns {
  const count = pairs.edgeCount;
  const finiteStatistic = (values: ArrayLike<number>): Float64Array => {
    const out = new Float64Array(count);
    for (let e = 0; e < count; e++) out[e] = Number.isFinite(statistic[e]) ? readBack(values[e]) : NaN;
    return out;
  };
  const mapped = (values: ArrayLike<number>): Float64Array => {
    const out = new Float64Array(count);
    for (let e = 0; e < count; e++) out[e] = readBack(values[e]);
    return out;
  };
  // The reader takes the first column of a name; a column not written reads as NaN throughout.
  const named = (name: string): Float64Array => {
    const column = extra.find((c) => c.name === name);
    return column ? mapped(column.values) : new Float64Array(count).fill(NaN);
  };
  const components = new Int32Array(count);
  for (let e = 0; e < count; e++) components[e] = labels[e] > 0 ? labels[e] : 0;
  const columns: EdgeColumns = {
    regionA: pairs.regionA,
    regionB: pairs.regionB,
    statistic: finiteStatistic(statistic),
    estimate: mapped(estimate),
    pUncorrected: finiteStatistic(pUncorrected),
    qFdr: finiteStatistic(qFdr),
    component: components,
    partialR: named("partial_r"),
    standardError: named("standard_error"),
    partialEtaSquared: named("partial_eta_squared"),
  };
  if (extra.some((c) => c.name === "p_fwe")) columns.pFwe = named("p_fwe");
  Object.assign(columns, readEffectSizeColumns(extra.map((c) => c.name), named));
  return columns;
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
 * subjects.tsv: every participant of the table with the model (and block,
 * select and cohort-table) columns as read, whether the analysis used them,
 * and why not (a missing value, or `not selected (…)` outside `select`).
 */
export function subjectsTable(prepared: PreparedAnalysis): string {
  const columns = formulaVariables(prepared.formula);
  const blockColumn = prepared.blocks?.column;
  // Then the columns of `select` and of the cohort table, so the report can describe them; a repeated design's person column first.
  const { cohortTable } = prepared;
  const more = [blockColumn, ...prepared.design.select.map((s) => s.column), cohortTable.by, ...cohortTable.variables];
  for (const name of more) if (name !== undefined && name !== null && name !== "participant_id" && !columns.includes(name)) columns.push(name);
  if (prepared.repeated && !columns.includes(prepared.repeated.participant)) columns.unshift(prepared.repeated.participant);
  const excluded = new Map([...prepared.excluded, ...prepared.notSelected].map((x) => [x.id, x.reason]));
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
