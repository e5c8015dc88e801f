import { InputError } from "../errors.js";
import { printable } from "./printable.js";
import { parseTsv, readTableText } from "./tsv.js";

/**
 * A participants table in the BIDS `participants.tsv` convention: the first
 * column is `participant_id`, one row per participant; a cell whose whole text
 * is one of the missing-value codes (the design's `missing_values`) is missing.
 */
export interface ParticipantsTable {
  file: string;
  /** `participant_id` of each row, in file order. */
  ids: string[];
  /** Every column (participant_id included) by name; missing-value cells are null. */
  columns: Map<string, (string | null)[]>;
  /** 1-based file line of each row. */
  lines: number[];
  header: string[];
}

export const PARTICIPANT_ID = "participant_id";

/**
 * The cell texts read as a missing value unless the design's `missing_values`
 * says otherwise: empty, BIDS's `n/a` (and `N/A`), R's `NA`, and `NaN`/`nan`
 * as numeric software writes a missing number.
 */
export const DEFAULT_MISSING_VALUES: readonly string[] = ["", "n/a", "N/A", "NA", "NaN", "nan"];

/** True when the cell (already trimmed of spaces) is exactly one of the missing-value codes. */
export function isMissingCell(cell: string, missingValues: readonly string[]): boolean {
  return missingValues.includes(cell);
}

/**
 * Parses a participants table; rejects (with file, line and column) a first
 * column other than `participant_id`, an empty or repeated ID, and a table
 * without rows.
 */
export function parseParticipants(
  text: string,
  file: string,
  missingValues: readonly string[] = DEFAULT_MISSING_VALUES,
): ParticipantsTable {
  const table = parseTsv(text, file);
  const { header, rows, lines, headerLine } = table;
  if (header[0] !== PARTICIPANT_ID) {
    throw new InputError(
      `the first column must be '${PARTICIPANT_ID}' (BIDS participants.tsv), found '${header[0]}'`,
      { file, line: headerLine, column: 1 },
    );
  }
  if (rows.length === 0) {
    throw new InputError("empty participants table: the header has no rows below it", { file, line: headerLine });
  }

  const ids: string[] = [];
  const firstLineOf = new Map<string, number>();
  for (let r = 0; r < rows.length; r++) {
    const id = rows[r][0];
    if (id === "" || isMissingCell(id, missingValues)) {
      const what = id === "" ? `empty ${PARTICIPANT_ID}` : `missing ${PARTICIPANT_ID} ('${printable(id)}' is a missing-value code)`;
      throw new InputError(`${what}: every row needs an ID`, {
        file,
        line: lines[r],
        column: 1,
      });
    }
    const earlier = firstLineOf.get(id);
    if (earlier !== undefined) {
      throw new InputError(`duplicate ${PARTICIPANT_ID} '${printable(id)}' on lines ${earlier} and ${lines[r]}`, {
        file,
        line: lines[r],
        column: 1,
      });
    }
    firstLineOf.set(id, lines[r]);
    ids.push(id);
  }

  const columns = new Map<string, (string | null)[]>();
  for (let c = 0; c < header.length; c++) {
    columns.set(
      header[c],
      rows.map((row) => (isMissingCell(row[c], missingValues) ? null : row[c])),
    );
  }
  return { file, ids, columns, lines: lines.slice(), header: header.slice() };
}

/** Reads and parses a participants table; an unreadable file is an InputError naming it. */
export function readParticipants(path: string, missingValues: readonly string[] = DEFAULT_MISSING_VALUES): ParticipantsTable {
  return parseParticipants(readTableText(path, "the participants table"), path, missingValues);
}
