import type { EdgeStatistics } from "../edges/contrastStatistics.js";
import type { EdgeEffectSizes } from "../edges/effectSizes.js";
import type { ComponentSummary } from "../network/components.js";
import type { FamilywiseP } from "../inference/familywiseP.js";
import type { Contrast } from "../model/contrast.js";
import type { NullSetup } from "../permute/nullContext.js";
import type { NullChunk } from "../permute/nullRangeTypes.js";
import type { SweepLevel } from "../inference/thresholdSweep.js";

export type { SweepLevel };

// What the pipeline finds for each contrast (run/analyzeContrasts.ts, run/permutationInference.ts),
// as the writers of edges.tsv, components.tsv and summary.json take it.

/** What a contrast yields before any permutation: edge statistics, FDR and the observed components. */
export interface ObservedContrast {
  contrast: Contrast;
  statistics: EdgeStatistics;
  /** Uncorrected p for the tail tested. */
  pUncorrected: Float64Array;
  qFdr: Float64Array;
  labels: Int32Array;
  components: ComponentSummary[];
  /** t contrasts of an analysis: the effect sizes written after the contract columns (README: Effect sizes). */
  effects?: ContrastEffectSizes;
}

/**
 * A t contrast's effect sizes: the estimate's interval; Cohen's d and its
 * interval when the contrast compares two levels of a factor (`comparison`);
 * and, for Fisher z-transformed edges, the two levels' model means
 * back-transformed to correlations (`means`, tanh).
 */
export interface ContrastEffectSizes extends EdgeEffectSizes {
  comparison?: { variable: string; first: string; second: string };
  backTransform: "tanh" | null;
}

/** A contrast's null distribution (full, or one shard's share) with how it was drawn. */
export interface ContrastNull {
  setup: NullSetup;
  rows: NullChunk;
}

/** Component and edge p-values from a complete null. */
export interface FamilywiseResult {
  exact: boolean;
  count: number;
  componentP: FamilywiseP[];
  edgeP?: Float64Array;
  criticalSize: number;
  criticalStatistic: number;
}

/** Threshold-free inference: the observed enhanced statistic, per-edge p_fwe, and the components of the significant edges. */
export interface ThresholdFreeResult {
  enhanced: Float64Array;
  edgeP: Float64Array;
  labels: Int32Array;
  components: ComponentSummary[];
  componentP: number[];
  criticalEnhanced: number;
}

/**
 * The permutation-based results of a contrast, as the design asks for them:
 * family-wise p-values (whenever a null was drawn), threshold-free inference
 * and a threshold sweep. Empty without permutations.
 */
export interface ContrastInference {
  fwe?: FamilywiseResult;
  free?: ThresholdFreeResult;
  sweep?: SweepLevel[];
}
