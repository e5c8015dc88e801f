import { InputError } from "../errors.js";
import { listCells, type LocatedCell } from "./cellList.js";
import type { ParticipantsTable } from "./participants.js";
import { printable } from "./printable.js";

/**
 * What a (non-missing) participants cell holds: a finite decimal number, a
 * number that is not finite (`1e400` overflows; `Infinity`, `-inf`, `NaN`
 * when not a missing-value code), or text.
 */
export type CellKind = "number" | "non-finite" | "text";

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const NON_FINITE_WORD = /^[+-]?(inf|infinity|nan)$/i;

export function cellKind(cell: string): CellKind {
  if (DECIMAL.test(cell)) return Number.isFinite(Number(cell)) ? "number" : "non-finite";
  return NON_FINITE_WORD.test(cell) ? "non-finite" : "text";
}

/**
 * Checks the model's columns before they are coded. A column not listed under
 * `levels:` is numeric when at least one of its non-missing cells is a number;
 * then every other non-missing cell must be a finite number too. A cell that
 * is not finite is an error in any column not under `levels:`. Every bad cell
 * of every column is reported in one error (up to 10 listed,
 * the rest counted), each as file:line:column.
 */
export function checkModelColumns(table: ParticipantsTable, columns: string[], factorsByChoice: Set<string>): void {
  const problems: (LocatedCell & { name: string })[] = [];
  for (const name of columns) {
    if (factorsByChoice.has(name)) continue;
    const cells = table.columns.get(name)!;
    const column = table.header.indexOf(name) + 1;
    const kinds = cells.map((cell) => (cell === null ? null : cellKind(cell)));
    const numeric = kinds.some((k) => k === "number" || k === "non-finite");
    kinds.forEach((kind, row) => {
      if (kind === "non-finite" || (numeric && kind === "text")) {
        const note = kind === "non-finite" ? " (not a finite number)" : "";
        problems.push({ line: table.lines[row], column, name, text: `${name} '${printable(cells[row]!)}'${note}` });
      }
    });
  }
  if (problems.length === 0) return;
  const names = [...new Set(problems.map((p) => p.name))];
  const listed = listCells(table.file, problems);
  throw new InputError(
    `${problems.length} cell${problems.length > 1 ? "s" : ""} of the numeric model column${names.length > 1 ? "s" : ""} ${names
      .map((n) => `'${n}'`)
      .join(", ")} ${problems.length > 1 ? "are" : "is"} not a finite number:${listed}`,
    { file: table.file, line: problems[0].line, column: problems[0].column },
    "fix these cells, add their text to `missing_values:` if it marks a missing value, or list the column under `levels:` to treat it as a factor",
  );
}
