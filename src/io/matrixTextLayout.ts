import { InputError } from "../errors.js";
import { isNumberCell, isTextCell, readCell, splitCells, type CellSeparator, type TextCell } from "./delimitedCells.js";
import { printable } from "./printable.js";

/**
 * Where a text matrix keeps its region labels, told from numbers and text in
 * its first two non-blank lines (the rule the README states):
 * - Separator: commas when the first non-blank line has a comma outside double
 *   quotes, else runs of spaces and tabs. In a file without commas whose first
 *   line has a tab, the header's cells and each row's label end at a tab (so
 *   labels may hold spaces); numbers are separated by spaces or tabs either way.
 * - Header row: the first line is one when a cell after its first is text
 *   (quoted, or not a number), or, with commas, when its first cell is empty
 *   ("" counts as empty). Its cells must then all be text, except after an
 *   empty first cell.
 * - Label column: there is one when the header's first cell is empty (a corner
 *   cell, as pandas writes it; labels may then be numbers), or when the first
 *   row of numbers begins with text.
 * - With a header and a label column, the header holds N labels, or a corner
 *   cell (empty or any text) and N labels.
 */
export interface MatrixTextLayout {
  /** How numbers are separated: commas, or runs of spaces and tabs. */
  commaSeparated: boolean;
  /** How header cells and labels are separated. */
  labelSeparator: CellSeparator;
  /** The header row, when there is one: its line and cells (split at `labelSeparator`). */
  header?: { line: number; cells: TextCell[] };
  labelColumn: boolean;
  /** The header's first cell is empty: a corner cell above the label column; labels may then be numbers. */
  emptyCorner: boolean;
  /** Index in the text where the rows of numbers begin (after the header line), and the lines before it. */
  bodyStart: number;
  linesBefore: number;
  /** Why there is a label column: the first row's line and its first cell (absent when an empty corner says so). */
  labelColumnReason?: { line: number; label: string };
  /** Why there is none: the first row's line (absent without rows). */
  plainFirstRowLine?: number;
}

/** The lines of text from `pos` on: [start, stop) without its line end, `next` past it. */
function contentLine(text: string, pos: number, line: number): { start: number; stop: number; next: number; line: number } | undefined {
  const end = text.length;
  while (pos < end) {
    line++;
    let lineEnd = text.indexOf("\n", pos);
    if (lineEnd < 0) lineEnd = end;
    let stop = lineEnd;
    if (stop > pos && text.charCodeAt(stop - 1) === 13) stop--;
    let p = pos;
    while (p < stop && (text.charCodeAt(p) === 32 || text.charCodeAt(p) === 9)) p++;
    if (p < stop) return { start: pos, stop, next: lineEnd + 1, line };
    pos = lineEnd + 1;
  }
  return undefined;
}

/** Whether text[start, stop) has a comma outside double quotes. */
function hasUnquotedComma(text: string, start: number, stop: number): boolean {
  let quoted = false;
  for (let p = start; p < stop; p++) {
    const c = text.charCodeAt(p);
    if (c === 34) quoted = !quoted;
    else if (c === 44 && !quoted) return true;
  }
  return false;
}

/**
 * How the matrix text from `begin` on is laid out. Reads at most its first two
 * non-blank lines. A header row that mixes labels and numbers is an InputError
 * that explains the rule; so is a quote left open.
 */
