import { createHash } from "node:crypto";
import { statSync } from "node:fs";
import path from "node:path";
import type { Progress } from "../src/common/progress.js";
import { selectKernel } from "../src/permute/kernels/selectKernel.js";
import { runNullEngine } from "../src/permute/nullEngine.js";
import type { NullChunk } from "../src/permute/nullRangeTypes.js";
import { prepareAnalysis } from "../src/run/prepareAnalysis.js";
import { runAnalysis } from "../src/run/runAnalysis.js";
import { estimateRun } from "../src/run/runEstimate.js";
import { CACHE } from "./cohorts.js";
import { benchGroupTables } from "./groupTables.js";
import { benchReadMatrixText } from "./readMatrixText.js";
import { syntheticNull } from "./syntheticNull.js";

/**
 * One measurement, run in its own process by bench/run.ts so that its peak
 * resident memory is its own: `node scenario.js '<json request>'` prints one
 * JSON line. The kernel is chosen by PLEXUS_KERNEL in the environment.
 */
export type Request =
  | { kind: "analysis"; name: string; design: string; threads: number; prefixRows?: number }
  | { kind: "estimate"; design: string; threads: number }
  | { kind: "null"; subjects: number; regions: number; covariates: boolean; permutations: number; threads: number }
  | { kind: "read"; design: string }
  | { kind: "matrixText" }
  | { kind: "groupTables" };

export interface Measurement {
  kernel: string;
  seconds: number;
  /** CPU time of the process (all threads, user + system). */
  cpuSeconds: number;
  /** Time of the permutations alone, and its CPU time. */
  nullSeconds?: number;
  nullCpuSeconds?: number;
  subjects?: number;
  edges?: number;
  vectors?: number;
  permutations?: number;
  /** SHA-256 of the null rows (extent, mass, statistic), to show the kernels agree. */
  nullHash?: string;
  /** The same hash over the first `prefixRows` relabelings only (a reference run of those alone must match). */
  prefixHash?: string;
  /** estimate: plexus check's estimate of the run (read time measured, the rest calibrated). */
  estimateSeconds?: number;
  megabytes?: number;
  megabytesPerSecond?: number;
  /** groupTables: ms per relabeling for each chunk size. */
  groupTables?: { chunkSize: number; msPerRelabeling: number; chosen: boolean }[];
  peakRssMegabytes: number;
}

function nullHash(rows: NullChunk, count = rows.maxExtent.length): string {
  const hash = createHash("sha256");
  for (const column of [rows.maxExtent, rows.maxMass, rows.maxStatistic]) {
    hash.update(new Uint8Array(column.buffer, column.byteOffset, Math.min(count, column.length) * 8));
  }
  return hash.digest("hex");
}

const peakRss = (): number => process.resourceUsage().maxRSS / 1024;
const cpuNow = (): number => {
  const { user, system } = process.cpuUsage();
  return (user + system) / 1e6;
};

async function measure(request: Request): Promise<Omit<Measurement, "kernel" | "peakRssMegabytes" | "cpuSeconds">> {
  if (request.kind === "analysis") {
    let nullStart = 0;
    let nullCpuStart = 0;
    let nullSeconds = 0;
    let nullCpuSeconds = 0;
    const progress: Progress = {
      start: () => {
        nullStart = performance.now();
        nullCpuStart = cpuNow();
      },
      advance: () => {},
      finish: () => {
        nullSeconds += (performance.now() - nullStart) / 1000;
        nullCpuSeconds += cpuNow() - nullCpuStart;
      },
    };
    const quiet = { info: () => {}, warn: () => {} };
    const start = performance.now();
    const result = await runAnalysis(
      { designFile: request.design, out: path.join(CACHE, "results", request.name), force: true, threads: request.threads },
      quiet,
      progress,
    );
    const seconds = (performance.now() - start) / 1000;
    const contrastNull = result.nulls[0];
    return {
      seconds,
      nullSeconds,
      nullCpuSeconds,
      subjects: result.prepared.connectomes.subjectCount,
      edges: result.prepared.connectomes.edgeCount,
      vectors: contrastNull?.setup.context.vectors.length,
      permutations: contrastNull?.rows.maxExtent.length,
      nullHash: contrastNull ? nullHash(contrastNull.rows) : undefined,
      prefixHash: contrastNull && request.prefixRows ? nullHash(contrastNull.rows, request.prefixRows) : undefined,
    };
  }
  if (request.kind === "estimate") {
    const start = performance.now();
    const prepared = prepareAnalysis(request.design, { memory: { threads: request.threads } });
    const readSeconds = (performance.now() - start) / 1000;
    const estimate = estimateRun(prepared, { threads: request.threads });
    return { seconds: (performance.now() - start) / 1000, estimateSeconds: readSeconds + estimate.totalSeconds };
  }
  if (request.kind === "null") {
    const context = syntheticNull(request);
    const start = performance.now();
    const cpuStart = cpuNow();
    // Chunks of a quarter of each thread's share, so every thread has work.
    const chunkSize = Math.max(1, Math.ceil(request.permutations / (4 * request.threads)));
    const rows = await runNullEngine(context, { threads: request.threads, from: 1, to: request.permutations + 1, chunkSize });
    const seconds = (performance.now() - start) / 1000;
    return {
      seconds,
      nullSeconds: seconds,
      nullCpuSeconds: cpuNow() - cpuStart,
      subjects: request.subjects,
      edges: context.kernel.edges,
      vectors: context.vectors.length,
      permutations: request.permutations,
      nullHash: nullHash(rows),
    };
  }
  if (request.kind === "read") {
    const start = performance.now();
    const prepared = prepareAnalysis(request.design);
    const seconds = (performance.now() - start) / 1000;
    const bytes = prepared.connectomes.files.reduce((sum, file) => sum + statSync(file).size, 0);
    return {
      seconds,
      subjects: prepared.connectomes.subjectCount,
      edges: prepared.connectomes.edgeCount,
      megabytes: bytes / 1e6,
      megabytesPerSecond: bytes / 1e6 / seconds,
    };
  }
  if (request.kind === "groupTables") {
    const start = performance.now();
    const groupTables = benchGroupTables();
    return { seconds: (performance.now() - start) / 1000, groupTables };
  }
  const { megabytesPerSecond, megabytes } = benchReadMatrixText();
  return { seconds: megabytes / megabytesPerSecond, megabytes, megabytesPerSecond };
}

const request = JSON.parse(process.argv[2] ?? "{}") as Request;
const cpuStart = cpuNow();
const result = await measure(request);
const measurement: Measurement = { kernel: selectKernel().name, ...result, cpuSeconds: cpuNow() - cpuStart, peakRssMegabytes: peakRss() };
process.stdout.write(`${JSON.stringify(measurement)}\n`);
