import type { RegionLayout } from "./regionLayout.js";
import { regionDistance } from "./regionLayout.js";

/**
 * The regions of a planted effect: a seed region chosen by `draw` (a uniform
 * in [0, 1)) and its count − 1 nearest neighbours by Euclidean distance (ties
 * to the lower index), returned in increasing index order. Every edge among
 * them is planted (see `cliqueEdges`), so the planted edges always form one
 * connected subnetwork.
 */
export function plantedRegions(layout: RegionLayout, count: number, draw: number): number[] {
  const regionCount = layout.regions.length;
  const seed = Math.min(regionCount - 1, Math.floor(draw * regionCount));
  const others: number[] = [];
  for (let r = 0; r < regionCount; r++) if (r !== seed) others.push(r);
  const distance = others.map((r) => regionDistance(layout, seed, r));
  const order = others.map((_, k) => k).sort((a, b) => distance[a] - distance[b] || others[a] - others[b]);
  const chosen = [seed, ...order.slice(0, Math.max(0, count - 1)).map((k) => others[k])];
  return chosen.sort((a, b) => a - b);
}

/** Every pair (i < j) among the given regions, in row-major upper-triangle order. */
export function cliqueEdges(regions: readonly number[]): Array<[number, number]> {
  const sorted = [...regions].sort((a, b) => a - b);
  const pairs: Array<[number, number]> = [];
  for (let a = 0; a < sorted.length; a++) {
    for (let b = a + 1; b < sorted.length; b++) pairs.push([sorted[a], sorted[b]]);
  }
  return pairs;
}
