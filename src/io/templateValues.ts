import { InputError } from "../errors.js";
import { listCells, type LocatedCell } from "./cellList.js";
import { hasControlCharacter } from "./controlCharacters.js";
import { PARTICIPANT_ID, type ParticipantsTable } from "./participants.js";
import { printable } from "./printable.js";

/**
 * Why a participants cell cannot be put into a path template (it would
 * leave the folder the template names, or hide in a file name), or undefined
 * when it can: no path separator (`/`, `\`), not `.` or `..`, no control character.
 */
export function unsafePathValue(value: string): string | undefined {
  if (hasControlCharacter(value)) return "has a control character";
  if (value.includes("/") || value.includes("\\")) return "has a path separator ('/' or '\\')";
  if (value === "." || value === "..") return `is '${value}'`;
  return undefined;
}

/** The column names a path template's `{column}` placeholders use, in order. */
export function templateColumns(template: string): string[] {
  return [...template.matchAll(/\{([^{}]*)\}/g)].map((m) => m[1]);
}

/**
 * Checks every cell a path template will take from the given rows before any
 * file is opened: every unsafe cell in one error (up to 10 listed), naming the
 * participants file, line and column; null when every value is safe.
 */
export function templateValueProblem(template: string, table: ParticipantsTable, rows: number[], key: string): InputError | null {
  const problems: LocatedCell[] = [];
  for (const name of new Set(templateColumns(template))) {
    const column = table.header.indexOf(name);
    if (column < 0 && name !== PARTICIPANT_ID) continue; // resolveTemplate names an unknown column
    const cells = column < 0 ? table.ids : table.columns.get(name)!;
    for (const row of rows) {
      const value = cells[row];
      if (value === null) continue;
      const reason = unsafePathValue(value);
      if (reason) problems.push({ line: table.lines[row], column: Math.max(column, 0) + 1, text: `${name} '${printable(value)}' ${reason}` });
    }
  }
  if (problems.length === 0) return null;
  const listed = listCells(table.file, problems);
  return new InputError(
    `${problems.length} value${problems.length > 1 ? "s" : ""} of the participants table cannot be put into the path template '${template}' (key '${key}'):${listed}`,
    { file: table.file, line: problems[0].line, column: problems[0].column },
    "a value filled into a path must be a plain file-name part: no '/', '\\', control characters, and not '.' or '..'",
  );
}
