import { isAbsolute, resolve } from "node:path";
import { InputError, inputErrors, isInputError, type InputLocation } from "../errors.js";
import { edgePairs } from "../edges/edgeIndex.js";
import { EdgeMajorWriter, type EdgeExtractionOptions } from "./connectomeEdges.js";
import { allocateEdgeData, type EdgeDataBudget } from "./edgeData.js";
import { loadEdgeTable } from "./edgeTable.js";
import type { MatrixLabels } from "./matrixTextLabels.js";
import { textLabelPlan } from "./textLabelPlan.js";
import { parseMatrixFile } from "./textMatrixFile.js";
import { loadBlocksInOrder, loadBlocksInParallel, worthTwoThreads } from "./matrixBlocks.js";
import { loadSubject } from "./matrixProblems.js";
import { cOrderMatrices, readExactly, stackMatrixLabel } from "./npyMatrixBlocks.js";
import { digestHex, sharedDigests, type TextBlockJob } from "./textMatrixBlocks.js";
import { npyDataOffset, npyValueReader, parseNpyHeader, type NpyHeader } from "./npy.js";
import { PARTICIPANT_ID } from "./participants.js";
import { printable } from "./printable.js";
import { InputFile, TextFileReader } from "./readInputFile.js";
import type { ArrayChoice, SubjectsAxis } from "./arrays/chooseArray.js";
import { loadContainerFiles, loadContainerStack, type MatrixReading } from "./arrays/containerConnectomes.js";
import { probeFormat } from "./arrays/probeFormat.js";
import { unsafePathValue } from "./templateValues.js";

/**
 * Loading every subject's connectivity matrix into one edge-major array of
 * upper-triangle edge values (edge order of src/edges/edgeIndex.ts), from one
 * text file per subject (labelled or not), one participants × edges text
 * table, one .npy stack read a matrix at a time, or binary containers.
 */
export type ConnectomeSource =
  | { kind: "template"; template: string; baseDir: string; choice?: ArrayChoice }
  | { kind: "file"; path: string; choice?: ArrayChoice };

