import { stringify } from "csv-stringify/sync";

/**
 * Tab-separated tables for the results folder. Numbers are written in their
 * shortest round-trip form (ECMAScript Number::toString, which reads back to
 * the same double), non-finite numbers as empty cells, and text cells that a
 * spreadsheet would run as a formula (leading =, +, -, @, tab or carriage
 * return; OWASP "CSV injection" guidance) are prefixed with a single quote,
 * unless they read as a plain number.
 */
export type Cell = string | number | null | undefined;

const FORMULA_START = /^[=+\-@\t\r]/;
const PLAIN_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export function neutralizeText(text: string): string {
  if (FORMULA_START.test(text) && !PLAIN_NUMBER.test(text)) return `'${text}`;
  return text;
}

export function formatNumber(value: number): string {
  return Number.isFinite(value) ? String(value) : "";
}

function formatCell(cell: Cell): string {
  if (cell === null || cell === undefined) return "";
  if (typeof cell === "number") return formatNumber(cell);
  return neutralizeText(cell);
}

export function formatTsv(header: string[], rows: Cell[][]): string {
  const records = [header, ...rows.map((row) => row.map(formatCell))];
  // Tabs and newlines inside a cell would break the table; csv-stringify quotes such cells.
  return stringify(records, { delimiter: "\t", record_delimiter: "\n", quoted_match: /[\t\n\r"]/ });
}
