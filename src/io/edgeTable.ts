import { allocateEdgeData, type EdgeDataBudget } from "./edgeData.js";
import { Buffer, isAscii } from "node:buffer";
import { sha256Text } from "../common/sha256.js";
import { InputError, inputErrors, LISTED_PROBLEMS } from "../errors.js";
import type { ContainerConnectomes } from "./arrays/containerConnectomes.js";
import type { EdgeExtractionOptions } from "./connectomeEdges.js";
import { hasControlCharacter } from "./controlCharacters.js";
import { splitCells, trimCell, type CellSeparator, type TextCell } from "./delimitedCells.js";
import { edgeColumns } from "./edgeColumnNames.js";
import { parseDecimalSpan } from "./matrixText.js";
import { shortCell } from "./matrixTextLayout.js";
import { readBinaryFile, systemReason } from "./readInputFile.js";
import { notTextProblem } from "./textMatrixFile.js";

/**
 * A participants × edges table: every participant's edge values in one text
 * file (what many pipelines write after vectorising the upper triangle).
 * - The first non-blank line is the header. Cells are separated by tabs when
 *   it has a tab, else by commas; spaces around cells are trimmed and a cell
 *   may be in double quotes (delimitedCells.ts).
 * - The first column holds participant IDs, whatever its name; every other
 *   column is one edge, named as edgeColumnNames.ts says.
 * - Rows are matched to the participants analysed by ID (exactly, after
 *   trimming). Each of them needs exactly one row; rows of anyone else
 *   (participants left out for missing values, or not in the participants
 *   table) are ignored beyond their ID, which must still be unique.
 * - In a row that is read, every edge cell is a finite number in decimal
 *   syntax: an empty cell, a missing-value code or text is an error naming
 *   file:line:column and the edge. `transform: fisher-z` maps each value r to
 *   atanh(r) (Fisher 1915, Biometrika 10(4):507-521) and needs |r| < 1;
 *   `transform: log1p` maps x to log(1 + x) and needs x > −1. With
 *   `edges.missing: drop`, an empty cell, NA or nan (any case) is a missing
 *   edge (NaN), which the edge rules leave out.
 * The values go into the edge-major array data[e·S + s].
 */
export interface EdgeTableOptions extends EdgeExtractionOptions {
  regionTable?: { labels: readonly string[]; file: string };
}

const HINT = "a participants × edges table is text: a header row (the participant ID column, then one column per edge) and one row per participant";

