import type { EdgeEffectColumns } from "../edgeColumns.js";
import { EFFECT_SIZE_COLUMNS } from "../effectSizeColumns.js";
import type { Cell } from "../tsvWriter.js";
import { fixed, MISSING, significant } from "./printNumbers.js";
import type { TableColumn } from "./reportTable.js";

/** The effect-size columns of tables/subnetwork_edges.tsv, after its other columns (one table for every contrast, so the levels are named in cells). */
export const EFFECT_SIZE_TSV_COLUMNS = [...EFFECT_SIZE_COLUMNS, "level_1", "r_level_1", "level_2", "r_level_2"] as const;

/** An edge's effect-size cells for subnetwork_edges.tsv (empty for an F contrast or where they do not apply). */
export function effectSizeCells(effects: EdgeEffectColumns | undefined, e: number): Cell[] {
  if (!effects) return EFFECT_SIZE_TSV_COLUMNS.map(() => null);
  const means = effects.means;
  return [
    effects.ciLow[e],
    effects.ciHigh[e],
    effects.cohensD[e],
    effects.cohensDLow[e],
    effects.cohensDHigh[e],
    means ? means.levels[0] : null,
    means ? means.first[e] : null,
    means ? means.levels[1] : null,
    means ? means.second[e] : null,
  ];
}

/**
 * The printed edge table's effect sizes for a t contrast: the estimate with its
 * 95% interval in one cell (replacing the bare estimate), Cohen's d with its
 * interval when the contrast compares two levels (some listed edge has a d),
 * the two levels' mean correlations in one cell when written, and the words
 * for the table's note. Combined cells keep the table narrow enough for a page.
 */
export function effectSizePrint(
  effects: EdgeEffectColumns | undefined,
  listed: number[],
): { estimateHeader: string; estimate: (e: number, estimate: number) => string; columns: TableColumn[]; cells: (e: number) => string[]; note: string } {
  if (!effects) return { estimateHeader: "Estimate", estimate: (_, value) => significant(value), columns: [], cells: () => [], note: "" };
  const interval = (low: number, high: number, format: (v: number) => string) =>
    Number.isFinite(low) && Number.isFinite(high) ? `[${format(low)}, ${format(high)}]` : MISSING;
  const withD = listed.some((e) => Number.isFinite(effects.cohensD[e]));
  const means = effects.means;
  const columns: TableColumn[] = [];
  if (withD) columns.push({ header: "Cohen's d [95% CI]", align: "right" });
  if (means) columns.push({ header: `r: ${means.levels[0]} / ${means.levels[1]}`, align: "right" });
  let note = " (with its 95% confidence interval: t quantile × standard error)";
  if (withD) note += "; Cohen's d: the estimate over the residual standard deviation of the full model, with its 95% interval from the noncentral t distribution";
  if (means) note += `; r: each level's model mean (covariates at their means) back-transformed to a correlation (tanh), ${means.levels[0]} / ${means.levels[1]}`;
  return {
    estimateHeader: "Estimate [95% CI]",
    estimate: (e, value) => (Number.isFinite(value) ? `${significant(value)} ${interval(effects.ciLow[e], effects.ciHigh[e], (v) => significant(v))}` : MISSING),
    columns,
    cells: (e) => {
      const cells: string[] = [];
      if (withD) cells.push(Number.isFinite(effects.cohensD[e]) ? `${fixed(effects.cohensD[e], 2)} ${interval(effects.cohensDLow[e], effects.cohensDHigh[e], (v) => fixed(v, 2))}` : MISSING);
      if (means) cells.push(Number.isFinite(means.first[e]) && Number.isFinite(means.second[e]) ? `${fixed(means.first[e], 2)} / ${fixed(means.second[e], 2)}` : MISSING);
      return cells;
    },
    note,
  };
}
