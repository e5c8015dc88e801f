import { isAbsolute, resolve } from "node:path";
import { InputError, type InputLocation } from "../errors.js";
import { edgePairs, type EdgePairs } from "../edges/edgeIndex.js";
import { writeMatrixEdges, type EdgeExtractionOptions } from "./connectomeEdges.js";
import { parseMatrixText } from "./matrixText.js";
import { parseNpy } from "./npy.js";
import { PARTICIPANT_ID } from "./participants.js";
import { readBinaryFile, readTextFile } from "./readInputFile.js";

/**
 * Loading every subject's connectivity matrix into one subject-major array of
 * upper-triangle edge values (edge order of src/edges/edgeIndex.ts).
 */
export type ConnectomeSource = { kind: "template"; template: string; baseDir: string } | { kind: "npy"; path: string };

export interface ConnectomeOptions extends EdgeExtractionOptions {
  /**
   * Number of rows in the participants table (dropped subjects included). When
   * given, an .npy stack must hold exactly this many matrices; otherwise it
   * must at least reach every subject's `tableRow`.
   */
  participantRowCount?: number;
}

export interface ConnectomeSubject {
  id: string;
  /** 0-based row in the participants table, dropped subjects included. */
  tableRow: number;
  /** That row's cells by column name (null = missing). */
  values: Record<string, string | null>;
}

export interface LoadedConnectomes {
  regionCount: number;
  edgeCount: number;
  subjectCount: number;
  /**
   * Edge-major, in memory that worker threads share: data[e * subjectCount + s]
   * (each edge's values over subjects are contiguous).
   */
  data: Float64Array;
  /** Resolved path of each file read (one entry for an .npy stack). */
  files: string[];
}

export const CONNECTOMES_KEY = "connectomes";

/**
 * Fills `{column}` placeholders of a path template with the subject's cells
 * (`{participant_id}` or any other column) and resolves the result against
 * `baseDir` (an absolute result stays as it is). An unknown column, a missing
 * value or an unbalanced brace is an InputError on the design key.
 */
export function resolveTemplate(
  template: string,
  subject: ConnectomeSubject,
  baseDir: string,
  key: string = CONNECTOMES_KEY,
): string {
  let out = "";
  let p = 0;
  while (p < template.length) {
    const open = template.indexOf("{", p);
    if (open < 0) {
      out += template.slice(p);
      break;
    }
    const close = template.indexOf("}", open + 1);
    if (close < 0) {
      throw new InputError(`path template '${template}' has a '{' without a closing '}'`, { key });
    }
    out += template.slice(p, open);
    const name = template.slice(open + 1, close);
    if (name === "" || name.includes("{")) {
      throw new InputError(`path template '${template}' has an empty or nested placeholder at character ${open + 1}`, {
        key,
      });
    }
    let value: string | null | undefined = Object.hasOwn(subject.values, name) ? subject.values[name] : undefined;
    if (value === undefined && name === PARTICIPANT_ID) value = subject.id;
    if (value === undefined) {
      const known = Object.keys(subject.values);
      throw new InputError(
        `path template '${template}' uses {${name}}, which is not a column of the participants table` +
          (known.length > 0 ? ` (columns: ${known.join(", ")})` : ""),
        { key },
      );
    }
    if (value === null) {
      throw new InputError(
        `path template '${template}' uses {${name}}, but participant '${subject.id}' has no value (n/a) in that column`,
        { key },
      );
    }
    out += value;
    p = close + 1;
  }
  return isAbsolute(out) ? out : resolve(baseDir, out);
}

export function loadConnectomes(
  source: ConnectomeSource,
  subjects: ConnectomeSubject[],
  options: ConnectomeOptions,
): LoadedConnectomes {
  return source.kind === "npy"
    ? loadFromStack(resolve(source.path), subjects, options)
    : loadFromTemplate(source.template, source.baseDir, subjects, options);
}

