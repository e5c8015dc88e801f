import { Buffer } from "node:buffer";
import { createHash } from "node:crypto";
import { MessageChannel, Worker, receiveMessageOnPort, type MessagePort } from "node:worker_threads";
import { InputError, isInputError, type InputLocation } from "../errors.js";
import { edgePairs } from "../edges/edgeIndex.js";
import { availableThreads, workerScript } from "../parallel/workerPool.js";
import { EdgeMajorWriter, SUBJECT_BLOCK_SIZE, type EdgeExtractionOptions } from "./connectomeEdges.js";
import { parseMatrixBytes, type ParsedMatrixText } from "./matrixText.js";
import { TextFileReader } from "./readInputFile.js";

/**
 * Loading one text matrix per subject on two threads. The subjects are cut
 * into blocks of SUBJECT_BLOCK_SIZE; the calling thread and one worker thread
 * (textMatrixWorker.ts) each take the next block from a shared counter, read
 * and parse its files and write its subjects' columns of the shared edge-major
 * array (disjoint columns, so no locking). The calling thread waits for the
 * worker with Atomics.wait, so loading stays synchronous. The values are those
 * of the one-thread loader, and so is any error: each block stops at its first
 * bad file, and the error of the lowest failing block is the one raised, which
 * is the error the one-thread loader meets first. Whichever thread reads a
 * file also takes its SHA-256 from the bytes read, for the run's provenance.
 */
export interface TextBlockJob {
  /** Each subject's matrix file (resolved) and the hint for a read error. */
  files: string[];
  hints: string[];
  regionCount: number;
  /** The first subject's file, named when another file's size differs. */
  firstFile: string;
  /** The edge-major subjects × edges array, in a SharedArrayBuffer. */
  data: Float64Array;
  options: EdgeExtractionOptions;
  /** When given (see sharedDigests): each file's SHA-256, 32 bytes at 32 × subject, in a SharedArrayBuffer. */
  digests?: Uint8Array;
}

/** The worker's report of a block it could not load. */
export interface BlockFailure {
  block: number;
  input?: { message: string; location: InputLocation; hint?: string };
  internal?: string;
}

/** Tuning, read by connectomes.ts (tests lower the size to exercise two threads on small inputs). */
export const parallelTextLoading = {
  /** Below this many bytes of text in all (estimated from the first file), one thread reads everything. */
  minimumBytes: 16 * 1024 * 1024,
  /** How long the calling thread waits without any block finishing before it loads the rest itself. */
  stallMilliseconds: 60_000,
  /** false leaves every block to the worker (tests of the worker's side). */
  callingThreadLoads: true,
};

/** Control words in a shared Int32Array: the next block to take, blocks finished, then one status per block. */
const NEXT = 0;
const FINISHED = 1;
const STATUS = 2;
const DONE = 1;
const FAILED = 2;

/** Room for one SHA-256 digest (32 bytes) per subject, shared with the worker thread. */
export function sharedDigests(subjects: number): Uint8Array {
  return new Uint8Array(new SharedArrayBuffer(DIGEST_BYTES * subjects));
}

/** Subject `s`'s digest from sharedDigests, as hex. */
export function digestHex(digests: Uint8Array, s: number): string {
  return Buffer.from(digests.buffer, digests.byteOffset + DIGEST_BYTES * s, DIGEST_BYTES).toString("hex");
}

const DIGEST_BYTES = 32;

export function blockCount(subjects: number): number {
  return Math.ceil(subjects / SUBJECT_BLOCK_SIZE);
}

export function sizeMismatch(file: string, size: number, firstFile: string, regionCount: number, line: number | undefined): InputError {
  return new InputError(
    `this matrix is ${size} × ${size} but ${firstFile} is ${regionCount} × ${regionCount}; all matrices must have the same size`,
    { file, line },
  );
}

/** Reads, parses and writes the subjects of one block, in order; throws the first error. */
export function loadBlock(job: TextBlockJob, block: number, reader: TextFileReader, reuse: { matrix?: ParsedMatrixText }): void {
  const S = job.files.length;
  const first = block * SUBJECT_BLOCK_SIZE;
  const end = Math.min(S, first + SUBJECT_BLOCK_SIZE);
  const writer = new EdgeMajorWriter(edgePairs(job.regionCount), job.data, S, SUBJECT_BLOCK_SIZE, first, end);
  for (let s = first; s < end; s++) {
    const file = job.files[s];
    const bytes = reader.readBytes(file, job.hints[s]);
    if (job.digests) job.digests.set(createHash("sha256").update(bytes).digest(), DIGEST_BYTES * s);
    const matrix = parseMatrixBytes(bytes, file, { allowNonFiniteDiagonal: true }, reuse.matrix);
    reuse.matrix = matrix;
    if (matrix.size !== job.regionCount) throw sizeMismatch(file, matrix.size, job.firstFile, job.regionCount, matrix.rowLines[0]);
    writer.add(matrix.values, 0, job.options, { file, rowLines: matrix.rowLines });
  }
}

