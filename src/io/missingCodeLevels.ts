import { DEFAULT_MISSING_VALUES, type ParticipantsTable } from "./participants.js";
import { printable } from "./printable.js";

/** At most this many lines are named in one warning; the rest are counted. */
const LISTED_LINES = 10;

/**
 * Warnings for factor levels that are default missing-value codes (`n/a`,
 * `NA`, …) which the design's own `missing_values` leaves out: such a cell is
 * read as a level, which is rarely what was meant. One warning per column and
 * level, naming the lines of the given rows (the subjects kept) that hold it.
 */
export function missingCodeLevelWarnings(
  table: ParticipantsTable,
  factorColumns: string[],
  rows: number[],
  missingValues: readonly string[],
): string[] {
  const codes = DEFAULT_MISSING_VALUES.filter((code) => code !== "" && !missingValues.includes(code));
  const warnings: string[] = [];
  for (const name of new Set(factorColumns)) {
    const cells = table.columns.get(name)!;
    for (const code of codes) {
      const lines = rows.filter((row) => cells[row] === code).map((row) => table.lines[row]);
      if (lines.length === 0) continue;
      const shown = lines.slice(0, LISTED_LINES).join(", ") + (lines.length > LISTED_LINES ? `, … (${lines.length} in all)` : "");
      warnings.push(
        `'${printable(name)}' has the level '${code}' in ${lines.length} subject${lines.length > 1 ? "s" : ""} (${table.file} line${lines.length > 1 ? "s" : ""} ${shown}): ` +
          `'${code}' is a missing-value code by default, but this design's missing_values leaves it out, so it is treated as a level; ` +
          `add ${JSON.stringify(code)} to missing_values to make these cells missing`,
      );
    }
  }
  return warnings;
}