function loadFromTemplate(
  template: string,
  baseDir: string,
  subjects: ConnectomeSubject[],
  options: ConnectomeOptions,
): LoadedConnectomes {
  if (subjects.length === 0) {
    throw new InputError("no participants to load connectivity matrices for", { key: CONNECTOMES_KEY });
  }
  const files: string[] = [];
  let pairs: EdgePairs | undefined;
  let data: Float64Array = new Float64Array(0);
  let firstFile = "";
  for (let s = 0; s < subjects.length; s++) {
    const subject = subjects[s];
    const file = resolveTemplate(template, subject, baseDir);
    const text = readTextFile(file, `connectivity matrix of participant '${subject.id}' (from the template '${template}')`);
    const matrix = parseMatrixText(text, file, { allowNonFiniteDiagonal: true });
    if (pairs === undefined) {
      requireTwoRegions(matrix.size, { file, line: matrix.rowLines[0] });
      pairs = edgePairs(matrix.size);
      data = sharedEdgeArray(subjects.length * pairs.edgeCount);
      firstFile = file;
    } else if (matrix.size !== pairs.regionCount) {
      throw new InputError(
        `this matrix is ${matrix.size} × ${matrix.size} but ${firstFile} is ${pairs.regionCount} × ${pairs.regionCount}; all matrices must have the same size`,
        { file, line: matrix.rowLines[0] },
      );
    }
    writeMatrixEdges(matrix.values, 0, pairs, data, s, options, { file, rowLines: matrix.rowLines }, subjects.length);
    files.push(file);
  }
  const regionPairs = pairs as EdgePairs;
  return {
    regionCount: regionPairs.regionCount,
    edgeCount: regionPairs.edgeCount,
    subjectCount: subjects.length,
    data,
    files,
  };
}

function loadFromStack(file: string, subjects: ConnectomeSubject[], options: ConnectomeOptions): LoadedConnectomes {
  const stack = parseNpy(readBinaryFile(file, "the .npy stack of connectivity matrices"), file);
  const { shape } = stack;
  const rows = options.participantRowCount;
  const expected = `(${rows ?? "R"}, N, N) with ${rows ?? "R"} = the rows of the participants table`;
  if (shape.length !== 3 || shape[1] !== shape[2]) {
    throw new InputError(`expected an array of shape ${expected}, found shape (${shape.join(", ")})`, { file });
  }
  const [count, n] = shape;
  if (rows !== undefined && count !== rows) {
    throw new InputError(
      `the stack holds ${count} matrices (shape (${shape.join(", ")})) but the participants table has ${rows} rows; expected shape ${expected}`,
      { file },
    );
  }
  for (const subject of subjects) {
    if (!(subject.tableRow >= 0 && subject.tableRow < count)) {
      throw new InputError(
        `participant '${subject.id}' is row ${subject.tableRow + 1} of the participants table, but the stack holds only ${count} matrices (shape (${shape.join(", ")}))`,
        { file },
      );
    }
  }
  requireTwoRegions(n, { file });
  const pairs = edgePairs(n);
  const data = sharedEdgeArray(subjects.length * pairs.edgeCount);
  for (let s = 0; s < subjects.length; s++) {
    const subject = subjects[s];
    writeMatrixEdges(
      stack.data,
      subject.tableRow * n * n,
      pairs,
      data,
      s,
      options,
      { file, label: `matrix ${subject.tableRow + 1} of the stack (participant '${subject.id}')` },
      subjects.length,
    );
  }
  return { regionCount: n, edgeCount: pairs.edgeCount, subjectCount: subjects.length, data, files: [file] };
}

function requireTwoRegions(size: number, location: InputLocation): void {
  if (size < 2) {
    throw new InputError(`a ${size} × ${size} matrix has no edges; at least 2 regions are needed`, location);
  }
}

/** A Float64Array in a SharedArrayBuffer, so permutation workers read the data without copies. */
export function sharedEdgeArray(length: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(length * Float64Array.BYTES_PER_ELEMENT));
}
