import type { InferenceSpec, Tail } from "../common/inferenceOptions.js";
import type { EdgePairs } from "../edges/edgeIndex.js";
import { observedComponents, type ComponentSummary } from "../network/components.js";
import type { NullChunk } from "../permute/nullRangeTypes.js";
import { criticalValue, familywiseP, type FamilywiseP } from "./familywiseP.js";

/** One threshold of a sweep: its observed components and their p_fwe from that threshold's null columns. */
export interface SweepLevel {
  threshold: number;
  labels: Int32Array;
  components: ComponentSummary[];
  componentP: FamilywiseP[];
  criticalSize: number;
}

/**
 * A sweep of primary thresholds: at each, the observed components and their
 * p_fwe against the null of the largest component at that same threshold
 * (the primary threshold's null is the main column, the others are the
 * `max_extent_t…` / `max_mass_t…` columns). Undefined for a single threshold.
 */
export function thresholdSweep(
  inference: InferenceSpec,
  statistic: Float64Array,
  nullRows: NullChunk,
  exact: boolean,
  pairs: EdgePairs,
  tail: Tail,
): SweepLevel[] | undefined {
  if (inference.thresholds.length < 2) return undefined;
  return inference.thresholds.map((threshold, i) => {
    const { labels, components } = observedComponents(statistic, pairs.regionA, pairs.regionB, pairs.regionCount, threshold, tail, inference.size);
    const measure = inference.size === "mass" ? "mass" : "extent";
    const sizeNull =
      i === 0
        ? measure === "mass"
          ? nullRows.maxMass
          : nullRows.maxExtent
        : nullRows.extra[nullRows.extraNames.indexOf(`max_${measure}_t${threshold}`)];
    const sizes = components.map((c) => (measure === "mass" ? c.mass : c.extent));
    return {
      threshold,
      labels,
      components,
      componentP: familywiseP(sizeNull, sizes, exact),
      criticalSize: criticalValue(sizeNull, inference.alpha, exact),
    };
  });
}