export function detectMatrixLayout(text: string, begin: number, file: string): MatrixTextLayout {
  const first = contentLine(text, begin, 0);
  const plain: MatrixTextLayout = { commaSeparated: false, labelSeparator: "whitespace", labelColumn: false, emptyCorner: false, bodyStart: begin, linesBefore: 0 };
  if (!first) return plain;
  const commaSeparated = hasUnquotedComma(text, first.start, first.stop);
  const numberSeparator: CellSeparator = commaSeparated ? "comma" : "whitespace";
  const labelSeparator: CellSeparator = commaSeparated ? "comma" : text.slice(first.start, first.stop).includes("\t") ? "tab" : "whitespace";
  const cells = splitCells(text, first.start, first.stop, numberSeparator, file, first.line);
  const isHeader =
    cells.length >= 2 && (cells.slice(1).some(isTextCell) || (commaSeparated && cells[0].text === ""));
  const bodyBeforeFirst = { commaSeparated, labelSeparator, emptyCorner: false, bodyStart: first.start, linesBefore: first.line - 1 };
  if (!isHeader) {
    const labelled = cells.length > 0 && isTextCell(cells[0]);
    return {
      ...bodyBeforeFirst,
      labelColumn: labelled,
      ...(labelled ? { labelColumnReason: { line: first.line, label: cells[0].text } } : { plainFirstRowLine: first.line }),
    };
  }

  const headerCells = labelSeparator === numberSeparator ? cells : splitCells(text, first.start, first.stop, labelSeparator, file, first.line);
  const emptyCorner = headerCells[0].text === "";
  if (!emptyCorner) {
    const number = headerCells.find(isNumberCell);
    if (number) {
      const label = headerCells.find(isTextCell)!;
      throw new InputError(
        `line ${first.line} mixes text and numbers: its cell ${label.column} ('${shortCell(label.text)}') is not a number, so the line is read as a header row of region labels, ` +
          `but its cell ${number.column} ('${shortCell(number.text)}') is a number`,
        { file, line: first.line, column: label.column },
        "a header row holds labels only (quote a label that is a number, or leave the first cell empty above a label column); " +
          `if this line is the matrix's first row, correct cell ${label.column}`,
      );
    }
  }
  const header = { line: first.line, cells: headerCells };
  const afterHeader = { commaSeparated, labelSeparator, header, emptyCorner, bodyStart: first.next, linesBefore: first.line };
  const row = contentLine(text, first.next, first.line);
  if (!row) return { ...afterHeader, labelColumn: emptyCorner };
  let p = row.start;
  while (p < row.stop && (text.charCodeAt(p) === 32 || text.charCodeAt(p) === 9)) p++;
  const firstCell = readCell(text, p, row.stop, numberSeparator, { file, line: row.line, column: 1 });
  if (emptyCorner) return { ...afterHeader, labelColumn: true };
  const labelled = isTextCell(firstCell);
  return {
    ...afterHeader,
    labelColumn: labelled,
    ...(labelled ? { labelColumnReason: { line: row.line, label: firstCell.text } } : { plainFirstRowLine: row.line }),
  };
}

/** Whether a header of `cells` cells fits rows of `size` numbers: N labels, or with a label column a corner and N labels. */
export function headerFits(layout: MatrixTextLayout, size: number): boolean {
  const count = layout.header!.cells.length;
  return count === size || (layout.labelColumn && count === size + 1);
}

/** The header's cells that are labels (the corner cell left out). */
export function headerLabelCells(layout: MatrixTextLayout, size: number): TextCell[] {
  const cells = layout.header!.cells;
  return layout.labelColumn && cells.length === size + 1 ? cells.slice(1) : cells;
}

/** The error for a header that does not fit rows of `size` numbers. */
export function headerCountError(layout: MatrixTextLayout, size: number, file: string): InputError {
  const header = layout.header!;
  const count = header.cells.length;
  const rows = layout.labelColumn ? `the rows hold ${size} number${size === 1 ? "" : "s"} after their label` : `the rows hold ${size} number${size === 1 ? "" : "s"}`;
  const expected = layout.labelColumn ? `${size} labels, or a corner cell and ${size} labels` : `${size} labels, one above each column of numbers`;
  return new InputError(
    `the header row has ${count} cell${count === 1 ? "" : "s"} but ${rows}; a header row holds ${expected}`,
    { file, line: header.line },
    layout.labelColumn
      ? undefined
      : "if each row begins with a label that is a number, leave the header's first cell empty (a corner cell) or quote the labels",
  );
}

/** A cell's text for a message: control characters escaped, long text cut. */
export function shortCell(text: string): string {
  const cut = text.length > 40 ? `${text.slice(0, 40)}…` : text;
  return printable(cut);
}

/** "comma-separated, header row and label column", for `plexus check`. */
export function describeLayout(layout: MatrixTextLayout): string {
  const separator = layout.commaSeparated ? "comma-separated" : layout.labelSeparator === "tab" ? "tab-separated" : "whitespace-separated";
  const parts = [layout.header ? "header row" : "", layout.labelColumn ? "label column" : ""].filter((part) => part !== "");
  return parts.length > 0 ? `${separator}, ${parts.join(" and ")}` : separator;
}