export function loadEdgeTable(file: string, subjects: readonly { id: string }[], options: EdgeTableOptions, budget?: EdgeDataBudget): ContainerConnectomes {
  const bytes = readBinaryFile(file, "the participants × edges table");
  const notText = notTextProblem(bytes, file, HINT);
  if (notText) throw notText;
  const ascii = isAscii(bytes);
  const lines = new LineReader(bytes, ascii, file);

  const header = lines.next();
  if (!header) throw new InputError("the participants × edges table is empty: expected a header row", { file, line: 1 }, HINT);
  const separator: CellSeparator = header.text.includes("\t") ? "tab" : "comma";
  const headerCells = splitCells(header.text, 0, header.text.length, separator, file, header.line);
  if (headerCells.length < 2) {
    throw new InputError("the header has one column: expected the participant ID column, then one column per edge, separated by tabs or commas", { file, line: header.line }, HINT);
  }
  checkColumnNames(headerCells, file, header.line);
  const columns = edgeColumns(
    headerCells.slice(1).map((cell) => cell.text),
    { file, line: header.line },
    options.regionTable,
  );

  const S = subjects.length;
  const E = (columns.regionCount * (columns.regionCount - 1)) / 2;
  const data = allocateEdgeData(S, E, { file }, budget);
  const subjectOf = new Map(subjects.map((subject, s) => [subject.id, s]));
  const rowOfSubject = new Int32Array(S).fill(0);
  const lineOfId = new Map<string, number>();
  const problems = new ProblemList();
  let rows = 0;
  const separatorChar = separator === "tab" ? "\t" : ",";
  for (let row = lines.next(); row; row = lines.next()) {
    rows++;
    const text = row.text;
    // Lines without quotes (the usual ones) are read in place; others through the quote-aware splitter.
    const cells = text.includes('"') ? splitCells(text, 0, text.length, separator, file, row.line) : undefined;
    const firstEnd = cells ? -1 : text.indexOf(separatorChar);
    const id = cells ? cells[0].text : trimCell(firstEnd < 0 ? text : text.slice(0, firstEnd));
    const where = { file, line: row.line };
    if (id === "") {
      problems.add(new InputError("the participant ID (first cell) is empty", { ...where, column: 1 }));
      continue;
    }
    const earlier = lineOfId.get(id);
    if (earlier !== undefined) {
      problems.add(new InputError(`participant '${shortCell(id)}' has a second row here (the first is on line ${earlier}); each participant has one row`, { ...where, column: 1 }));
      continue;
    }
    lineOfId.set(id, row.line);
    const s = subjectOf.get(id);
    if (s === undefined) continue;
    rowOfSubject[s] = row.line;
    const cellCount = cells ? cells.length : countCells(text, separatorChar);
    if (cellCount !== headerCells.length) {
      problems.add(new InputError(`expected ${headerCells.length} cells (as in the header on line ${header.line}) but found ${cellCount}`, where));
      continue;
    }
    const target = { data, s, S, transform: options.transform, dropMissing: options.missing === "drop", edgeOfColumn: columns.edgeOfColumn };
    if (cells) {
      for (let c = 1; c < cells.length; c++) {
        const problem = storeEdgeValue(cells[c].text, 0, cells[c].text.length, c, target);
        if (problem) problems.add(cellProblem(cells[c].text, headerCells[c].text, problem, where, c));
      }
    } else {
      let start = firstEnd + 1;
      for (let c = 1; c < cellCount; c++) {
        let end = text.indexOf(separatorChar, start);
        if (end < 0) end = text.length;
        let a = start;
        let b = end;
        while (a < b && isPadding(text.charCodeAt(a))) a++;
        while (b > a && isPadding(text.charCodeAt(b - 1))) b--;
        const problem = storeEdgeValue(text, a, b, c, target);
        if (problem) problems.add(cellProblem(text.slice(a, b), headerCells[c].text, problem, where, c));
        start = end + 1;
      }
    }
  }
  subjects.forEach((subject, s) => {
    if (rowOfSubject[s] === 0) problems.add(new InputError(`participant '${shortCell(subject.id)}' has no row in the participants × edges table`, { file }));
  });
  problems.throwIfAny();
  return {
    regionCount: columns.regionCount,
    edgeCount: E,
    subjectCount: S,
    data,
    files: [file],
    sha256: [sha256Text(bytes)],
    ...(columns.labels ? { labels: columns.labels } : {}),
    reading: {
      reader: `text table, participants × edges (${separator === "tab" ? "tab" : "comma"}-separated)`,
      shape: [rows, headerCells.length - 1],
      labels: options.regionTable ? "regions table, matched to the file's labels" : "file",
    },
  };
}

/** Where one row's values go: participant s's column of the edge-major data. */
interface EdgeTarget {
  data: Float64Array;
  s: number;
  S: number;
  transform: EdgeExtractionOptions["transform"];
  /** `edges.missing: drop`: an empty cell, NA or nan (any case) is a missing edge (NaN). */
  dropMissing: boolean;
  edgeOfColumn: Int32Array;
}

