import type { Contrast } from "./contrast.js";
import type { DesignMatrix } from "./designMatrix.js";

/**
 * A t contrast that compares two levels of one factor: with treatment coding
 * (the project's coding, model/designMatrix.ts), its vector is +1 or −1 on one
 * level's column (that level against the reference level, which has no
 * column), or +1 on one level's column and −1 on another's, and zero
 * everywhere else. Only a factor that enters the model as a main effect alone
 * qualifies: in an interaction the difference would depend on the other
 * variable's value.
 *
 * `firstRow` and `secondRow` are design rows whose difference is the contrast:
 * the mean of X's rows over the analysed participants with the factor's
 * columns set to the level (numeric covariates at their means, the other
 * factors at their observed proportions). x'β̂ at each row is that level's
 * model mean (the average prediction with every participant set to the level).
 */
export interface LevelComparison {
  variable: string;
  /** The level the contrast counts positively (e.g. patient in group[patient] − group[control]). */
  first: string;
  second: string;
  firstRow: Float64Array;
  secondRow: Float64Array;
}

export function levelComparison(contrast: Contrast, design: DesignMatrix): LevelComparison | undefined {
  if (contrast.kind !== "t") return undefined;
  const vector = contrast.vector;
  const used: number[] = [];
  for (let j = 0; j < vector.length; j++) if (vector[j] !== 0) used.push(j);
  if (used.length < 1 || used.length > 2) return undefined;
  const variableOf = (j: number): string | undefined => {
    const column = design.columns[j];
    if (column.parts.length !== 1 || column.parts[0].level === undefined) return undefined;
    if (design.formula.terms[column.term]?.length !== 1) return undefined;
    return column.parts[0].variable;
  };
  const variable = variableOf(used[0]);
  if (variable === undefined || used.some((j) => variableOf(j) !== variable)) return undefined;
  const factor = design.variables.get(variable);
  if (!factor || factor.kind !== "factor") return undefined;
  if (design.formula.terms.some((term) => term.length > 1 && term.includes(variable))) return undefined;
  const levelColumns = new Map<string, number>();
  design.columns.forEach((column, j) => {
    if (column.parts.length === 1 && column.parts[0].variable === variable && column.parts[0].level !== undefined && design.formula.terms[column.term]?.length === 1) {
      levelColumns.set(column.parts[0].level, j);
    }
  });
  const levelOf = (j: number): string => design.columns[j].parts[0].level!;
  let first: string;
  let second: string;
  if (used.length === 1) {
    const reference = factor.levels.find((level) => !levelColumns.has(level));
    if (reference === undefined || Math.abs(vector[used[0]]) !== 1) return undefined;
    [first, second] = vector[used[0]] > 0 ? [levelOf(used[0]), reference] : [reference, levelOf(used[0])];
  } else {
    const [a, b] = used;
    if (vector[a] === 1 && vector[b] === -1) [first, second] = [levelOf(a), levelOf(b)];
    else if (vector[a] === -1 && vector[b] === 1) [first, second] = [levelOf(b), levelOf(a)];
    else return undefined;
  }
  const { rows, cols, values } = design;
  const mean = new Float64Array(cols);
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) mean[j] += values[i * cols + j];
  for (let j = 0; j < cols; j++) mean[j] /= rows;
  const rowAt = (level: string): Float64Array => {
    const row = Float64Array.from(mean);
    for (const [name, j] of levelColumns) row[j] = name === level ? 1 : 0;
    return row;
  };
  return { variable, first, second, firstRow: rowAt(first), secondRow: rowAt(second) };
}
