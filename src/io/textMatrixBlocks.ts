import { Buffer } from "node:buffer";
import { createHash } from "node:crypto";
import { InputError } from "../errors.js";
import { loadSubject } from "./matrixProblems.js";
import { edgePairs } from "../edges/edgeIndex.js";
import { EdgeMajorWriter, SUBJECT_BLOCK_SIZE, type EdgeExtractionOptions } from "./connectomeEdges.js";
import type { BlockLoader } from "./blockLoader.js";
import { blockSubjects } from "./subjectBlocks.js";
import type { ParsedMatrixText } from "./matrixText.js";
import { reorderMatrix } from "./arrays/regionLabels.js";
import { labelMismatch } from "./textLabelPlan.js";
import { parseMatrixFile } from "./textMatrixFile.js";
import { TextFileReader } from "./readInputFile.js";

/**
 * Blocks of subjects from one text matrix file each (matrixBlocks.ts runs them
 * on two threads). Whichever thread reads a file also takes its SHA-256 from
 * the bytes read, for the run's provenance.
 */
export interface TextBlockJob {
  kind: "text";
  subjectCount: number;
  /** Each subject's matrix file (resolved) and the hint for a read error. */
  files: string[];
  hints: string[];
  regionCount: number;
  /** The file whose size every matrix must have (the first that reads), named when another file's size differs. */
  firstFile: string;
  /** The edge-major subjects × edges array, in a SharedArrayBuffer. */
  data: Float64Array;
  options: EdgeExtractionOptions;
  /** When given (see sharedDigests): each file's SHA-256, 32 bytes at 32 × subject, in a SharedArrayBuffer. */
  digests?: Uint8Array;
  /** The first file's region labels (a header row or a label column), which every file must repeat; absent when it names none. */
  firstLabels?: string[];
  /** With a regions table in another order: order[k] is the files' index of the table's k-th region (textLabelPlan.ts). */
  order?: Int32Array;
  /** The regions table's labels, for messages about reordered matrices. */
  orderedLabels?: string[];
}

/** Room for one SHA-256 digest (32 bytes) per subject, shared with the worker thread. */
export function sharedDigests(subjects: number): Uint8Array {
  return new Uint8Array(new SharedArrayBuffer(DIGEST_BYTES * subjects));
}

/** Subject `s`'s digest from sharedDigests, as hex. */
export function digestHex(digests: Uint8Array, s: number): string {
  return Buffer.from(digests.buffer, digests.byteOffset + DIGEST_BYTES * s, DIGEST_BYTES).toString("hex");
}

const DIGEST_BYTES = 32;

export function sizeMismatch(file: string, size: number, firstFile: string, regionCount: number, line: number | undefined): InputError {
  return new InputError(
    `this matrix is ${size} × ${size} but ${firstFile} is ${regionCount} × ${regionCount}; all matrices must have the same size`,
    { file, line },
  );
}

/** A loader of text blocks holding one reader (byte buffer) and one matrix's arrays between files. */
export function textBlockLoader(job: TextBlockJob): BlockLoader {
  const reader = new TextFileReader();
  let reuse: ParsedMatrixText | undefined;
  const pairs = edgePairs(job.regionCount);
  const reordered = job.order ? new Float64Array(job.regionCount * job.regionCount) : undefined;
  return {
    load(block) {
      const S = job.subjectCount;
      const { first, end } = blockSubjects(block, S);
      const writer = new EdgeMajorWriter(pairs, job.data, S, SUBJECT_BLOCK_SIZE, first, end);
      const problems: InputError[] = [];
      for (let s = first; s < end; s++) {
        loadSubject(writer, problems, () => {
          const file = job.files[s];
          const bytes = reader.readBytes(file, job.hints[s]);
          if (job.digests) job.digests.set(createHash("sha256").update(bytes).digest(), DIGEST_BYTES * s);
          const matrix = parseMatrixFile(bytes, file, { allowNonFiniteDiagonal: true, allowMissing: job.options.missing === "drop" }, reuse);
          reuse = matrix;
          if (matrix.size !== job.regionCount) throw sizeMismatch(file, matrix.size, job.firstFile, job.regionCount, matrix.rowLines[0]);
          const mismatch = labelMismatch(matrix.labels, job.firstLabels, job.firstFile, file);
          if (mismatch) throw mismatch;
          const shift = matrix.labels?.labelColumn ? 1 : 0;
          if (job.order && reordered) {
            const order = job.order;
            reorderMatrix(matrix.values, job.regionCount, order, reordered);
            writer.add(reordered, 0, job.options, {
              file,
              rowLines: Array.from(order, (k) => matrix.rowLines[k]),
              columns: Array.from(order, (k) => k + 1 + shift),
              ...(job.orderedLabels ? { regionLabels: job.orderedLabels } : {}),
            });
          } else {
            const columns = shift ? Array.from({ length: job.regionCount }, (_, j) => j + 2) : undefined;
            writer.add(matrix.values, 0, job.options, { file, rowLines: matrix.rowLines, ...(columns ? { columns } : {}) });
          }
        });
      }
      return problems;
    },
    close() {},
  };
}