export interface ConnectomeOptions extends EdgeExtractionOptions {
  /**
   * Number of rows in the participants table (dropped subjects included). When
   * given, an .npy stack must hold exactly this many matrices; otherwise it
   * must at least reach every subject's `tableRow`.
   */
  participantRowCount?: number;
  /** The regions table's labels and path, when the design gives one: labels a file carries are matched to them. */
  regionTable?: { labels: readonly string[]; file: string };
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
  /**
   * SHA-256 (FIPS 180-4, hex) of each of `files`, from the bytes loaded, when
   * each was read whole (text matrices); absent for an .npy stack, which is
   * read in parts.
   */
  sha256?: string[];
  /** Region labels the files carry (a labelled text header, CIFTI-2 parcels), when no regions table is given. */
  labels?: string[];
  /** Which reader was used, the array's shape and axes, and where the labels came from. */
  reading: MatrixReading;
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
    const unsafe = unsafePathValue(value);
    if (unsafe) {
      throw new InputError(`path template '${template}' uses {${name}}, but participant '${printable(subject.id)}' has a value that ${unsafe}`, { key });
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
  /** Asked with the cohort's shape before the edge data are allocated (the run's memory plan). */
  budget?: EdgeDataBudget,
): LoadedConnectomes {
  const choice = source.choice ?? {};
  if (source.kind === "file") {
    const file = resolve(source.path);
    const format = probeFormat(file, STACK_HINT);
    // A file named .npy that is no NumPy array gets the .npy reader's own message about its header.
    const npyByName = format === "text" && file.toLowerCase().endsWith(".npy");
    if ((format === "npy" || npyByName) && stackAxis(file, choice) === "first") {
      const loaded = loadFromStack(file, subjects, options, budget);
      return { ...loaded, reading: { reader: "NumPy .npy", shape: loaded.stackShape, subjectsAxis: "first", labels: numberedOrTable(options) } };
    }
    if (format === "text") {
      if (choice.variable !== undefined || choice.subjectsAxis !== undefined) {
        throw new InputError(
          `this file is text, read as a participants × edges table, which has no ${choice.variable !== undefined ? "variables" : "subjects axis"}`,
          { file, key: choice.variable !== undefined ? "connectomes.variable" : "connectomes.subjects_axis" },
          "leave out variable and subjects_axis for a text table",
        );
      }
      return loadEdgeTable(file, subjects, options, budget);
    }
    return loadContainerStack(file, subjects, { ...options, ...choice }, budget);
  }
  const files = resolveAll(source.template, subjects, source.baseDir);
  const first = files.find((file) => file !== "");
  if (first !== undefined && probeFirst(first) !== "text") return loadContainerFiles(files, subjects, { ...options, ...choice }, budget);
  return loadFromTemplate(source.template, source.baseDir, subjects, options, budget);
}

/**
 * The participants' axis of a .npy stack, from its header alone: `subjects_axis`
 * when given, N × N × S when the shape says so, else S × N × N (streamed a
 * matrix at a time).
 */
function stackAxis(file: string, choice: ArrayChoice): SubjectsAxis {
  const input = InputFile.open(file, STACK_HINT);
  let header: NpyHeader;
  try {
    header = readStackHeader(input);
  } finally {
    input.close();
  }
  const { shape } = header;
  if (choice.subjectsAxis) return choice.subjectsAxis;
  if (shape.length !== 3) return "first"; // the streaming reader names the shape it expected
  // S × N × N is the .npy stack's documented order: it stands when the shape cannot tell (S = N).
  return shape[0] === shape[1] && shape[1] !== shape[2] ? "last" : "first";
}

function numberedOrTable(options: ConnectomeOptions): MatrixReading["labels"] {
  return options.regionTable ? "regions table" : "numbered 1 … N";
}

/** The format of the first participant's file; a file that cannot be opened is left to the loader to report. */
function probeFirst(file: string): string {
  try {
    return probeFormat(file);
  } catch (error) {
    if (!isInputError(error)) throw error;
    return "text";
  }
}

function loadFromTemplate(template: string, baseDir: string, subjects: ConnectomeSubject[], options: ConnectomeOptions, budget?: EdgeDataBudget): LoadedConnectomes {
  if (subjects.length === 0) {
    throw new InputError("no participants to load connectivity matrices for", { key: CONNECTOMES_KEY });
  }
  const hints = subjects.map((subject) => `connectivity matrix of participant '${subject.id}' (from the template '${template}')`);
  const files = resolveAll(template, subjects, baseDir);
  const reference = referenceMatrix(files, hints, options.missing === "drop");
  // Labels in the first file: every file must repeat them; a regions table may reorder them.
  const plan = textLabelPlan(reference.labels, reference.file, options.regionTable);
  const pairs = edgePairs(reference.size);
  const data = allocateEdgeData(subjects.length, pairs.edgeCount, { key: CONNECTOMES_KEY }, budget);
  const digests = sharedDigests(subjects.length);
  const job: TextBlockJob = {
    kind: "text",
    subjectCount: subjects.length,
    files,
    hints,
    regionCount: pairs.regionCount,
    firstFile: reference.file,
    data,
    options,
    digests,
    ...(reference.labels ? { firstLabels: reference.labels.names } : {}),
    ...(plan.order ? { order: plan.order, orderedLabels: plan.names } : {}),
  };
  // Many files: two threads read blocks of subjects (matrixBlocks.ts), with the same values and errors.
  if (worthTwoThreads(subjects.length, reference.bytes)) loadBlocksInParallel(job);
  else loadBlocksInOrder(job);
  return {
    regionCount: pairs.regionCount,
    edgeCount: pairs.edgeCount,
    subjectCount: subjects.length,
    data,
    files,
    sha256: files.map((_, s) => digestHex(digests, s)),
    ...(plan.labels === "file" ? { labels: plan.names } : {}),
    reading: {
      reader: reference.labels ? `text (${reference.labels.layout})` : "text",
      shape: [pairs.regionCount, pairs.regionCount],
      labels: plan.labels,
      ...(plan.order ? { reordered: true } : {}),
    },
  };
}

/** Every subject's file from the template; the problems of all subjects in one error (each distinct one once). */
function resolveAll(template: string, subjects: ConnectomeSubject[], baseDir: string): string[] {
  const problems = new Map<string, InputError>();
  const files = subjects.map((subject) => {
    try {
      return resolveTemplate(template, subject, baseDir);
    } catch (error) {
      if (!isInputError(error)) throw error;
      if (!problems.has(error.format())) problems.set(error.format(), error);
      return "";
    }
  });
  const error = inputErrors([...problems.values()]);
  if (error) throw error;
  return files;
}

/**
 * The matrix every other must match in size: the first file, in subject order,
 * that reads as a matrix of at least 2 regions. When none does, every file's
 * problem is raised at once.
 */
function referenceMatrix(files: string[], hints: string[], allowMissing: boolean): { file: string; size: number; bytes: number; labels?: MatrixLabels } {
  const reader = new TextFileReader();
  const problems: InputError[] = [];
  for (let s = 0; s < files.length; s++) {
    try {
      const bytes = reader.readBytes(files[s], hints[s]);
      const matrix = parseMatrixFile(bytes, files[s], { allowNonFiniteDiagonal: true, allowMissing });
      requireTwoRegions(matrix.size, { file: files[s], line: matrix.rowLines[0] });
      return { file: files[s], size: matrix.size, bytes: bytes.length, ...(matrix.labels ? { labels: matrix.labels } : {}) };
    } catch (error) {
      if (!isInputError(error)) throw error;
      problems.push(error);
    }
  }
  throw inputErrors(problems)!;
}

const STACK_HINT = "the .npy stack of connectivity matrices";
/** Bytes read first to find the header; a longer header is read once its length is known. */
const HEADER_PROBE_BYTES = 4096;
/** A Fortran-order stack interleaves every matrix, so it is read whole, up to this many bytes of data. */
const FORTRAN_ORDER_LIMIT_BYTES = 2 ** 30;

/**
 * Reads an (R, N, N) .npy stack one subject's matrix at a time at its byte
 * offset, so memory holds the edge array and one matrix, whatever the file's
 * size (a Fortran-order stack of up to 1 GiB is the exception: read whole).
 */
function loadFromStack(file: string, subjects: ConnectomeSubject[], options: ConnectomeOptions, budget?: EdgeDataBudget): Omit<LoadedConnectomes, "reading"> & { stackShape: number[] } {
  const input = InputFile.open(file, STACK_HINT);
  try {
    const header = readStackHeader(input);
    const { shape } = header;
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
    const data = allocateEdgeData(subjects.length, pairs.edgeCount, { file }, budget);
    const matrixBytes = n * n * header.dtype.itemSize;
    if (!header.fortranOrder && worthTwoThreads(subjects.length, matrixBytes)) {
      // Many matrices: two threads read blocks of subjects (matrixBlocks.ts), with the same values and errors.
      loadBlocksInParallel({
        kind: "npy",
        subjectCount: subjects.length,
        file,
        hint: STACK_HINT,
        header,
        tableRows: subjects.map((subject) => subject.tableRow),
        ids: subjects.map((subject) => subject.id),
        data,
        options,
      });
    } else {
      const writer = new EdgeMajorWriter(pairs, data, subjects.length);
      const matrixOf = header.fortranOrder ? fortranOrderMatrices(input, header) : cOrderMatrices(input, header);
      const problems: InputError[] = [];
      for (const subject of subjects) {
        loadSubject(writer, problems, () =>
          writer.add(matrixOf(subject.tableRow), 0, options, { file, label: stackMatrixLabel(subject.tableRow, subject.id) }),
        );
      }
      const error = inputErrors(problems);
      if (error) throw error;
    }
    return { regionCount: n, edgeCount: pairs.edgeCount, subjectCount: subjects.length, data, files: [file], stackShape: [...shape] };
  } finally {
    input.close();
  }
}

function readStackHeader(input: InputFile): NpyHeader {
  let prefix = new Uint8Array(Math.min(input.size, HEADER_PROBE_BYTES));
  readExactly(input, prefix, 0, "the header");
  const dataOffset = npyDataOffset(prefix);
  if (dataOffset !== undefined && dataOffset > prefix.length && dataOffset <= input.size) {
    prefix = new Uint8Array(dataOffset);
    readExactly(input, prefix, 0, "the header");
  }
  return parseNpyHeader(prefix, input.path, input.size);
}

/**
 * For a C-order stack: a function reading matrix `row` (row-major N × N, as
 * float64) into one reused array; the raw bytes go straight into that array
 * when they are float64 in this machine's byte order.
 */

/**
 * For a Fortran-order (column-major) stack, where element (s, i, j) is value
 * s + R·i + R·N·j and so each matrix is spread through the whole file: the data
 * is read whole (up to 1 GiB) and each matrix gathered from it.
 */
function fortranOrderMatrices(input: InputFile, header: NpyHeader): (row: number) => Float64Array {
  const [count, n] = header.shape;
  const { dtype } = header;
  const dataBytes = header.count * dtype.itemSize;
  if (dataBytes > FORTRAN_ORDER_LIMIT_BYTES) {
    throw new InputError(
      `the stack is stored in Fortran order ('fortran_order': True), which spreads each matrix through the whole file, so it would have to be read whole; ` +
        `that is done only up to 1 GiB of data, and this stack holds ${dataBytes} bytes`,
      { file: input.path },
      "save the stack in C order, e.g. numpy.save(path, numpy.ascontiguousarray(stack)), to have it read one matrix at a time",
    );
  }
  const raw = new Uint8Array(dataBytes);
  readExactly(input, raw, header.dataOffset, "the data");
  const read = npyValueReader(raw, dtype);
  const itemSize = dtype.itemSize;
  const matrix = new Float64Array(n * n);
  return (row) => {
    for (let i = 0; i < n; i++) {
      for (let j = 0, offset = itemSize * (row + count * i); j < n; j++, offset += itemSize * count * n) {
        matrix[i * n + j] = read(offset);
      }
    }
    return matrix;
  };
}


function requireTwoRegions(size: number, location: InputLocation): void {
  if (size < 2) {
    throw new InputError(`a ${size} × ${size} matrix has no edges; at least 2 regions are needed`, location);
  }
}
