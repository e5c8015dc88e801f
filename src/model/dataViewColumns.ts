import type { Contrast } from "./contrast.js";
import type { DesignMatrix } from "./designMatrix.js";
import { levelComparison } from "./levelComparison.js";

/**
 * How the data behind a t contrast are shown, and which design columns are
 * adjusted away (the nuisance) before they are:
 * - "groups": the contrast compares two levels of a factor (model/levelComparison.ts):
 *   values by level; the factor's columns and the intercept are kept.
 * - "covariate": the contrast weighs the slope of one numeric variable alone
 *   (a main effect in no interaction): values against that variable; its
 *   column and the intercept are kept.
 * - "mean": the contrast weighs the intercept alone (a one-sample mean, or the
 *   mean change of paired differences): one set of values; the intercept is kept.
 * Every other column is nuisance. Other contrasts (F, interactions, sums of
 * several variables) have no such view: undefined.
 */
export interface DataView {
  plot: "groups" | "covariate" | "mean";
  /** The factor or numeric variable shown; null for "mean". */
  variable: string | null;
  /** Per design column: true when it is adjusted away. */
  nuisance: boolean[];
  /** The variables of the nuisance columns, in column order, each once (e.g. age, sex). */
  adjustedFor: string[];
}

export function dataViewColumns(contrast: Contrast, design: DesignMatrix): DataView | undefined {
  if (contrast.kind !== "t") return undefined;
  const used: number[] = [];
  contrast.vector.forEach((v, j) => {
    if (v !== 0) used.push(j);
  });
  const isIntercept = (j: number) => design.columns[j].parts.length === 0;
  const inInteraction = (variable: string) => design.formula.terms.some((term) => term.length > 1 && term.includes(variable));
  let plot: DataView["plot"];
  let variable: string | null = null;
  const comparison = levelComparison(contrast, design);
  if (comparison) {
    plot = "groups";
    variable = comparison.variable;
  } else if (used.length === 1 && isIntercept(used[0])) {
    plot = "mean";
  } else if (used.length === 1) {
    const column = design.columns[used[0]];
    const part = column.parts[0];
    if (column.parts.length !== 1 || part.level !== undefined || design.variables.get(part.variable)?.kind !== "numeric" || inInteraction(part.variable)) return undefined;
    plot = "covariate";
    variable = part.variable;
  } else {
    return undefined;
  }
  const kept = (j: number) => isIntercept(j) || (variable !== null && design.columns[j].parts.length === 1 && design.columns[j].parts[0].variable === variable);
  const nuisance = design.columns.map((_, j) => !kept(j));
  const adjustedFor: string[] = [];
  design.columns.forEach((column, j) => {
    if (!nuisance[j]) return;
    for (const part of column.parts) if (!adjustedFor.includes(part.variable)) adjustedFor.push(part.variable);
  });
  return { plot, variable, nuisance, adjustedFor };
}
