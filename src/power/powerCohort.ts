import { edgeIndexOf, type EdgePairs } from "../edges/edgeIndex.js";
import { normalSource } from "../simulate/normalSource.js";

/**
 * One simulated two-group cohort for power planning: edge values are
 * independent standard normal (or, with a pilot, whole residual vectors of
 * pilot subjects resampled with replacement, which keeps the pilot's
 * dependence between edges), and patients are shifted by d standard
 * deviations on the planted edges (Cohen's d; Cohen 1988, Statistical Power
 * Analysis for the Behavioral Sciences).
 */
export interface PowerCohortSpec {
  pairs: EdgePairs;
  perGroup: number;
  effectSize: number;
  planted: Set<number>;
  /** Pilot residuals, edge-major (pilot[e·P + s]) and scaled to unit SD per edge; null for independent normal edges. */
  pilot: { subjects: number; residuals: Float64Array } | null;
}

/** Edge-major data[e·S + s] with the first `perGroup` subjects controls and the rest patients. */
export function simulatePowerCohort(spec: PowerCohortSpec, random: () => number): Float64Array {
  const S = 2 * spec.perGroup;
  const E = spec.pairs.edgeCount;
  const data = new Float64Array(new SharedArrayBuffer(S * E * 8));
  if (spec.pilot) {
    const P = spec.pilot.subjects;
    for (let s = 0; s < S; s++) {
      const source = Math.floor(random() * P);
      for (let e = 0; e < E; e++) data[e * S + s] = spec.pilot.residuals[e * P + source];
    }
  } else {
    const normal = normalSource(random);
    for (let s = 0; s < S; s++) for (let e = 0; e < E; e++) data[e * S + s] = normal();
  }
  for (const e of spec.planted) {
    for (let s = spec.perGroup; s < S; s++) data[e * S + s] += spec.effectSize;
  }
  return data;
}

/** A planted subnetwork: every edge among the `count` regions nearest to region `seed` (by coordinates, else by index). */
export function plantedEdges(
  regionCount: number,
  count: number,
  coordinates: { x: number; y: number; z: number }[] | null,
  seed: number,
): Set<number> {
  const order = Array.from({ length: regionCount }, (_, i) => i);
  if (coordinates) {
    const c = coordinates[seed];
    order.sort((a, b) => distance(coordinates[a], c) - distance(coordinates[b], c) || a - b);
  } else {
    order.sort((a, b) => ((a - seed + regionCount) % regionCount) - ((b - seed + regionCount) % regionCount));
  }
  const members = order.slice(0, count);
  const edges = new Set<number>();
  for (let i = 0; i < members.length; i++) {
    for (let j = i + 1; j < members.length; j++) edges.add(edgeIndexOf(regionCount, members[i], members[j]));
  }
  return edges;
}

function distance(a: { x: number; y: number; z: number }, b: { x: number; y: number; z: number }): number {
  return Math.hypot(a.x - b.x, a.y - b.y, a.z - b.z);
}
