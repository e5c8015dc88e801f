import { Buffer } from "node:buffer";

/**
 * Tab-separated tables for the results folder. Numbers are written in their
 * shortest round-trip form (ECMAScript Number::toString, which reads back to
 * the same double), non-finite numbers as empty cells, and text cells that a
 * spreadsheet would run as a formula (leading =, +, -, @, tab or carriage
 * return; OWASP "CSV injection" guidance) are prefixed with a single quote,
 * unless they read as a plain number. A cell holding a tab, newline, carriage
 * return or double quote is put in double quotes, its quotes doubled (RFC 4180
 * quoting, as csv-stringify writes it with those characters as `quoted_match`);
 * every record, the last one too, ends with a newline.
 */
export type Cell = string | number | null | undefined;

const FORMULA_START = /^[=+\-@\t\r]/;
const PLAIN_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const NEEDS_QUOTES = /[\t\n\r"]/;

export function neutralizeText(text: string): string {
  if (FORMULA_START.test(text) && !PLAIN_NUMBER.test(text)) return `'${text}`;
  return text;
}

export function formatNumber(value: number): string {
  return Number.isFinite(value) ? String(value) : "";
}

/** A field's final text: quoted when it holds a tab, newline, carriage return or double quote. */
export function tsvField(text: string): string {
  return NEEDS_QUOTES.test(text) ? `"${text.replaceAll('"', '""')}"` : text;
}

/** A cell as its field in the table (a number's text never needs quotes). */
export function formatCell(cell: Cell): string {
  if (cell === null || cell === undefined) return "";
  if (typeof cell === "number") return formatNumber(cell);
  return tsvField(neutralizeText(cell));
}

/** One record: the fields joined by tabs (the header's names are written as given, only quoted if need be). */
function headerRecord(header: string[]): string {
  return header.map(tsvField).join("\t");
}

/** The table as text: the header, then one record per row, each ending with "\n". */
export function formatTsv(header: string[], rows: Cell[][]): string {
  const records = new Array<string>(rows.length + 1);
  records[0] = headerRecord(header);
  for (let r = 0; r < rows.length; r++) {
    const row = rows[r];
    let record = row.length > 0 ? formatCell(row[0]) : "";
    for (let c = 1; c < row.length; c++) record += "\t" + formatCell(row[c]);
    records[r + 1] = record;
  }
  return records.join("\n") + "\n";
}

/**
 * A long table (one row per edge) written field by field straight into its
 * UTF-8 bytes, which are those of formatTsv's text for the same rows: the
 * caller gives each field as formatCell would (a number as its ASCII text,
 * other fields already as bytes) and the tabs and newlines between them.
 */
export class TsvBytes {
  private bytes: Uint8Array;
  private length = 0;

  constructor(capacity: number) {
    this.bytes = new Uint8Array(Math.max(capacity, 64));
  }

  /** The header record, then a newline. */
  header(names: string[]): void {
    this.field(utf8Field(headerRecord(names)));
    this.newline();
  }

  /** A field given as bytes (see utf8Field). */
  field(bytes: Uint8Array): void {
    this.reserve(bytes.length);
    for (let i = 0; i < bytes.length; i++) this.bytes[this.length++] = bytes[i];
  }

  /** A field of ASCII text only, such as a number's (formatNumber). */
  ascii(text: string): void {
    this.reserve(text.length);
    for (let i = 0; i < text.length; i++) this.bytes[this.length++] = text.charCodeAt(i);
  }

  tab(): void {
    this.reserve(1);
    this.bytes[this.length++] = 0x09;
  }

  newline(): void {
    this.reserve(1);
    this.bytes[this.length++] = 0x0a;
  }

  /** The bytes written so far (a view, not a copy). */
  result(): Uint8Array {
    return this.bytes.subarray(0, this.length);
  }

  private reserve(count: number): void {
    if (this.length + count <= this.bytes.length) return;
    const grown = new Uint8Array(Math.max(2 * this.bytes.length, this.length + count));
    grown.set(this.bytes.subarray(0, this.length));
    this.bytes = grown;
  }
}

/** A field's UTF-8 bytes, as writing the whole text as UTF-8 gives them. */
export function utf8Field(text: string): Uint8Array {
  return Buffer.from(text, "utf8");
}

/**
 * The text of repeated numbers, formatted once each (a column such as q_fdr
 * holds few distinct values); stops remembering past `limit` distinct values.
 * Map keys compare -0 equal to 0, which format alike ("0").
 */
export class NumberTexts {
  private readonly known = new Map<number, string>();
  constructor(private readonly limit = 65536) {}

  text(value: number): string {
    let found = this.known.get(value);
    if (found === undefined) {
      found = formatNumber(value);
      if (this.known.size < this.limit) this.known.set(value, found);
    }
    return found;
  }
}
