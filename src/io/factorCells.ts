import { InputError } from "../errors.js";
import { controlCharacterProblem } from "./controlCharacters.js";
import { isNumericColumn } from "./numericCells.js";
import { CONTROL_CHARACTER_HINT, type ParticipantsTable } from "./participants.js";
import { printable } from "./printable.js";

/**
 * Checks the cells of the factor columns (those under `levels:`, the model
 * columns without a number in them, and the blocks column) before they are coded:
 * a level with a control character is refused (it would be written raw into
 * the results), and under `levels:` every cell must be one of the levels
 * listed. Every bad cell of every row is one problem, located at its
 * file:line:column.
 */
export function factorCellProblems(
  table: ParticipantsTable,
  modelColumns: string[],
  levels: Record<string, string[]>,
  blockColumn?: string,
): InputError[] {
  const problems: InputError[] = [];
  for (const name of new Set(blockColumn === undefined ? modelColumns : [...modelColumns, blockColumn])) {
    const cells = table.columns.get(name)!;
    const listed = levels[name];
    if (listed === undefined && modelColumns.includes(name) && isNumericColumn(cells)) continue; // numericCells.ts checks its cells
    const column = table.header.indexOf(name) + 1;
    cells.forEach((cell, row) => {
      if (cell === null) return;
      const at = { file: table.file, line: table.lines[row], column };
      const control = controlCharacterProblem(name, cell);
      if (control) {
        problems.push(new InputError(control, at, CONTROL_CHARACTER_HINT));
      } else if (listed !== undefined && !listed.includes(cell)) {
        problems.push(
          new InputError(
            `'${name}' has the value '${printable(cell)}', which is not among the levels given in the design (${listed.join(", ")})`,
            at,
            "add it to `levels:` or correct the participants table",
          ),
        );
      }
    });
  }
  return problems;
}