/** Takes blocks from the shared counter until none is left; failures go to `fail`. */
export function takeBlocks(job: TextBlockJob, control: Int32Array, fail: (block: number, error: unknown) => void): void {
  const blocks = blockCount(job.files.length);
  const reader = new TextFileReader();
  const reuse: { matrix?: ParsedMatrixText } = {};
  for (;;) {
    const block = Atomics.add(control, NEXT, 1);
    if (block >= blocks) return;
    finishBlock(control, block, () => loadBlock(job, block, reader, reuse), fail);
  }
}

function finishBlock(control: Int32Array, block: number, load: () => void, fail: (block: number, error: unknown) => void): void {
  let status = DONE;
  try {
    load();
  } catch (error) {
    status = FAILED;
    fail(block, error);
  }
  Atomics.store(control, STATUS + block, status);
  Atomics.add(control, FINISHED, 1);
  Atomics.notify(control, FINISHED);
}

/** Whether two threads are worth starting for `subjects` files of about `bytesPerFile` bytes each. */
export function worthTwoThreads(subjects: number, bytesPerFile: number): boolean {
  return availableThreads() >= 2 && subjects >= 2 * SUBJECT_BLOCK_SIZE && subjects * bytesPerFile >= parallelTextLoading.minimumBytes;
}

/** Loads every subject of the job on this thread and one worker thread; throws the lowest failing block's error. */
export function loadTextBlocksInParallel(job: TextBlockJob): void {
  const blocks = blockCount(job.files.length);
  const control = new Int32Array(new SharedArrayBuffer(4 * (STATUS + blocks)));
  const failures = new Map<number, unknown>();
  const fail = (block: number, error: unknown): void => void failures.set(block, error);
  const channel = new MessageChannel();
  let worker: Worker | undefined;
  try {
    worker = new Worker(workerScript("io/textMatrixWorker.js"), {
      workerData: { job, control, port: channel.port2 },
      transferList: [channel.port2],
    });
    worker.unref();
  } catch {
    worker = undefined; // no compiled worker script: this thread loads every block
  }
  try {
    if (parallelTextLoading.callingThreadLoads || !worker) takeBlocks(job, control, fail);
    awaitBlocks(job, control, blocks, fail);
    for (let message = receiveMessageOnPort(channel.port1); message; message = receiveMessageOnPort(channel.port1)) {
      const failure = message.message as BlockFailure;
      failures.set(failure.block, failureError(failure));
    }
  } finally {
    channel.port1.close();
    void worker?.terminate();
  }
  if (failures.size > 0) throw failures.get(Math.min(...failures.keys()));
}

/**
 * Waits until every block is finished. If none finishes for stallMilliseconds
 * (a worker that never started or stopped), this thread loads the blocks still
 * unfinished itself: they hold the same values whoever writes them.
 */
function awaitBlocks(job: TextBlockJob, control: Int32Array, blocks: number, fail: (block: number, error: unknown) => void): void {
  let last = Atomics.load(control, FINISHED);
  let waited = 0;
  while (last < blocks) {
    const slice = 250;
    Atomics.wait(control, FINISHED, last, slice);
    const now = Atomics.load(control, FINISHED);
    waited = now === last ? waited + slice : 0;
    last = now;
    if (waited >= parallelTextLoading.stallMilliseconds) {
      const reader = new TextFileReader();
      const reuse: { matrix?: ParsedMatrixText } = {};
      for (let block = 0; block < blocks; block++) {
        if (Atomics.load(control, STATUS + block) === 0) finishBlock(control, block, () => loadBlock(job, block, reader, reuse), fail);
      }
      return;
    }
  }
}

function failureError(failure: BlockFailure): Error {
  if (failure.input) return new InputError(failure.input.message, failure.input.location, failure.input.hint);
  return new Error(`loading connectivity matrices on a worker thread failed: ${failure.internal ?? "unknown error"}`);
}

/** The worker's side: load blocks, report failures through the port. */
export function runBlockWorker(job: TextBlockJob, control: Int32Array, port: MessagePort): void {
  takeBlocks(job, control, (block, error) => {
    const failure: BlockFailure = isInputError(error)
      ? { block, input: { message: error.message, location: error.location, hint: error.hint } }
      : { block, internal: error instanceof Error ? (error.stack ?? error.message) : String(error) };
    port.postMessage(failure);
  });
}
