import { InputError, type InputLocation } from "../errors.js";
import type { SelectionSpec } from "./design/designSpec.js";
import { controlCharacterProblem } from "./controlCharacters.js";
import { nearestName } from "./nearestName.js";
import { CONTROL_CHARACTER_HINT, PARTICIPANT_ID, type ParticipantsTable } from "./participants.js";
import { printable } from "./printable.js";

/**
 * The design's `select`: the participants analysed, chosen before any
 * missing-value exclusion. A participant is selected when, in every column
 * named, the cell's text (trimmed, case-sensitive) is one of the values listed;
 * a missing cell matches nothing. The others are *not analysed by design*:
 * each gets the reason `not selected (column: value; …)`, naming every column
 * that failed, and never counts as excluded.
 */
export interface Selection {
  /** Selected rows of the table (0-based, file order). */
  rows: number[];
  /** The rows left out by `select`, with their reason. */
  notSelected: { row: number; reason: string }[];
}

/** The text of a missing cell in a not-selected reason. */
export const MISSING_CELL_TEXT = "missing";

/**
 * Applies `select` to the table. Errors (InputError at `select.<column>`): a
 * column the table lacks (with the nearest name), a value no row holds (with
 * the nearest value, or the column's values), and no row selected (at `select`).
 */
export function selectParticipants(
  table: ParticipantsTable,
  select: readonly SelectionSpec[],
  where: (key: string) => InputLocation,
): Selection {
  const all = table.ids.map((_, row) => row);
  if (select.length === 0) return { rows: all, notSelected: [] };
  const columns = select.map((spec) => {
    const key = `select.${spec.column}`;
    const cells = spec.column === PARTICIPANT_ID ? table.ids : table.columns.get(spec.column);
    if (cells === undefined) {
      const near = nearestName(spec.column, table.header);
      throw new InputError(
        `'select' names '${printable(spec.column)}', which is not a column of ${table.file}`,
        where(key),
        near ? `did you mean '${near}'?` : `columns: ${table.header.join(", ")}`,
      );
    }
    const present = [...new Set(cells.filter((c): c is string => c !== null))];
    for (const value of spec.values) {
      if (present.includes(value)) continue;
      const near = nearestName(value, present);
      const shown = present.length <= 20 ? present.map((v) => `'${printable(v)}'`).join(", ") : `${present.length} different values`;
      throw new InputError(
        `no row of ${table.file} has '${printable(value)}' in '${printable(spec.column)}', which the selection keeps`,
        where(key),
        near && near !== value
          ? `did you mean '${printable(near)}'? (values are compared as the cells' text, case-sensitive; a number as written)`
          : `the column holds ${shown || "no value"} (values are compared as the cells' text, case-sensitive; a number as written, so 1 does not match 1.0)`,
      );
    }
    return { spec, cells, kept: new Set(spec.values) };
  });
  const rows: number[] = [];
  const notSelected: Selection["notSelected"] = [];
  for (const row of all) {
    const failed = columns.filter(({ cells, kept }) => {
      const cell = cells[row];
      return cell === null || !kept.has(cell);
    });
    if (failed.length === 0) rows.push(row);
    else {
      const reason = failed.map(({ spec, cells }) => `${spec.column}: ${cells[row] ?? MISSING_CELL_TEXT}`).join("; ");
      notSelected.push({ row, reason: `not selected (${reason})` });
    }
  }
  if (rows.length === 0) {
    throw new InputError(
      `'select' keeps no participant: no row of ${table.file} has ${selectionText(select)}`,
      where("select"),
      "check the values listed under `select` (every column named must hold)",
    );
  }
  return { rows, notSelected };
}

/** The selection in words: `group = patient`, `site = north or south and group = patient`. */
export function selectionText(select: readonly { column: string; values: readonly string[] }[]): string {
  return select.map((s) => `${s.column} = ${s.values.join(" or ")}`).join(" and ");
}

/** The table restricted to some of its rows (same file, lines and header), for the checks that concern the analysed rows only. */
export function tableRows(table: ParticipantsTable, rows: readonly number[]): ParticipantsTable {
  if (rows.length === table.ids.length) return table;
  const columns = new Map<string, (string | null)[]>();
  for (const [name, cells] of table.columns) columns.set(name, rows.map((r) => cells[r]));
  return { file: table.file, header: table.header, ids: rows.map((r) => table.ids[r]), lines: rows.map((r) => table.lines[r]), columns };
}

/**
 * Control characters in the given rows of the given columns, one problem per
 * cell at its file:line:column: these cells are written into subjects.tsv
 * even where the analysis does not use them (rows outside `select`, columns
 * only the cohort table describes).
 */
export function controlCharacterCells(table: ParticipantsTable, columns: readonly string[], rows: readonly number[]): InputError[] {
  const problems: InputError[] = [];
  for (const name of new Set(columns)) {
    const cells = table.columns.get(name);
    if (cells === undefined || name === PARTICIPANT_ID) continue;
    const column = table.header.indexOf(name) + 1;
    for (const row of rows) {
      const cell = cells[row];
      const problem = cell === null ? undefined : controlCharacterProblem(name, cell);
      if (problem) problems.push(new InputError(problem, { file: table.file, line: table.lines[row], column }, CONTROL_CHARACTER_HINT));
    }
  }
  return problems;
}
