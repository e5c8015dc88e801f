import { printable } from "./printable.js";

/**
 * Control characters (C0, DEL and C1; ESC, carriage return, NUL, …). A cell
 * holding one would be written raw into the results (subjects.tsv, the tables,
 * the report), where it could move a terminal's cursor or hide text, so IDs,
 * factor levels and region labels holding one are refused when read. Tabs
 * never reach a cell: the table reader splits on them.
 */
const CONTROL_CHARACTER = /[\u0000-\u001f\u007f-\u009f]/;

export function hasControlCharacter(text: string): boolean {
  return CONTROL_CHARACTER.test(text);
}

/** The message for a cell of the named column that holds a control character, or undefined when it holds none. */
export function controlCharacterProblem(column: string, cell: string): string | undefined {
  return hasControlCharacter(cell) ? `${column} '${printable(cell)}' has a control character` : undefined;
}
