import { readFileSync } from "node:fs";
import os from "node:os";
import { InputError, type InputLocation } from "../errors.js";
import { formatBytes, type EdgeDataBudget } from "../io/edgeData.js";

/**
 * The memory a run needs, from the cohort's shape, known before the matrices
 * are read. The edge data are held once, in double precision (8 bytes a value,
 * data[e·S + s]); a second copy exists for a while when the coverage rules
 * compact the data, when a design of paired differences forms them, or when
 * more than one contrast draws a null (each contrast's residuals but the last
 * are a copy; the last overwrites the data). Beyond the data: Node and the
 * loaders (BASE_BYTES) and each worker thread's kernel memory (THREAD_BYTES),
 * measured by `npm run bench` (scenario D: 206 MiB over the data on 2 threads).
 */
export interface MemoryNeeds {
  subjects: number;
  edges: number;
  /** Whether the data are held twice at some moment (coverage rules, paired differences, several permutation contrasts). */
  secondCopy: boolean;
  threads: number;
}

export interface MemoryPlan {
  dataBytes: number;
  /** The estimated peak resident memory of the run. */
  peakBytes: number;
  /** The memory the run may use: this machine's (or its control group's), or `--memory`. */
  limitBytes: number;
  /** Where the limit comes from, for messages: "this machine", "this process's control group", "--memory". */
  limitSource: string;
}

export const BASE_BYTES = 300e6;
export const THREAD_BYTES = 80e6;

export function planMemory(needs: MemoryNeeds, limit: MemoryLimit = machineMemory()): MemoryPlan {
  const dataBytes = needs.subjects * needs.edges * 8;
  const peakBytes = dataBytes * (needs.secondCopy ? 2 : 1) + BASE_BYTES + THREAD_BYTES * Math.max(1, needs.threads);
  return { dataBytes, peakBytes, limitBytes: limit.bytes, limitSource: limit.source };
}

export interface MemoryLimit {
  bytes: number;
  source: string;
}

/** The memory this process may use: the machine's total, or its control group's limit when lower (a container, a SLURM task). */
export function machineMemory(): MemoryLimit {
  const total = os.totalmem();
  const group = controlGroupLimit();
  return group !== undefined && group < total ? { bytes: group, source: "this process's control group (container or cluster task) allows" } : { bytes: total, source: "this machine has" };
}

function controlGroupLimit(): number | undefined {
  for (const file of ["/sys/fs/cgroup/memory.max", "/sys/fs/cgroup/memory/memory.limit_in_bytes"]) {
    try {
      const text = readFileSync(file, "utf8").trim();
      const bytes = Number(text);
      if (Number.isFinite(bytes) && bytes > 0) return bytes;
    } catch {
      // not this kind of control group
    }
  }
  return undefined;
}

/** The memory `--memory <GB>` names. */
export function givenMemory(gigabytes: number): MemoryLimit {
  return { bytes: gigabytes * 1e9, source: "--memory gives" };
}

/** Whole gigabytes to request for a peak, with a tenth to spare. */
export function requestGigabytes(peakBytes: number): number {
  return Math.ceil((peakBytes * 1.1) / 1e9);
}

/**
 * The budget the loaders ask before allocating the edge data: a run whose
 * estimated peak is beyond the limit is refused with the sizes and what to do.
 */
export function memoryBudget(needs: Omit<MemoryNeeds, "subjects" | "edges">, limit: MemoryLimit = machineMemory()): EdgeDataBudget {
  return (subjects: number, edges: number, location: InputLocation) => {
    const plan = planMemory({ ...needs, subjects, edges }, limit);
    if (plan.peakBytes <= plan.limitBytes) return;
    const request = requestGigabytes(plan.peakBytes);
    throw new InputError(
      `this cohort does not fit in memory: the edge data of ${subjects} participants × ${edges} edges take ${formatBytes(plan.dataBytes)} ` +
        `(double precision${needs.secondCopy ? ", held twice for a while by this design" : ""}), and the run would need about ${formatBytes(plan.peakBytes)} at its peak; ` +
        `${plan.limitSource} ${formatBytes(plan.limitBytes)}; the matrices were not loaded`,
      location,
      `run it where at least ${request} GB of memory is free. On a cluster, \`plexus run DESIGN --out DIR --shard k/n\` splits the permutations across n tasks, ` +
        `but every task holds all the edge data, so request ${request} GB per task (about ${formatBytes(plan.peakBytes)} at peak), then combine the shards with \`plexus merge\`; ` +
        "`plexus check DESIGN --memory <GB>` plans for a task of that size",
    );
  };
}
