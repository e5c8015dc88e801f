import { existsSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import { computeNullRange, type NullChunk, type NullContext } from "./nullRange.js";

/**
 * Runs relabelings from..to−1 in chunks, on the calling thread or on worker
 * threads that share the residuals through a SharedArrayBuffer. Chunks are
 * handed out as workers fall idle but reported in order, so the results
 * never depend on scheduling.
 */
export interface EngineOptions {
  threads: number;
  from: number;
  to: number;
  /** Relabelings per chunk (the unit of checkpointing and progress). */
  chunkSize: number;
  /** Chunks already done (from a checkpoint), keyed by their first k. */
  done?: Map<number, NullChunk>;
  /** Called for each chunk, in order of k. */
  onChunk?: (chunk: NullChunk, fresh: boolean) => void;
}

export function defaultThreads(): number {
  return Math.max(1, typeof os.availableParallelism === "function" ? os.availableParallelism() : os.cpus().length);
}

/** The chunk grid: chunk boundaries are fixed by chunkSize, so checkpoints line up across runs. */
export function chunkRanges(from: number, to: number, chunkSize: number): { from: number; to: number }[] {
  const out: { from: number; to: number }[] = [];
  for (let start = from; start < to; ) {
    const end = Math.min(to, (Math.floor((start - 1) / chunkSize) + 1) * chunkSize + 1);
    out.push({ from: start, to: end });
    start = end;
  }
  return out;
}

function workerScript(): string {
  const here = fileURLToPath(import.meta.url);
  const sibling = path.join(path.dirname(here), "nullWorker.js");
  if (existsSync(sibling)) return sibling;
  // Running from the TypeScript sources (tests): use the compiled worker.
  const compiled = path.resolve(path.dirname(here), "../../dist/permute/nullWorker.js");
  if (existsSync(compiled)) return compiled;
  throw new Error(`the permutation worker script is missing (looked for ${sibling} and ${compiled}); run npm run build`);
}

export async function runNullEngine(context: NullContext, options: EngineOptions): Promise<NullChunk> {
  const ranges = chunkRanges(options.from, options.to, options.chunkSize);
  const results = new Map<number, NullChunk>();
  let nextToReport = 0;
  const report = () => {
    while (nextToReport < ranges.length && results.has(ranges[nextToReport].from)) {
      const range = ranges[nextToReport];
      options.onChunk?.(results.get(range.from)!, !options.done?.has(range.from));
      nextToReport++;
    }
  };
  const pending = ranges.filter((range) => {
    const done = options.done?.get(range.from);
    if (done && done.to === range.to) {
      results.set(range.from, done);
      return false;
    }
    return true;
  });
  report();
  const threads = Math.max(1, Math.min(options.threads, pending.length));
  if (threads <= 1) {
    for (const range of pending) {
      results.set(range.from, computeNullRange(context, range.from, range.to));
      report();
      // Let progress output and signals through between chunks.
      await new Promise((resolve) => setImmediate(resolve));
    }
  } else {
    const script = workerScript();
    const queue = [...pending];
    const workers: Worker[] = [];
    try {
      await Promise.all(
        Array.from({ length: threads }, () =>
          new Promise<void>((resolve, reject) => {
            const worker = new Worker(script, { workerData: context });
            workers.push(worker);
            const feed = () => {
              const range = queue.shift();
              if (!range) {
                resolve();
                return;
              }
              worker.postMessage(range);
            };
            worker.on("message", (chunk: NullChunk) => {
              // A failing onChunk (e.g. a checkpoint write on a full disk) must reject the run, not escape the handler.
              try {
                results.set(chunk.from, chunk);
                report();
                feed();
              } catch (error) {
                reject(error);
              }
            });
            worker.on("error", reject);
            worker.on("exit", (code) => {
              if (code !== 0) reject(new Error(`a permutation worker stopped with exit code ${code}`));
            });
            feed();
          }),
        ),
      );
    } finally {
      await Promise.all(workers.map((w) => w.terminate()));
    }
  }
  return concatenateChunks(ranges.map((range) => results.get(range.from)!), options.from, options.to);
}

export function concatenateChunks(chunks: NullChunk[], from: number, to: number): NullChunk {
  const count = to - from;
  const out: NullChunk = {
    from,
    to,
    maxExtent: new Float64Array(count),
    maxMass: new Float64Array(count),
    maxStatistic: new Float64Array(count),
  };
  for (const chunk of chunks) {
    out.maxExtent.set(chunk.maxExtent, chunk.from - from);
    out.maxMass.set(chunk.maxMass, chunk.from - from);
    out.maxStatistic.set(chunk.maxStatistic, chunk.from - from);
  }
  return out;
}
