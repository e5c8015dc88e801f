import { MessageChannel, Worker, receiveMessageOnPort, type MessagePort } from "node:worker_threads";
import { InputError, isInputError, type InputLocation } from "../errors.js";
import { availableThreads, workerScript } from "../parallel/workerPool.js";
import { SUBJECT_BLOCK_SIZE } from "./connectomeEdges.js";
import { npyBlockLoader, type NpyBlockJob } from "./npyMatrixBlocks.js";
import { blockCount } from "./subjectBlocks.js";
import { textBlockLoader, type TextBlockJob } from "./textMatrixBlocks.js";

/**
 * Loading one matrix per subject on two threads. The subjects are cut into
 * blocks of SUBJECT_BLOCK_SIZE; the calling thread and one worker thread
 * (matrixBlockWorker.ts) each take the next block from a shared counter, read
 * its matrices (text files: textMatrixBlocks.ts; a .npy stack:
 * npyMatrixBlocks.ts) and write its subjects' columns of the shared edge-major
 * array (disjoint columns, so no locking). The calling thread waits for the
 * worker with Atomics.wait, so loading stays synchronous. The values are those
 * of the one-thread loader, and so is any error: each block stops at its first
 * bad matrix, and the error of the lowest failing block is the one raised,
 * which is the error the one-thread loader meets first.
 */
export type BlockJob = TextBlockJob | NpyBlockJob;

/** Loads blocks of one job on one thread (holding its reader and buffers between blocks). */
export interface BlockLoader {
  /** Reads and writes the subjects of `block`, in order; throws the first error. */
  load(block: number): void;
  close(): void;
}

/** The worker's report of a block it could not load. */
export interface BlockFailure {
  block: number;
  input?: { message: string; location: InputLocation; hint?: string };
  internal?: string;
}

/** Tuning, read by connectomes.ts (tests lower the size to exercise two threads on small inputs). */
export const parallelLoading = {
  /** Below this many bytes of input in all, one thread reads everything. */
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

function blockLoaderFor(job: BlockJob): BlockLoader {
  return job.kind === "text" ? textBlockLoader(job) : npyBlockLoader(job);
}

/** Takes blocks from the shared counter until none is left; failures go to `fail`. */
function takeBlocks(job: BlockJob, control: Int32Array, fail: (block: number, error: unknown) => void): void {
  const blocks = blockCount(job.subjectCount);
  const loader = blockLoaderFor(job);
  try {
    for (;;) {
      const block = Atomics.add(control, NEXT, 1);
      if (block >= blocks) return;
      finishBlock(control, block, () => loader.load(block), fail);
    }
  } finally {
    loader.close();
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

/** Whether two threads are worth starting for `subjects` matrices of about `bytesPerSubject` bytes each. */
export function worthTwoThreads(subjects: number, bytesPerSubject: number): boolean {
  return availableThreads() >= 2 && subjects >= 2 * SUBJECT_BLOCK_SIZE && subjects * bytesPerSubject >= parallelLoading.minimumBytes;
}

/** Loads every subject of the job on this thread and one worker thread; throws the lowest failing block's error. */
export function loadBlocksInParallel(job: BlockJob): void {
  const blocks = blockCount(job.subjectCount);
  const control = new Int32Array(new SharedArrayBuffer(4 * (STATUS + blocks)));
  const failures = new Map<number, unknown>();
  const fail = (block: number, error: unknown): void => void failures.set(block, error);
  const channel = new MessageChannel();
  let worker: Worker | undefined;
  try {
    worker = new Worker(workerScript("io/matrixBlockWorker.js"), {
      workerData: { job, control, port: channel.port2 },
      transferList: [channel.port2],
    });
    worker.unref();
  } catch {
    worker = undefined; // no compiled worker script: this thread loads every block
  }
  try {
    if (parallelLoading.callingThreadLoads || !worker) takeBlocks(job, control, fail);
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
function awaitBlocks(job: BlockJob, control: Int32Array, blocks: number, fail: (block: number, error: unknown) => void): void {
  let last = Atomics.load(control, FINISHED);
  let waited = 0;
  while (last < blocks) {
    const slice = 250;
    Atomics.wait(control, FINISHED, last, slice);
    const now = Atomics.load(control, FINISHED);
    waited = now === last ? waited + slice : 0;
    last = now;
    if (waited >= parallelLoading.stallMilliseconds) {
      const loader = blockLoaderFor(job);
      try {
        for (let block = 0; block < blocks; block++) {
          if (Atomics.load(control, STATUS + block) === 0) finishBlock(control, block, () => loader.load(block), fail);
        }
      } finally {
        loader.close();
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
export function runBlockWorker(job: BlockJob, control: Int32Array, port: MessagePort): void {
  takeBlocks(job, control, (block, error) => {
    const failure: BlockFailure = isInputError(error)
      ? { block, input: { message: error.message, location: error.location, hint: error.hint } }
      : { block, internal: error instanceof Error ? (error.stack ?? error.message) : String(error) };
    port.postMessage(failure);
  });
}
