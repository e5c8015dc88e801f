/** A cell of a table to show in an error, with the text to print after its place. */
export interface LocatedCell {
  line: number;
  column: number;
  text: string;
}

/** At most this many cells are listed in one message; the rest are counted. */
export const LISTED_CELLS_LIMIT = 10;

/**
 * Sorts the cells by line and column (in place) and lists the first
 * LISTED_CELLS_LIMIT as `file:line:column text`, one an indented line, then a
 * count of the rest: every bad cell of a kind reported in one message.
 */
export function listCells(file: string, cells: LocatedCell[]): string {
  cells.sort((a, b) => a.line - b.line || a.column - b.column);
  const listed = cells.slice(0, LISTED_CELLS_LIMIT).map((c) => `\n    ${file}:${c.line}:${c.column} ${c.text}`);
  const rest = cells.length - listed.length;
  return listed.join("") + (rest > 0 ? `\n    … and ${rest} more` : "");
}
