import { InputError, type InputLocation } from "../errors.js";
import type { Formula } from "./formula.js";
import { collinearColumnNames, rankReport } from "./rank.js";
import type { Variable } from "./variables.js";

/** One factor of a design column's name: a numeric variable, or a factor at one level. */
export interface ColumnPart {
  variable: string;
  level?: string;
}

export interface DesignColumn {
  /** `intercept`, `age`, `group[patient]`, `group[patient]:age`. */
  name: string;
  parts: ColumnPart[];
  /** Index of the formula term this column codes (-1 for the intercept). */
  term: number;
}

/** The design matrix X (subjects × columns, row-major) with what each column means. */
export interface DesignMatrix {
  rows: number;
  cols: number;
  values: Float64Array;
  columns: DesignColumn[];
  variables: Map<string, Variable>;
  /** The factors' reference levels, for reading contrasts (`group[control]` is 0). */
  formula: Formula;
}

/** Residual degrees of freedom n − p of the model (X has full column rank: buildDesignMatrix checks it). */
export function residualDf(matrix: Pick<DesignMatrix, "rows" | "cols">): number {
  return matrix.rows - matrix.cols;
}

export function columnName(parts: ColumnPart[]): string {
  return parts.map((p) => (p.level === undefined ? p.variable : `${p.variable}[${p.level}]`)).join(":");
}

/**
 * Builds X with treatment coding (the first level is the reference). Without
 * an intercept, the first factor main effect is coded with every level, so the
 * column space is unchanged (the usual convention of linear-model software).
 * Interactions multiply the treatment-coded columns of their variables.
 */
export function buildDesignMatrix(
  formula: Formula,
  variables: Map<string, Variable>,
  rows: number,
  modelKey: InputLocation,
): DesignMatrix {
  const columns: DesignColumn[] = [];
  const data: Float64Array[] = [];
  if (formula.intercept) {
    columns.push({ name: "intercept", parts: [], term: -1 });
    data.push(new Float64Array(rows).fill(1));
  }
  let fullCodingAvailable = !formula.intercept;
  formula.terms.forEach((term, termIndex) => {
    // Each variable contributes a list of (part, vector) options; the term's columns are their products.
    let combos: { parts: ColumnPart[]; vector: Float64Array }[] = [{ parts: [], vector: new Float64Array(rows).fill(1) }];
    for (const name of term) {
      const variable = variables.get(name);
      if (!variable) throw new InputError(`the model uses '${name}', which is not a column of the participants table`, modelKey);
      const options: { part: ColumnPart; vector: Float64Array }[] = [];
      if (variable.kind === "numeric") {
        options.push({ part: { variable: name }, vector: variable.values });
      } else {
        const full = term.length === 1 && fullCodingAvailable;
        if (full) fullCodingAvailable = false;
        variable.levels.forEach((level, k) => {
          if (k === 0 && !full) return;
          options.push({ part: { variable: name, level }, vector: Float64Array.from(variable.codes, (c) => (c === k ? 1 : 0)) });
        });
      }
      const next: typeof combos = [];
      for (const combo of combos) {
        for (const option of options) {
          const vector = new Float64Array(rows);
          for (let i = 0; i < rows; i++) vector[i] = combo.vector[i] * option.vector[i];
          next.push({ parts: [...combo.parts, option.part], vector });
        }
      }
      combos = next;
    }
    for (const combo of combos) {
      columns.push({ name: columnName(combo.parts), parts: combo.parts, term: termIndex });
      data.push(combo.vector);
    }
  });
  const cols = columns.length;
  const values = new Float64Array(rows * cols);
  for (let j = 0; j < cols; j++) for (let i = 0; i < rows; i++) values[i * cols + j] = data[j][i];

  if (rows <= cols) {
    throw new InputError(
      `the model has ${cols} columns but only ${rows} subjects are kept; it needs more subjects than columns to estimate the error variance`,
      modelKey,
    );
  }
  const notFinite = columns.findIndex((_, j) => data[j].some((v) => !Number.isFinite(v)));
  if (notFinite >= 0) {
    throw new InputError(`the design column '${columns[notFinite].name}' has a value that is not a finite number`, modelKey);
  }
  // Sums of squares and cross-products that overflow would make the rank check see a zero column (and the
  // fit a non-finite one): name the column whose values are too large instead.
  const overflowing = overflowingCrossProduct(data);
  if (overflowing) {
    const [a, b] = overflowing.map((j) => columns[j].name);
    throw new InputError(
      a === b
        ? `the design column '${a}' has values so large that their sum of squares is not a finite number in double precision`
        : `the design columns '${a}' and '${b}' have values so large that the sum of their products is not a finite number in double precision`,
      modelKey,
      "give the variables in other units so that their values are smaller (model cells must be below 1e150 in magnitude)",
    );
  }
  const report = rankReport(values, rows, cols);
  if (report.rank < cols) {
    const sets = collinearColumnNames(report, columns.map((column) => column.name));
    throw new InputError(
      `the design is rank-deficient (rank ${report.rank} of ${cols} columns): ${sets
        .map((s) => (s.includes(",") ? `columns ${s} are collinear` : `column ${s} is zero or constant-duplicate`))
        .join("; ")}`,
      modelKey,
      "remove one of the collinear columns from the model, or check that every factor level combination has subjects",
    );
  }
  return { rows, cols, values, columns, variables, formula };
}

/**
 * The first design column whose sum of squares is not finite, as [j, j], else
 * the first pair (j < k) whose cross-product Σ x_j·x_k (an entry of X'X) is
 * not finite, or undefined when every entry of X'X is finite.
 */
function overflowingCrossProduct(data: Float64Array[]): [number, number] | undefined {
  const crossProduct = (a: Float64Array, b: Float64Array): number => {
    let sum = 0;
    for (let i = 0; i < a.length; i++) sum += a[i] * b[i];
    return sum;
  };
  for (let j = 0; j < data.length; j++) if (!Number.isFinite(crossProduct(data[j], data[j]))) return [j, j];
  for (let j = 0; j < data.length; j++) {
    for (let k = j + 1; k < data.length; k++) if (!Number.isFinite(crossProduct(data[j], data[k]))) return [j, k];
  }
  return undefined;
}