/** Stores the value in text[a, b) of edge column c (1-based after the ID), or says what is wrong with it. */
function storeEdgeValue(text: string, a: number, b: number, c: number, target: EdgeTarget): string | undefined {
  const at = target.edgeOfColumn[c - 1] * target.S + target.s;
  if (target.dropMissing && (a === b || (b - a === 2 && text.slice(a, b) === "NA") || (b - a === 3 && text.slice(a, b).toLowerCase() === "nan"))) {
    target.data[at] = NaN;
    return undefined;
  }
  if (a === b) return "is empty";
  const value = parseDecimalSpan(text, a, b);
  if (value !== value) return "is not a number";
  if (!Number.isFinite(value)) return "is not finite";
  if (target.transform === "fisher-z") {
    if (!(Math.abs(value) < 1)) return "is not strictly between -1 and 1, as fisher-z needs";
    target.data[at] = Math.atanh(value);
  } else if (target.transform === "log1p") {
    if (!(value > -1)) return "is not above -1, as log1p (log(1 + x)) needs";
    target.data[at] = Math.log1p(value);
  } else {
    target.data[at] = value;
  }
  return undefined;
}

function cellProblem(cell: string, edge: string, problem: string, where: { file: string; line: number }, c: number): InputError {
  return new InputError(`the cell '${shortCell(cell)}' of edge '${shortCell(edge)}' ${problem}`, { ...where, column: c + 1 });
}

/** Spaces and tabs around a cell (a tab never reaches here inside a tab-separated row). */
function isPadding(c: number): boolean {
  return c === 32 || c === 9;
}

function countCells(text: string, separator: string): number {
  let count = 1;
  for (let p = text.indexOf(separator); p >= 0; p = text.indexOf(separator, p + 1)) count++;
  return count;
}

function checkColumnNames(cells: readonly TextCell[], file: string, line: number): void {
  const problems: InputError[] = [];
  const seen = new Map<string, number>();
  for (const cell of cells) {
    const where = { file, line, column: cell.column };
    if (cell.text === "") problems.push(new InputError(`column ${cell.column} of the header has no name`, where));
    else if (hasControlCharacter(cell.text)) problems.push(new InputError(`the column name '${shortCell(cell.text)}' has a control character`, where));
    else if (seen.has(cell.text)) problems.push(new InputError(`the column name '${shortCell(cell.text)}' appears twice (also column ${seen.get(cell.text)})`, where));
    else seen.set(cell.text, cell.column);
  }
  const error = inputErrors(problems);
  if (error) throw error;
}

/** Problems in file order: the first LISTED_PROBLEMS kept, the rest counted (a table of garbage makes no million errors). */
class ProblemList {
  private readonly kept: InputError[] = [];
  private more = 0;

  add(problem: InputError): void {
    if (this.kept.length < LISTED_PROBLEMS) this.kept.push(problem);
    else this.more++;
  }

  throwIfAny(): void {
    const error = inputErrors(this.kept);
    if (!error) return;
    throw this.more === 0 ? error : new InputError(error.message, error.location, error.hint, error.also, error.unlisted + this.more);
  }
}

/** The non-blank lines of a file's bytes, each decoded on its own (a table may be larger than a string can be). */
class LineReader {
  private pos: number;
  private line = 0;

  constructor(
    private readonly bytes: Buffer | Uint8Array,
    private readonly ascii: boolean,
    private readonly file: string,
  ) {
    this.pos = bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  }

  next(): { text: string; line: number } | undefined {
    const bytes = this.bytes;
    while (this.pos < bytes.length) {
      this.line++;
      let end = bytes.indexOf(10, this.pos);
      if (end < 0) end = bytes.length;
      let stop = end;
      if (stop > this.pos && bytes[stop - 1] === 13) stop--;
      const start = this.pos;
      this.pos = end + 1;
      let blank = true;
      for (let p = start; p < stop; p++) {
        if (bytes[p] !== 32 && bytes[p] !== 9) {
          blank = false;
          break;
        }
      }
      if (blank) continue;
      let text: string;
      try {
        text = Buffer.from(bytes.buffer, bytes.byteOffset + start, stop - start).toString(this.ascii ? "latin1" : "utf8");
      } catch (error) {
        throw new InputError(`cannot read line ${this.line}: ${systemReason(error)}`, { file: this.file, line: this.line });
      }
      return { text, line: this.line };
    }
    return undefined;
  }
}
