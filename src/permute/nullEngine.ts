import { availableThreads, runOnWorkers, workerScript } from "../parallel/workerPool.js";
import { computeNullRange } from "./nullRange.js";
import type { NullChunk, NullContext } from "./nullRangeTypes.js";

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

export const defaultThreads = availableThreads;

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
    await runOnWorkers<{ from: number; to: number }, NullChunk>({
      script: workerScript("permute/nullWorker.js"),
      workerData: context,
      threads,
      tasks: pending,
      onResult: (chunk) => {
        results.set(chunk.from, chunk);
        report();
      },
    });
  }
  return concatenateChunks(ranges.map((range) => results.get(range.from)!), options.from, options.to);
}

export function concatenateChunks(chunks: NullChunk[], from: number, to: number): NullChunk {
  const count = to - from;
  const extraNames = chunks[0]?.extraNames ?? [];
  const out: NullChunk = {
    from,
    to,
    maxExtent: new Float64Array(count),
    maxMass: new Float64Array(count),
    maxStatistic: new Float64Array(count),
    extraNames,
    extra: extraNames.map(() => new Float64Array(count)),
  };
  for (const chunk of chunks) {
    out.maxExtent.set(chunk.maxExtent, chunk.from - from);
    out.maxMass.set(chunk.maxMass, chunk.from - from);
    out.maxStatistic.set(chunk.maxStatistic, chunk.from - from);
    chunk.extra.forEach((values, j) => out.extra[j].set(values, chunk.from - from));
  }
  return out;
}
