import { MessageChannel, Worker, receiveMessageOnPort, type MessagePort } from "node:worker_threads";
import { InputError, inputErrors, isInputError, type InputLocation } from "../errors.js";
import { availableThreads, workerScript } from "../parallel/workerPool.js";
import { packSharedViews } from "../parallel/sharedViews.js";
import type { BlockLoader } from "./blockLoader.js";
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
 * of the one-thread loader (loadBlocksInOrder), and so is any error: each block
 * goes on past a bad matrix and reports every one, and the problems of all
 * blocks are raised together in subject order (block by block), whichever
 * thread loaded which block.
 */
export type BlockJob = TextBlockJob | NpyBlockJob;

/** The worker's report of a block it could not load: the problems with its matrices, or a bug. */
export interface BlockFailure {
  block: number;
  inputs?: { message: string; location: InputLocation; hint?: string }[];
  internal?: string;
}

/** What went wrong in one block: the located problems with its matrices, or an error that is a bug. */
type Failure = InputError[] | Error;

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
function takeBlocks(job: BlockJob, control: Int32Array, fail: (block: number, failure: Failure) => void): void {
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

function finishBlock(control: Int32Array, block: number, load: () => InputError[], fail: (block: number, failure: Failure) => void): void {
  let status = DONE;
  try {
    const problems = load();
    if (problems.length > 0) {
      status = FAILED;
      fail(block, problems);
    }
  } catch (error) {
    status = FAILED;
    fail(block, isInputError(error) ? [error] : error instanceof Error ? error : new Error(String(error)));
  }
  Atomics.store(control, STATUS + block, status);
  Atomics.add(control, FINISHED, 1);
  Atomics.notify(control, FINISHED);
}

/** Whether two threads are worth starting for `subjects` matrices of about `bytesPerSubject` bytes each. */
export function worthTwoThreads(subjects: number, bytesPerSubject: number): boolean {
  return availableThreads() >= 2 && subjects >= 2 * SUBJECT_BLOCK_SIZE && subjects * bytesPerSubject >= parallelLoading.minimumBytes;
}

/** Loads every subject of the job on this thread alone, block after block; throws every problem found (failureOf). */
export function loadBlocksInOrder(job: BlockJob): void {
  const blocks = blockCount(job.subjectCount);
  const control = new Int32Array(STATUS + blocks);
  const failures = new Map<number, Failure>();
  const loader = blockLoaderFor(job);
  try {
    for (let block = 0; block < blocks; block++) finishBlock(control, block, () => loader.load(block), (b, failure) => void failures.set(b, failure));
  } finally {
    loader.close();
  }
  throwFailures(failures);
}

/**
 * The failures of all blocks as one error: a bug (the lowest block's) if there
 * is one, else every block's problems in block order, so in subject order.
 */
function throwFailures(failures: Map<number, Failure>): void {
  if (failures.size === 0) return;
  const blocks = [...failures.keys()].sort((a, b) => a - b);
  const bug = blocks.map((block) => failures.get(block)!).find((failure) => !Array.isArray(failure));
  if (bug) throw bug;
  throw inputErrors(blocks.flatMap((block) => failures.get(block) as InputError[]))!;
}

/** Loads every subject of the job on this thread and one worker thread; throws every problem found, as loadBlocksInOrder does. */
export function loadBlocksInParallel(job: BlockJob): void {
  const blocks = blockCount(job.subjectCount);
  const control = new Int32Array(new SharedArrayBuffer(4 * (STATUS + blocks)));
  const failures = new Map<number, Failure>();
  const fail = (block: number, failure: Failure): void => void failures.set(block, failure);
  const channel = new MessageChannel();
  let worker: Worker | undefined;
  try {
    worker = new Worker(workerScript("io/matrixBlockWorker.js"), {
      workerData: packSharedViews({ job, control, port: channel.port2 }),
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
  throwFailures(failures);
}

/**
 * Waits until every block is finished. If none finishes for stallMilliseconds
 * (a worker that never started or stopped), this thread loads the blocks still
 * unfinished itself: they hold the same values whoever writes them.
 */
function awaitBlocks(job: BlockJob, control: Int32Array, blocks: number, fail: (block: number, failure: Failure) => void): void {
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

function failureError(failure: BlockFailure): Failure {
  if (failure.inputs) return failure.inputs.map((input) => new InputError(input.message, input.location, input.hint));
  return new Error(`loading connectivity matrices on a worker thread failed: ${failure.internal ?? "unknown error"}`);
}

/** The worker's side: load blocks, report failures through the port. */
export function runBlockWorker(job: BlockJob, control: Int32Array, port: MessagePort): void {
  takeBlocks(job, control, (block, failure) => {
    const report: BlockFailure = Array.isArray(failure)
      ? { block, inputs: failure.map((error) => ({ message: error.message, location: error.location, hint: error.hint })) }
      : { block, internal: failure.stack ?? failure.message };
    port.postMessage(report);
  });
}
