import { InputError, inputErrors } from "../errors.js";
import { controlCharacterProblem } from "./controlCharacters.js";
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

/**
 * True when the cell (already trimmed of spaces) is empty, or exactly one of
 * the missing-value codes. An empty cell is always missing: an empty
 * category or number has no meaning, whatever the codes.
 */
export function isMissingCell(cell: string, missingValues: readonly string[]): boolean {
  return cell === "" || missingValues.includes(cell);
}

/**
 * Parses a participants table; rejects (with file, line and column) a first
 * column other than `participant_id`, an empty or repeated ID, an ID with a
 * control character, and a table without rows. Every problem with the IDs is
 * reported in one error.
 */
export function parseParticipants(
  text: string,
  file: string,
  missingValues: readonly string[] = DEFAULT_MISSING_VALUES,
): ParticipantsTable {
  const { table, problems } = parseParticipantsCollecting(text, file, missingValues);
  const error = inputErrors(problems);
  if (error) throw error;
  return table;
}

/**
 * Parses a participants table as `parseParticipants` does, but returns the
 * problems with its IDs (empty, missing-value code, repeated, control
 * characters; in line order) beside the table instead of raising them, so a
 * caller can report them with the problems of other cells in one pass. The
 * structural errors (first column, no rows, field counts) are still raised.
 */
export function parseParticipantsCollecting(
  text: string,
  file: string,
  missingValues: readonly string[] = DEFAULT_MISSING_VALUES,
): { table: ParticipantsTable; problems: InputError[] } {
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

  const problems: InputError[] = [];
  const ids: string[] = [];
  const firstLineOf = new Map<string, number>();
  for (let r = 0; r < rows.length; r++) {
    const id = rows[r][0];
    const at = { file, line: lines[r], column: 1 };
    ids.push(id);
    if (isMissingCell(id, missingValues)) {
      const what = id === "" ? `empty ${PARTICIPANT_ID}` : `missing ${PARTICIPANT_ID} ('${printable(id)}' is a missing-value code)`;
      problems.push(new InputError(`${what}: every row needs an ID`, at));
      continue;
    }
    const control = controlCharacterProblem(PARTICIPANT_ID, id);
    if (control) problems.push(new InputError(control, at, CONTROL_CHARACTER_HINT));
    const earlier = firstLineOf.get(id);
    if (earlier !== undefined) {
      problems.push(new InputError(`duplicate ${PARTICIPANT_ID} '${printable(id)}' on lines ${earlier} and ${lines[r]}`, at));
    } else {
      firstLineOf.set(id, lines[r]);
    }
  }

  const columns = new Map<string, (string | null)[]>();
  for (let c = 0; c < header.length; c++) {
    columns.set(
      header[c],
      rows.map((row) => (isMissingCell(row[c], missingValues) ? null : row[c])),
    );
  }
  return { table: { file, ids, columns, lines: lines.slice(), header: header.slice() }, problems };
}

/** What to do about a control character in a cell (see controlCharacters.ts). */
export const CONTROL_CHARACTER_HINT = "remove the control character (e.g. an escape sequence pasted from a terminal) from the table";

/** Reads and parses a participants table; an unreadable file is an InputError naming it. */
export function readParticipants(path: string, missingValues: readonly string[] = DEFAULT_MISSING_VALUES): ParticipantsTable {
  return parseParticipants(readTableText(path, "the participants table"), path, missingValues);
}

/** Reads a participants table as `parseParticipantsCollecting` parses it: the ID problems are returned, not raised. */
export function readParticipantsCollecting(
  path: string,
  missingValues: readonly string[] = DEFAULT_MISSING_VALUES,
): { table: ParticipantsTable; problems: InputError[] } {
  return parseParticipantsCollecting(readTableText(path, "the participants table"), path, missingValues);
}
