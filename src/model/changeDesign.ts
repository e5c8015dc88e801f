import { InputError, type InputLocation } from "../errors.js";
import { columnName, type DesignColumn, type DesignMatrix } from "./designMatrix.js";
import { collinearColumnNames, rankReport } from "./rank.js";

/**
 * The change model of a two-level repeated design (paired differences): the
 * long-form design (one row per scan, the within factor coded with its first
 * level as reference) becomes a design over persons whose response is each
 * person's difference, second level minus first. Under a long-form model with
 * a random person intercept, E[y₂ − y₁] is the within factor's coefficient
 * plus its interactions with person-level variables, so:
 *   - the within factor's column becomes the change model's intercept;
 *   - every between-person column (and the person-level part of an
 *     interaction with the within factor) becomes a column of the change
 *     model, testing a difference in change (group × time);
 *   - the long-form intercept (the mean level over scans) cancels and
 *     cannot be tested.
 * Between-person columns are centred over persons, so the intercept is the
 * mean change at the covariates' means (their other coefficients are
 * unchanged by centring).
 */
export interface FittedDesign {
  matrix: DesignMatrix;
  /** For each long-form column, the fitted column it maps to, or −1 when it cannot be tested in this design. */
  target: Int32Array;
  /** Each fitted column's mean over persons that was subtracted (0 for the intercept). */
  centres: number[];
}

/** Whether a long-form column involves the within factor. */
function involves(column: DesignColumn, within: string): boolean {
  return column.parts.some((part) => part.variable === within);
}

/**
 * @param long      the long-form design, rows = the kept scans
 * @param first     per person, the long-form row of the first level's scan
 * @param second    per person, the long-form row of the second level's scan
 * @param levels    the within factor's two levels, in order
 */
export function changeDesign(long: DesignMatrix, first: Int32Array, second: Int32Array, within: string, levels: [string, string], modelKey: InputLocation): FittedDesign {
  const persons = first.length;
  const target = new Int32Array(long.cols).fill(-1);
  const columns: DesignColumn[] = [{ name: `${within}[${levels[1]}] - ${within}[${levels[0]}]`, parts: [], term: -1 }];
  const data: Float64Array[] = [new Float64Array(persons).fill(1)];
  const byName = new Map<string, number>();
  long.columns.forEach((column, j) => {
    if (column.parts.length === 0) return; // the intercept: cancels in a difference
    const personParts = column.parts.filter((part) => part.variable !== within);
    if (involves(column, within) && personParts.length === 0) {
      target[j] = 0;
      return;
    }
    const name = columnName(personParts);
    let k = byName.get(name);
    if (k === undefined) {
      k = columns.length;
      byName.set(name, k);
      columns.push({ name, parts: personParts, term: column.term });
      // A between-person column is constant over a person's scans; an interaction with the within factor is its
      // person-level part at the second level's row (the within factor's indicator is 1 there).
      const rows = involves(column, within) ? second : first;
      data.push(Float64Array.from(rows, (row) => long.values[row * long.cols + j]));
    }
    target[j] = k;
  });
  const centres = data.map((values, k) => {
    if (k === 0) return 0;
    let sum = 0;
    for (const v of values) sum += v;
    const centre = sum / persons;
    for (let p = 0; p < persons; p++) values[p] -= centre;
    return centre;
  });
  return { matrix: assemble(long, columns, data, persons, modelKey, "participants"), target, centres };
}

/** A DesignMatrix from columns, with the checks of buildDesignMatrix that apply (more rows than columns, full rank). */
export function assemble(long: DesignMatrix, columns: DesignColumn[], data: Float64Array[], rows: number, modelKey: InputLocation, unit: string): DesignMatrix {
  const cols = columns.length;
  if (rows <= cols) {
    throw new InputError(
      `the model fitted has ${cols} columns but only ${rows} ${unit}; it needs more ${unit} than columns to estimate the error variance`,
      modelKey,
    );
  }
  const values = new Float64Array(rows * cols);
  for (let j = 0; j < cols; j++) for (let i = 0; i < rows; i++) values[i * cols + j] = data[j][i];
  const report = rankReport(values, rows, cols);
  if (report.rank < cols) {
    const sets = collinearColumnNames(report, columns.map((column) => column.name));
    throw new InputError(
      `the model fitted to the repeated scans is rank-deficient (rank ${report.rank} of ${cols} columns): ${sets
        .map((s) => (s.includes(",") ? `columns ${s} are collinear` : `column ${s} is zero or constant`))
        .join("; ")}`,
      modelKey,
      "remove the column from the model (a column constant over every participant's change, or a between-person column in a design of three or more levels, cannot be estimated)",
    );
  }
  return { rows, cols, values, columns, variables: long.variables, formula: long.formula };
}

/**
 * A contrast over the long-form columns carried to the fitted columns: the
 * vector, or the long-form columns it weights that the fitted design cannot test.
 */
export function mapContrastRow(row: Float64Array, target: Int32Array, fittedCols: number): { vector: Float64Array; untestable: number[] } {
  const vector = new Float64Array(fittedCols);
  const untestable: number[] = [];
  row.forEach((w, j) => {
    if (w === 0) return;
    if (target[j] < 0) untestable.push(j);
    else vector[target[j]] += w;
  });
  return { vector, untestable };
}
