import { InputError } from "../errors.js";
import { loadSubject } from "./matrixProblems.js";
import { edgePairs } from "../edges/edgeIndex.js";
import { EdgeMajorWriter, SUBJECT_BLOCK_SIZE, type EdgeExtractionOptions } from "./connectomeEdges.js";
import type { BlockLoader } from "./blockLoader.js";
import { blockSubjects } from "./subjectBlocks.js";
import { decodeNpyValues, isNativeFloat64, type NpyHeader } from "./npy.js";
import { InputFile } from "./readInputFile.js";

/**
 * Blocks of subjects from a C-order (R, N, N) .npy stack (matrixBlocks.ts runs
 * them on two threads): each thread opens the file itself and reads each
 * subject's matrix at its byte offset, as the one-thread loader does.
 */
export interface NpyBlockJob {
  kind: "npy";
  subjectCount: number;
  file: string;
  hint: string;
  header: NpyHeader;
  /** Each subject's row of the stack (its participants-table row) and id. */
  tableRows: number[];
  ids: string[];
  data: Float64Array;
  options: EdgeExtractionOptions;
}

/** The label naming a matrix of the stack in errors. */
export function stackMatrixLabel(row: number, id: string): string {
  return `matrix ${row + 1} of the stack (participant '${id}')`;
}

/** Fills `target` from `position`; a file that ends sooner (it changed after its size was taken) is an InputError. */
export function readExactly(input: InputFile, target: Uint8Array, position: number, what: string): void {
  const got = input.readAt(target, position);
  if (got < target.length) {
    throw new InputError(
      `not a readable .npy file: truncated data: the file ends at byte ${position + got}, within ${what} ` +
        `(it held ${input.size} bytes when opened; was it changed while being read?)`,
      { file: input.path },
    );
  }
}

/** Matrix `row` of a C-order stack, read at its offset into one reused array. */
export function cOrderMatrices(input: InputFile, header: NpyHeader): (row: number) => Float64Array {
  const n = header.shape[1];
  const values = n * n;
  const matrixBytes = values * header.dtype.itemSize;
  const matrix = new Float64Array(values);
  const native = isNativeFloat64(header.dtype);
  const raw = native ? new Uint8Array(matrix.buffer) : new Uint8Array(matrixBytes);
  return (row) => {
    readExactly(input, raw, header.dataOffset + row * matrixBytes, `matrix ${row + 1}`);
    if (!native) decodeNpyValues(raw, 0, values, header.dtype, matrix, 0);
    return matrix;
  };
}

export function npyBlockLoader(job: NpyBlockJob): BlockLoader {
  const n = job.header.shape[1];
  const pairs = edgePairs(n);
  let input: InputFile | undefined;
  let matrixOf: ((row: number) => Float64Array) | undefined;
  return {
    load(block) {
      if (!input || !matrixOf) {
        input = InputFile.open(job.file, job.hint);
        matrixOf = cOrderMatrices(input, job.header);
      }
      const S = job.subjectCount;
      const { first, end } = blockSubjects(block, S);
      const writer = new EdgeMajorWriter(pairs, job.data, S, SUBJECT_BLOCK_SIZE, first, end);
      const problems: InputError[] = [];
      for (let s = first; s < end; s++) {
        const row = job.tableRows[s];
        loadSubject(writer, problems, () => writer.add(matrixOf!(row), 0, job.options, { file: job.file, label: stackMatrixLabel(row, job.ids[s]) }));
      }
      return problems;
    },
    close() {
      input?.close();
    },
  };
}
