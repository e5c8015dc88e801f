import { InputError, inputErrors } from "../errors.js";
import { controlCharacterProblem } from "./controlCharacters.js";
import type { TextCell } from "./delimitedCells.js";
import { describeLayout, headerLabelCells, shortCell, type MatrixTextLayout } from "./matrixTextLayout.js";

/** The region labels a text matrix names, with where each is written. */
export interface MatrixLabels {
  /** In matrix order: the header's labels when there is a header row, else the label column's. */
  names: string[];
  /** The line and column of each: its header cell, or its row's first cell. */
  places: { line: number; column: number }[];
  /** How the file is laid out, e.g. "comma-separated, header row and label column". */
  layout: string;
  /** Whether each row begins with its label (the numbers then start in the file's column 2). */
  labelColumn: boolean;
}

/**
 * A parsed matrix with the labels its layout gives (unchanged when it has
 * neither a header row nor a label column). Labels must be non-empty, hold no
 * control character and be unique; with both a header row and a label column,
 * row k's label must be the header's k-th. Every problem is raised at once.
 */
export function labelledMatrix<T extends { size: number; rowLines: number[] }>(
  matrix: T,
  layout: MatrixTextLayout,
  rowLabels: readonly string[],
  file: string,
): T & { labels?: MatrixLabels } {
  if (!layout.header && !layout.labelColumn) return matrix;
  const problems: InputError[] = [];
  let names: string[];
  let places: { line: number; column: number }[];
  if (layout.header) {
    const cells = headerLabelCells(layout, matrix.size);
    const line = layout.header.line;
    names = cells.map((cell) => cell.text);
    places = cells.map((cell) => ({ line, column: cell.column }));
    problems.push(...labelProblems(names, places, file, "header cell"));
    if (layout.labelColumn) problems.push(...columnAgainstHeader(rowLabels, matrix.rowLines, cells, line, file));
  } else {
    names = [...rowLabels];
    places = matrix.rowLines.map((line) => ({ line, column: 1 }));
    problems.push(...labelProblems(names, places, file, "row label"));
  }
  const error = inputErrors(problems);
  if (error) throw error;
  return { ...matrix, labels: { names, places, layout: describeLayout(layout), labelColumn: layout.labelColumn } };
}

/** Empty, unsafe and repeated labels, each at its place. */
function labelProblems(names: readonly string[], places: readonly { line: number; column: number }[], file: string, what: string): InputError[] {
  const problems: InputError[] = [];
  const first = new Map<string, number>();
  names.forEach((name, k) => {
    const where = { file, ...places[k] };
    if (name === "") {
      problems.push(new InputError(`${what} ${k + 1} is empty: every region needs a label`, where));
      return;
    }
    const unsafe = controlCharacterProblem("region label", name);
    if (unsafe) {
      problems.push(new InputError(unsafe, where, "remove the control character (labels are written into the results)"));
      return;
    }
    const earlier = first.get(name);
    if (earlier !== undefined) {
      const at = places[earlier];
      problems.push(new InputError(`the region label '${shortCell(name)}' appears twice (also at line ${at.line}, column ${at.column}); labels must be unique`, where));
    } else {
      first.set(name, k);
    }
  });
  return problems;
}

/** Row k's label against the header's k-th: each that differs is a problem on its row's line. */
function columnAgainstHeader(rowLabels: readonly string[], rowLines: readonly number[], cells: readonly TextCell[], headerLine: number, file: string): InputError[] {
  const problems: InputError[] = [];
  rowLabels.forEach((label, k) => {
    const expected = cells[k].text;
    if (label === expected) return;
    problems.push(
      new InputError(
        `row ${k + 1} is labelled '${shortCell(label)}' but column ${k + 1} of the header (line ${headerLine}, cell ${cells[k].column}) is '${shortCell(expected)}'; ` +
          "a header row and a label column must name the same regions in the same order",
        { file, line: rowLines[k], column: 1 },
      ),
    );
  });
  return problems;
}
