/**
 * The text a results-table cell stood for before the writer protected it
 * (src/output/tsvWriter.ts): a cell the writer quoted because it held a tab,
 * newline or double quote is unquoted, and the single quote put in front of a
 * would-be spreadsheet formula (=, +, -, @, tab, carriage return) is removed.
 * A value that itself began with a quote before such a character comes back
 * without it: the writer's output cannot tell the two apart.
 */
const PROTECTED = /^'[=+\-@\t\r]/;
const PLAIN_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export function tsvCellText(cell: string): string {
  let text = cell;
  if (text.length >= 2 && text.startsWith('"') && text.endsWith('"')) text = text.slice(1, -1).replaceAll('""', '"');
  if (PROTECTED.test(text) && !PLAIN_NUMBER.test(text.slice(1))) text = text.slice(1);
  return text;
}
