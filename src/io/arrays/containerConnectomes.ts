import { allocateEdgeData, type EdgeDataBudget } from "../edgeData.js";
import { sha256Text } from "../../common/sha256.js";
import { InputError, inputErrors, isInputError } from "../../errors.js";
import { edgePairs } from "../../edges/edgeIndex.js";
import { EdgeMajorWriter, type EdgeExtractionOptions } from "../connectomeEdges.js";
import { loadSubject } from "../matrixProblems.js";
import { readBinaryFile } from "../readInputFile.js";
import type { ArrayContainer, NumericArray } from "./arrayContainer.js";
import { chooseMatrix, chooseStack, type ArrayChoice, type SubjectsAxis } from "./chooseArray.js";
import { detectFormat } from "./fileFormat.js";
import { openContainer } from "./openContainer.js";
import { regionOrder, reorderMatrix } from "./regionLabels.js";

// Connectivity matrices from binary containers (.npy per participant, .npz,
// .mat, HDF5, CIFTI-2): one stack for every participant, or one file each.

export interface ContainerSubject {
  id: string;
  /** 0-based row in the participants table (the stack's index over participants). */
  tableRow: number;
}

export interface ContainerOptions extends EdgeExtractionOptions, ArrayChoice {
  /** Rows of the participants table: a stack must hold exactly this many matrices. */
  participantRowCount?: number;
  /** The regions table's labels and path, when one is given: labels a file carries are matched to them. */
  regionTable?: { labels: readonly string[]; file: string };
}

/** How the matrices were read, for `plexus check` and summary.json. */
export interface MatrixReading {
  /** The reader, e.g. "MATLAB 5 .mat (compressed)"; "text" for text matrices. */
  reader: string;
  /** The variable read (absent for a file that is one array). */
  variable?: string;
  /** Shape of the array read (the stack, or the first participant's matrix). */
  shape: number[];
  /** Which axis of a stack runs over participants. */
  subjectsAxis?: SubjectsAxis;
  /** Where the region labels came from. */
  labels: "regions table" | "file" | "regions table, matched to the file's labels" | "numbered 1 … N";
  /** True when a file's labels were in another order than the regions table's (its rows and columns were reordered). */
  reordered?: boolean;
}

export interface ContainerConnectomes {
  regionCount: number;
  edgeCount: number;
  subjectCount: number;
  data: Float64Array;
  files: string[];
  sha256: string[];
  /** Labels the files carry (CIFTI-2 parcels), when no regions table is given. */
  labels?: string[];
  reading: MatrixReading;
}

function openBinary(file: string, hint: string): { bytes: Uint8Array; container: ArrayContainer } {
  const bytes = readBinaryFile(file, hint);
  const format = detectFormat(bytes);
  if (format === "text") {
    throw new InputError(`this file is text, where ${hint.startsWith("the stack") ? "a binary stack" : "a binary file like the others"} was expected`, { file });
  }
  return { bytes, container: openContainer(bytes, file, format) };
}

/** Labels handling shared by both forms: the order to apply (if any) and what to report. */
function labelPlan(container: ArrayContainer, file: string, options: ContainerOptions, n: number) {
  const fileLabels = container.labels;
  if (fileLabels && fileLabels.length !== n) {
    throw new InputError(`the file names ${fileLabels.length} regions but its matrices are ${n} × ${n}`, { file });
  }
  if (!fileLabels) return { labels: options.regionTable ? ("regions table" as const) : ("numbered 1 … N" as const) };
  if (!options.regionTable) return { labels: "file" as const, fileLabels: [...fileLabels] };
  const order = regionOrder(fileLabels, options.regionTable.labels, file, options.regionTable.file);
  return { labels: "regions table, matched to the file's labels" as const, order };
}

/** Matrix (i, j) of participant `s` of a stack in C order over its shape. */
function stackMatrix(array: NumericArray, axis: SubjectsAxis, s: number, out: Float64Array): Float64Array {
  const { values, shape } = array;
  if (axis === "first") {
    const n = shape[1];
    out.set(values.subarray(s * n * n, (s + 1) * n * n));
  } else {
    const n = shape[0];
    const count = shape[2];
    for (let ij = 0; ij < n * n; ij++) out[ij] = values[ij * count + s];
  }
  return out;
}

