import { InputError, type InputLocation } from "../errors.js";

/**
 * Called with the cohort's shape once it is known and before the edge data are
 * allocated or any matrix after the first is read: the pipeline's memory plan
 * (src/run/memoryPlan.ts) raises an InputError here when the run would not fit.
 */
export type EdgeDataBudget = (subjects: number, edges: number, location: InputLocation) => void;

/** The most values one typed array may hold here (V8 limits a typed array's length to 2^32 − 1 on 64-bit Node). */
export const MAX_EDGE_VALUES = 2 ** 32 - 1;

/**
 * The edge-major array of `subjects` × `edges` values (data[e·S + s]) in shared
 * memory, so permutation workers read it without copies. The budget is asked
 * first; a shape beyond one typed array, or memory the system refuses, is an
 * InputError naming the size, never an internal error.
 */
export function allocateEdgeData(subjects: number, edges: number, location: InputLocation, budget?: EdgeDataBudget): Float64Array {
  budget?.(subjects, edges, location);
  const values = subjects * edges;
  const size = `${subjects} participants × ${edges} edges (${formatBytes(values * 8)} in double precision)`;
  if (values > MAX_EDGE_VALUES) {
    throw new InputError(
      `the edge data of ${size} exceed the ${MAX_EDGE_VALUES} values one array can hold in this version of plexus`,
      location,
      "analyse fewer regions (a coarser parcellation) or fewer participants per run",
    );
  }
  try {
    return new Float64Array(new SharedArrayBuffer(values * Float64Array.BYTES_PER_ELEMENT));
  } catch (error) {
    if (!(error instanceof RangeError)) throw error;
    throw new InputError(`the system refused the memory for the edge data of ${size}`, location, "run on a machine with more memory, or close other programs");
  }
}

/** Bytes in decimal units, as memory is sold and requested: "4.42 GB", "820 MB". */
export function formatBytes(bytes: number): string {
  if (bytes >= 1e9) return `${(bytes / 1e9).toFixed(bytes >= 1e11 ? 0 : 2)} GB`;
  if (bytes >= 1e6) return `${Math.round(bytes / 1e6)} MB`;
  return `${Math.max(1, Math.round(bytes / 1e3))} kB`;
}
