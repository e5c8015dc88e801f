import { edgePairs } from "../edges/edgeIndex.js";
import type { RegionLayout } from "./regionLayout.js";
import { regionDistance } from "./regionLayout.js";

/**
 * The invented numbers behind a simulated cohort, all on the model scale:
 * Fisher z = atanh(r) for correlation matrices, log1p(streamline count) for
 * count matrices. They aim at plausible-looking data, not at any real study.
 */
export interface ModelScale {
  /** Mean of every edge before structure is added. */
  base: number;
  /** Added when both regions belong to the same system. */
  withinSystem: number;
  /** Added as distanceWeight · exp(−distance / distanceLengthMm). */
  distanceWeight: number;
  distanceLengthMm: number;
  /** Added between left/right mirror-image regions. */
  homologue: number;
  /** SD of a fixed, edge-specific perturbation of the group mean. */
  edgeJitter: number;
  /** SD of a subject-wide offset shared by all of a subject's edges. */
  globalNoise: number;
  /** SD of independent subject-by-edge noise. */
  edgeNoise: number;
  /** SD of a fixed, site-by-edge offset (scanner differences). */
  siteNoise: number;
  /** Default change per year of age, centred at 70 years. */
  ageEffectPerYear: number;
}

export const CORRELATION_SCALE: ModelScale = {
  base: 0.08,
  withinSystem: 0.3,
  distanceWeight: 0.45,
  distanceLengthMm: 35,
  homologue: 0.35,
  edgeJitter: 0.05,
  globalNoise: 0.06,
  edgeNoise: 0.14,
  siteNoise: 0.03,
  ageEffectPerYear: -0.003,
};

export const COUNT_SCALE: ModelScale = {
  base: 2,
  withinSystem: 1.2,
  distanceWeight: 3,
  distanceLengthMm: 40,
  homologue: 1.5,
  edgeJitter: 0.4,
  globalNoise: 0.1,
  edgeNoise: 0.35,
  siteNoise: 0.08,
  ageEffectPerYear: -0.005,
};

/** Lowest group mean (log1p scale) of a planted count edge, so the effect is not lost to zeros. */
export const PLANTED_COUNT_FLOOR = 3.5;

/** SD of one edge's subject noise on the model scale (global and edge parts together). */
export function residualSd(scale: ModelScale): number {
  return Math.hypot(scale.globalNoise, scale.edgeNoise);
}

export interface GroupTemplate {
  /** Group-level mean of each edge (row-major upper triangle) on the model scale. */
  mean: Float64Array;
  /** 1 where the edge exists in the group; counts only — absent edges are 0 in every subject. */
  present: Uint8Array;
}

/**
 * The group-level mean connectome: stronger within systems and between
 * homologues, falling off with distance, plus a fixed edge-specific jitter.
 * For counts an edge exists with probability
 * min(0.95, 0.12 + 0.6·[same system] + 0.9·exp(−d/35 mm) + 0.6·[homologue]);
 * planted edges always exist and have a mean of at least PLANTED_COUNT_FLOOR.
 * Draws one normal and one uniform per edge whatever the options, so a planted
 * effect never shifts the rest of the random stream.
 */
export function groupTemplate(
  layout: RegionLayout,
  kind: "correlation" | "counts",
  planted: Uint8Array,
  random: () => number,
  normal: () => number,
): GroupTemplate {
  const scale = kind === "correlation" ? CORRELATION_SCALE : COUNT_SCALE;
  const { edgeCount, regionA, regionB } = edgePairs(layout.regions.length);
  const mean = new Float64Array(edgeCount);
  const present = new Uint8Array(edgeCount);
  for (let e = 0; e < edgeCount; e++) {
    const i = regionA[e];
    const j = regionB[e];
    const sameSystem = layout.system[i] === layout.system[j] ? 1 : 0;
    const mirror = layout.homologue[i] === j ? 1 : 0;
    const distance = regionDistance(layout, i, j);
    mean[e] =
      scale.base +
      scale.withinSystem * sameSystem +
      scale.distanceWeight * Math.exp(-distance / scale.distanceLengthMm) +
      scale.homologue * mirror +
      scale.edgeJitter * normal();
    const presenceDraw = random();
    if (kind === "correlation") {
      present[e] = 1;
    } else {
      const probability = Math.min(0.95, 0.12 + 0.6 * sameSystem + 0.9 * Math.exp(-distance / 35) + 0.6 * mirror);
      present[e] = presenceDraw < probability || planted[e] === 1 ? 1 : 0;
      if (planted[e] === 1) mean[e] = Math.max(mean[e], PLANTED_COUNT_FLOOR);
    }
  }
  return { mean, present };
}
