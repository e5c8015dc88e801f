import { InputError } from "../errors.js";
import { listCells, type LocatedCell } from "./cellList.js";
import type { ParticipantsTable } from "./participants.js";
import { printable } from "./printable.js";

/**
 * What a (non-missing) participants cell holds: a finite decimal number, a
 * number too large in magnitude for the model (at least HUGE_MAGNITUDE), a
 * number that is not finite (`1e400` overflows; `Infinity`, `-inf`, `NaN`
 * when not a missing-value code), or text.
 */
export type CellKind = "number" | "huge" | "non-finite" | "text";

/**
 * The least magnitude of a model cell that is refused: its square (which the
 * model's sums of squares and cross-products take) would reach 1e300, within
 * a few orders of double precision's largest number (about 1.8e308), so a sum
 * over subjects or a product with another column could overflow.
 */
export const HUGE_MAGNITUDE = 1e150;

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const NON_FINITE_WORD = /^[+-]?(inf|infinity|nan)$/i;

export function cellKind(cell: string): CellKind {
  if (DECIMAL.test(cell)) {
    const value = Number(cell);
    return !Number.isFinite(value) ? "non-finite" : Math.abs(value) >= HUGE_MAGNITUDE ? "huge" : "number";
  }
  return NON_FINITE_WORD.test(cell) ? "non-finite" : "text";
}

type ColumnCell = LocatedCell & { name: string };

/**
 * Checks the model's columns before they are coded. A column not listed under
 * `levels:` is numeric when at least one of its non-missing cells is a number;
 * then every other non-missing cell must be a finite number too. A cell that
 * is not finite is an error in any column not under `levels:`, and so is a
 * number of magnitude HUGE_MAGNITUDE or more. The bad cells of every column
 * are reported in one error per kind (up to 10 listed, the rest counted), each
 * as file:line:column; empty when there are none.
 */
export function modelColumnProblems(table: ParticipantsTable, columns: string[], factorsByChoice: Set<string>): InputError[] {
  const notFinite: ColumnCell[] = [];
  const huge: ColumnCell[] = [];
  for (const name of columns) {
    if (factorsByChoice.has(name)) continue;
    const cells = table.columns.get(name)!;
    const column = table.header.indexOf(name) + 1;
    const kinds = cells.map((cell) => (cell === null ? null : cellKind(cell)));
    const numeric = isNumericColumn(cells);
    kinds.forEach((kind, row) => {
      const at = { line: table.lines[row], column, name };
      if (kind === "non-finite" || (numeric && kind === "text")) {
        const note = kind === "non-finite" ? " (not a finite number)" : "";
        notFinite.push({ ...at, text: `${name} '${printable(cells[row]!)}'${note}` });
      } else if (kind === "huge") {
        huge.push({ ...at, text: `${name} '${printable(cells[row]!)}'` });
      }
    });
  }
  const problems: InputError[] = [];
  if (notFinite.length > 0) {
    problems.push(
      cellsError(
        table.file,
        notFinite,
        "not a finite number",
        "fix these cells, add their text to `missing_values:` if it marks a missing value, or list the column under `levels:` to treat it as a factor",
      ),
    );
  }
  if (huge.length > 0) {
    problems.push(
      cellsError(
        table.file,
        huge,
        "too large for the model (magnitude 1e150 or more: its square would overflow double precision)",
        "fix these cells, or give the column in other units so that its values are smaller",
      ),
    );
  }
  return problems;
}

function cellsError(file: string, cells: ColumnCell[], what: string, hint: string): InputError {
  const names = [...new Set(cells.map((p) => p.name))];
  const listed = listCells(file, cells);
  return new InputError(
    `${cells.length} cell${cells.length > 1 ? "s" : ""} of the numeric model column${names.length > 1 ? "s" : ""} ${names
      .map((n) => `'${n}'`)
      .join(", ")} ${cells.length > 1 ? "are" : "is"} ${what}:${listed}`,
    { file, line: cells[0].line, column: cells[0].column },
    hint,
  );
}

/** True when a column not under `levels:` is numeric: at least one of its non-missing cells is a number (finite or not). */
export function isNumericColumn(cells: readonly (string | null)[]): boolean {
  return cells.some((cell) => cell !== null && cellKind(cell) !== "text");
}
