import { InputError } from "../errors.js";
import { hasControlCharacter } from "./controlCharacters.js";
import { printable } from "./printable.js";
import { TABLE_FILE_LIMIT_BYTES, readTextInput } from "./readInputFile.js";

/**
 * A tab-separated table with a header row (the layout of BIDS `.tsv` files).
 * Cells are kept as text; `lines[k]` is the 1-based line of `rows[k]` in the file.
 */
export interface TsvTable {
  file: string;
  header: string[];
  rows: string[][];
  lines: number[];
}

/** A parsed table that also knows the line its header was on (blank lines may precede it). */
export interface LocatedTsvTable extends TsvTable {
  headerLine: number;
}

/**
 * Parses tab-separated text whose first non-blank line is the header.
 *
 * Tolerated: a UTF-8 byte-order mark, CRLF line ends, blank (whitespace-only)
 * lines anywhere, and spaces around cells (they are trimmed). A tab is always a
 * separator, so a tab at the end of a line adds an empty last field.
 * Rejected with a located InputError: an empty file, an empty or repeated
 * column name, a column name with a control character, and a row whose field
 * count differs from the header's.
 */
export function parseTsv(text: string, file: string): LocatedTsvTable {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const rawLines = body.split("\n");
  let header: string[] | undefined;
  let headerLine = 0;
  const rows: string[][] = [];
  const lines: number[] = [];

  for (let k = 0; k < rawLines.length; k++) {
    const lineNumber = k + 1;
    const raw = rawLines[k];
    const line = raw.endsWith("\r") ? raw.slice(0, -1) : raw;
    if (isBlank(line)) continue;
    const fields = line.split("\t").map(trimSpaces);

    if (header === undefined) {
      checkHeader(fields, file, lineNumber);
      header = fields;
      headerLine = lineNumber;
      continue;
    }
    if (fields.length !== header.length) {
      const trailingEmpty = fields.length > header.length && fields.slice(header.length).every((f) => f === "");
      throw new InputError(
        `expected ${header.length} tab-separated fields (as in the header on line ${headerLine}) but found ${fields.length}`,
        { file, line: lineNumber },
        trailingEmpty ? "the extra fields are empty: is there a tab at the end of the line?" : undefined,
      );
    }
    rows.push(fields);
    lines.push(lineNumber);
  }

  if (header === undefined) {
    throw new InputError("empty file: expected a header row of tab-separated column names", { file, line: 1 });
  }
  return { file, header, rows, lines, headerLine };
}

/** Reads and parses a tab-separated file; an unreadable file is an InputError naming it. */
export function readTsv(path: string, what = "the table"): LocatedTsvTable {
  return parseTsv(readTableText(path, what), path);
}

/** A table's text: a regular file of at most 256 MiB in valid UTF-8 (see readTextInput). */
export function readTableText(path: string, what = "the table"): string {
  return readTextInput(path, { limitBytes: TABLE_FILE_LIMIT_BYTES, what });
}

function checkHeader(names: string[], file: string, line: number): void {
  const seen = new Map<string, number>();
  for (let c = 0; c < names.length; c++) {
    const name = names[c];
    if (name === "") {
      throw new InputError(`column ${c + 1} of the header has no name`, { file, line, column: c + 1 });
    }
    if (hasControlCharacter(name)) {
      throw new InputError(
        `the column name '${printable(name)}' has a control character`,
        { file, line, column: c + 1 },
        "remove the control character from the header (names are written into the results)",
      );
    }
    const earlier = seen.get(name);
    if (earlier !== undefined) {
      throw new InputError(`duplicate column name '${name}' (also column ${earlier + 1})`, {
        file,
        line,
        column: c + 1,
      });
    }
    seen.set(name, c);
  }
}

function isBlank(line: string): boolean {
  for (let i = 0; i < line.length; i++) {
    const c = line.charCodeAt(i);
    if (c !== 0x20 && c !== 0x09 && c !== 0x0d) return false;
  }
  return true;
}

function trimSpaces(cell: string): string {
  let start = 0;
  let end = cell.length;
  while (start < end && cell.charCodeAt(start) === 0x20) start++;
  while (end > start && cell.charCodeAt(end - 1) === 0x20) end--;
  return start === 0 && end === cell.length ? cell : cell.slice(start, end);
}
