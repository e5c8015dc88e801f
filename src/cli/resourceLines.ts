import { formatBytes } from "../io/edgeData.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import { holdsSecondCopy } from "../run/prepareAnalysis.js";
import { machineMemory, planMemory, requestGigabytes, type MemoryLimit } from "../run/memoryPlan.js";
import { estimateRun, formatDuration } from "../run/runEstimate.js";

/**
 * `plexus check`'s lines on resources: the edge data in memory and the run's
 * estimated peak against the memory available, and the run's estimated time on
 * this machine (a short calibration, run/runEstimate.ts), with the time the
 * check itself took to read the inputs.
 */
export function resourceLines(
  prepared: PreparedAnalysis,
  options: { threads: number; shard?: { index: number; count: number }; limit?: MemoryLimit; readSeconds: number },
): string[] {
  const S = prepared.connectomes.subjectCount;
  const E = prepared.connectomes.edgeCount;
  const limit = options.limit ?? machineMemory();
  const plan = planMemory({ subjects: S, edges: E, secondCopy: holdsSecondCopy(prepared.design), threads: options.threads }, limit);
  const estimate = estimateRun(prepared, { threads: options.threads, ...(options.shard ? { shard: options.shard } : {}) });
  const total = estimate.totalSeconds + options.readSeconds;
  const perContrast = estimate.contrasts.map(
    (c) => `${c.name}: ${c.relabelings} relabelings × ${perRelabeling(c.secondsPerRelabeling)} on one thread`,
  );
  return [
    `memory      edge data ${formatBytes(plan.dataBytes)} (${S} participants × ${E} edges in double precision); peak about ${formatBytes(plan.peakBytes)}; ${limit.source} ${formatBytes(plan.limitBytes)}` +
      (options.shard ? `; request ${requestGigabytes(plan.peakBytes)} GB per shard task (each holds all the data)` : ""),
    `time        ${total < 1 ? "" : "about "}${formatDuration(total)}${options.shard ? ` for shard ${options.shard.index}/${options.shard.count}` : ""} on ${options.threads} thread${options.threads === 1 ? "" : "s"} of this machine: inputs read in ${formatDuration(options.readSeconds)} (this check), ` +
      `fit ${formatDuration(estimate.fitSeconds)}` +
      (perContrast.length ? `, ${perContrast.join("; ")}` : "") +
      `, results ${formatDuration(estimate.writeSeconds)} (calibrated on invented data of this design's shape)`,
  ];
}

/** "35 µs", "1.6 ms", "0.41 s": a relabeling's time on one thread. */
function perRelabeling(seconds: number): string {
  if (seconds < 1e-4) return `${Math.max(1, Math.round(seconds * 1e6))} µs`;
  if (seconds < 0.1) return `${(seconds * 1000).toFixed(1)} ms`;
  return `${seconds.toFixed(2)} s`;
}
