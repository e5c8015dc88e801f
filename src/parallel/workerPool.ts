import { existsSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import { packSharedViews } from "./sharedViews.js";

/**
 * A small pool of worker threads: each worker gets the same `workerData`
 * (typed arrays over SharedArrayBuffers are shared, not copied: they travel as
 * their buffers, sharedViews.ts, and the worker reads them with `unpackSharedViews`), tasks are
 * handed out as workers fall idle, and every result is passed to `onResult`
 * as it arrives. Callers order results themselves, so nothing depends on
 * scheduling. An error in a worker or in `onResult` rejects the run and
 * stops every worker.
 */
export async function runOnWorkers<Task, Result>(options: {
  script: string;
  workerData: unknown;
  threads: number;
  tasks: Task[];
  onResult: (result: Result) => void;
}): Promise<void> {
  const queue = [...options.tasks];
  const threads = Math.max(1, Math.min(options.threads, queue.length));
  const workers: Worker[] = [];
  const workerData = packSharedViews(options.workerData);
  try {
    await Promise.all(
      Array.from(
        { length: threads },
        () =>
          new Promise<void>((resolve, reject) => {
            const worker = new Worker(options.script, { workerData });
            workers.push(worker);
            const feed = () => {
              const task = queue.shift();
              if (task === undefined) resolve();
              else worker.postMessage(task);
            };
            worker.on("message", (result: Result) => {
              try {
                options.onResult(result);
                feed();
              } catch (error) {
                reject(error);
              }
            });
            worker.on("error", reject);
            worker.on("exit", (code) => {
              if (code !== 0) reject(new Error(`a worker thread stopped with exit code ${code}`));
            });
            feed();
          }),
      ),
    );
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
}

/**
 * The compiled worker script `relative` (e.g. "permute/nullWorker.js") beside
 * this module in dist/, or — when running from the TypeScript sources, as the
 * tests do — in the compiled dist/ folder of the project.
 */
export function workerScript(relative: string): string {
  const here = path.dirname(fileURLToPath(import.meta.url));
  const sibling = path.resolve(here, "..", relative);
  if (existsSync(sibling)) return sibling;
  const compiled = path.resolve(here, "../../dist", relative);
  if (existsSync(compiled)) return compiled;
  throw new Error(`the worker script ${relative} is missing (looked for ${sibling} and ${compiled}); run npm run build`);
}

export function availableThreads(): number {
  return Math.max(1, typeof os.availableParallelism === "function" ? os.availableParallelism() : os.cpus().length);
}
