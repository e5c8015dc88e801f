import { InputError } from "../errors.js";
import { cellKind } from "./numericCells.js";

/**
 * The cells of one line of a delimited text file (a labelled matrix's header
 * row and label column, a participants × edges table), as spreadsheets and
 * Python's csv module write them:
 * - "comma": a comma ends a cell; "tab": a tab ends a cell; "whitespace": a
 *   run of spaces and tabs ends a cell (and the line's leading and trailing
 *   runs are no cells).
 * - Spaces (and, for commas, tabs) around a cell are trimmed.
 * - A cell that begins with a double quote is quoted: it runs to the closing
 *   quote, a doubled quote inside standing for one, and may hold the
 *   separator; only spaces may follow the closing quote before the separator.
 *   A quoted cell is text even when it reads as a number, and its content is
 *   trimmed too. A quote cannot span lines.
 */
export type CellSeparator = "comma" | "tab" | "whitespace";

export interface TextCell {
  text: string;
  quoted: boolean;
  /** 1-based place of the cell on its line. */
  column: number;
}

/** A cell read from `start` on: its text and where it ends (at its separator, or at the line's end). */
export interface CellSpan {
  text: string;
  quoted: boolean;
  end: number;
}

const TAB = 9;
const SPACE = 32;
const QUOTE = 34;
const COMMA = 44;

/** Whether the character code is the separator itself (for whitespace: a space or a tab). */
export function isSeparator(c: number, separator: CellSeparator): boolean {
  return separator === "comma" ? c === COMMA : separator === "tab" ? c === TAB : c === SPACE || c === TAB;
}

/** Spaces and tabs around cells, except a tab where a tab separates cells. */
function isPadding(c: number, separator: CellSeparator): boolean {
  return c === SPACE || (c === TAB && separator !== "tab");
}

/** Text with spaces and tabs removed from both ends. */
export function trimCell(text: string): string {
  let start = 0;
  let end = text.length;
  while (start < end && (text.charCodeAt(start) === SPACE || text.charCodeAt(start) === TAB)) start++;
  while (end > start && (text.charCodeAt(end - 1) === SPACE || text.charCodeAt(end - 1) === TAB)) end--;
  return start === 0 && end === text.length ? text : text.slice(start, end);
}

/**
 * The cell that starts at text[start] (padding before it skipped) on the line
 * ending at `stop`. A quote left open, or text after a closing quote, is an
 * InputError at file:line:column.
 */
export function readCell(
  text: string,
  start: number,
  stop: number,
  separator: CellSeparator,
  where: { file: string; line: number; column: number },
): CellSpan {
  let p = start;
  while (p < stop && isPadding(text.charCodeAt(p), separator)) p++;
  if (p < stop && text.charCodeAt(p) === QUOTE) {
    let content = "";
    let q = p + 1;
    for (;;) {
      const close = text.indexOf('"', q);
      if (close < 0 || close >= stop) {
        throw new InputError(`cell ${where.column} opens a double quote that the line does not close`, where, 'a quoted cell ends with a double quote on the same line; write a quote inside it as ""');
      }
      content += text.slice(q, close);
      if (close + 1 < stop && text.charCodeAt(close + 1) === QUOTE) {
        content += '"';
        q = close + 2;
        continue;
      }
      q = close + 1;
      break;
    }
    // Padding after the closing quote, up to the separator (for whitespace, the padding is the separator).
    if (separator !== "whitespace") while (q < stop && isPadding(text.charCodeAt(q), separator)) q++;
    if (q < stop && !isSeparator(text.charCodeAt(q), separator)) {
      throw new InputError(`cell ${where.column} has text after its closing double quote`, where, 'a quoted cell ends with a double quote; write a quote inside it as ""');
    }
    return { text: trimCell(content), quoted: true, end: q };
  }
  let end = p;
  while (end < stop && !isSeparator(text.charCodeAt(end), separator)) end++;
  return { text: trimCell(text.slice(p, end)), quoted: false, end };
}

/** Every cell of the line text[start, stop). */
export function splitCells(text: string, start: number, stop: number, separator: CellSeparator, file: string, line: number): TextCell[] {
  const cells: TextCell[] = [];
  let p = start;
  const skipRun = (): void => {
    while (p < stop && isSeparator(text.charCodeAt(p), "whitespace")) p++;
  };
  if (separator === "whitespace") skipRun();
  if (p === stop && separator === "whitespace") return cells;
  for (;;) {
    const column = cells.length + 1;
    const cell = readCell(text, p, stop, separator, { file, line, column });
    cells.push({ text: cell.text, quoted: cell.quoted, column });
    p = cell.end;
    if (separator === "whitespace") {
      skipRun();
      if (p === stop) return cells;
    } else {
      if (p >= stop) return cells;
      p++; // the separator; a separator at the end of the line leaves one empty cell after it
    }
  }
}

/** A cell that reads as a number (a decimal, or nan / inf / infinity with an optional sign), unquoted. */
export function isNumberCell(cell: { text: string; quoted: boolean }): boolean {
  return !cell.quoted && cell.text !== "" && cellKind(cell.text) !== "text";
}

/** A cell that is text: quoted, or neither empty nor a number. */
export function isTextCell(cell: { text: string; quoted: boolean }): boolean {
  return cell.quoted || (cell.text !== "" && cellKind(cell.text) === "text");
}