/** Every participant's matrix from one container file (S × N × N or N × N × S). */
export function loadContainerStack(file: string, subjects: ContainerSubject[], options: ContainerOptions, budget?: EdgeDataBudget): ContainerConnectomes {
  const { bytes, container } = openBinary(file, "the stack of connectivity matrices");
  const { entry, axis } = chooseStack(container, file, options);
  const count = axis === "first" ? entry.shape[0] : entry.shape[2];
  const n = axis === "first" ? entry.shape[1] : entry.shape[0];
  const rows = options.participantRowCount;
  if (rows !== undefined && count !== rows) {
    throw new InputError(
      `the stack holds ${count} matrices (${entry.shape.join(" × ")}, participants on the ${axis} axis) but the participants table has ${rows} rows`,
      { file, key: "connectomes" },
      "the stack's k-th matrix is the participants table's k-th row",
    );
  }
  if (n < 2) throw new InputError(`a ${n} × ${n} matrix has no edges; at least 2 regions are needed`, { file });
  const plan = labelPlan(container, file, options, n);
  const array = container.read(entry.name);
  const pairs = edgePairs(n);
  const data = allocateEdgeData(subjects.length, pairs.edgeCount, { file }, budget);
  const writer = new EdgeMajorWriter(pairs, data, subjects.length);
  const matrix = new Float64Array(n * n);
  const ordered = plan.order ? new Float64Array(n * n) : matrix;
  const problems: InputError[] = [];
  for (const subject of subjects) {
    if (subject.tableRow >= count) {
      problems.push(new InputError(`participant '${subject.id}' is row ${subject.tableRow + 1} of the participants table, but the stack holds only ${count} matrices`, { file }));
      writer.skip();
      continue;
    }
    loadSubject(writer, problems, () => {
      stackMatrix(array, axis, subject.tableRow, matrix);
      if (plan.order) reorderMatrix(matrix, n, plan.order, ordered);
      writer.add(ordered, 0, options, { file, label: `matrix ${subject.tableRow + 1} (participant '${subject.id}')` });
    });
  }
  const error = inputErrors(problems);
  if (error) throw error;
  return {
    regionCount: n,
    edgeCount: pairs.edgeCount,
    subjectCount: subjects.length,
    data,
    files: [file],
    sha256: [sha256Text(bytes)],
    ...(plan.fileLabels ? { labels: plan.fileLabels } : {}),
    reading: {
      reader: container.format,
      ...(entry.name !== "" ? { variable: entry.name } : {}),
      shape: [...entry.shape],
      subjectsAxis: axis,
      labels: plan.labels,
      ...(plan.order ? { reordered: true } : {}),
    },
  };
}

/** One container file per participant (files[s] for subjects[s]), each holding one N × N matrix. */
export function loadContainerFiles(files: string[], subjects: ContainerSubject[], options: ContainerOptions, budget?: EdgeDataBudget): ContainerConnectomes {
  const problems: InputError[] = [];
  let reference: { n: number; file: string; reading: MatrixReading; labels?: readonly string[]; order?: Int32Array } | undefined;
  let data: Float64Array | undefined;
  let writer: EdgeMajorWriter | undefined;
  const digests: string[] = [];
  const pending: number[] = [];
  for (let s = 0; s < subjects.length; s++) {
    const file = files[s];
    const hint = `connectivity matrix of participant '${subjects[s].id}'`;
    try {
      const { bytes, container } = openBinary(file, hint);
      digests[s] = sha256Text(bytes);
      const entry = chooseMatrix(container, file, options);
      const n = entry.shape[0];
      if (!reference) {
        if (n < 2) throw new InputError(`a ${n} × ${n} matrix has no edges; at least 2 regions are needed`, { file });
        const plan = labelPlan(container, file, options, n);
        reference = {
          n,
          file,
          labels: plan.fileLabels ?? container.labels,
          order: plan.order,
          reading: {
            reader: container.format,
            ...(entry.name !== "" ? { variable: entry.name } : {}),
            shape: [...entry.shape],
            labels: plan.labels,
            ...(plan.order ? { reordered: true } : {}),
          },
        };
        const pairs = edgePairs(n);
        data = allocateEdgeData(subjects.length, pairs.edgeCount, { file }, budget);
        writer = new EdgeMajorWriter(pairs, data, subjects.length);
        for (const _ of pending) writer.skip();
      } else if (n !== reference.n) {
        throw new InputError(`this matrix is ${n} × ${n}, but ${reference.file} is ${reference.n} × ${reference.n}; every participant's matrix must have the same regions`, { file });
      } else if (!sameLabels(container.labels, reference.labels)) {
        throw new InputError(`this file's region labels differ from those of ${reference.file}; every participant's file must name the same regions in the same order`, { file });
      }
      const matrix = container.read(entry.name).values;
      const order = reference.order;
      loadSubject(writer!, problems, () =>
        writer!.add(order ? reorderMatrix(matrix, reference!.n, order, new Float64Array(matrix.length)) : matrix, 0, options, { file }),
      );
    } catch (error) {
      if (!isInputError(error)) throw error;
      problems.push(error);
      if (writer) writer.skip();
      else pending.push(s);
    }
  }
  const error = inputErrors(problems);
  if (error) throw error;
  const pairs = edgePairs(reference!.n);
  return {
    regionCount: reference!.n,
    edgeCount: pairs.edgeCount,
    subjectCount: subjects.length,
    data: data!,
    files,
    sha256: digests,
    ...(reference!.reading.labels === "file" && reference!.labels ? { labels: [...reference!.labels] } : {}),
    reading: reference!.reading,
  };
}

function sameLabels(a: readonly string[] | undefined, b: readonly string[] | undefined): boolean {
  if (a === undefined || b === undefined) return a === b;
  return a.length === b.length && a.every((label, k) => label === b[k]);
}


