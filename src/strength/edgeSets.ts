import type { EdgePairs } from "../edges/edgeIndex.js";
import type { Region } from "../io/regions.js";

/**
 * Named sets of edges whose mean weight is a subnetwork strength. Edges are
 * indices in the i < j edge order (src/edges/edgeIndex.ts), ascending.
 */
export interface EdgeSet {
  /** Column name in the output tables, e.g. `within_amber`, `component_1`. */
  name: string;
  /** How the set was chosen, in words, for tables and summary.json. */
  description: string;
  edges: Uint32Array;
}

/** Every edge with both ends in `system` (the regions table's `system` column). */
export function edgesWithinSystem(regions: Region[], pairs: EdgePairs, system: string): Uint32Array {
  const out: number[] = [];
  for (let e = 0; e < pairs.edgeCount; e++) {
    if (regions[pairs.regionA[e]].system === system && regions[pairs.regionB[e]].system === system) out.push(e);
  }
  return Uint32Array.from(out);
}

/** Every edge with one end in system `a` and the other in system `b` (a ≠ b). */
export function edgesBetweenSystems(regions: Region[], pairs: EdgePairs, a: string, b: string): Uint32Array {
  const out: number[] = [];
  for (let e = 0; e < pairs.edgeCount; e++) {
    const first = regions[pairs.regionA[e]].system;
    const second = regions[pairs.regionB[e]].system;
    if ((first === a && second === b) || (first === b && second === a)) out.push(e);
  }
  return Uint32Array.from(out);
}

/** The systems named in the regions table, in order of first appearance. */
export function systemNames(regions: Region[]): string[] {
  return [...new Set(regions.flatMap((r) => (r.system === undefined ? [] : [r.system])))];
}
