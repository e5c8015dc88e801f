import { contrastStatistics, type EdgeStatistics } from "../edges/contrastStatistics.js";
import { fitEdges } from "../edges/fitEdges.js";
import { tailPValues } from "../edges/tailPValues.js";
import { adjustFdr } from "../inference/fdr.js";
import type { InferenceSpec } from "../common/inferenceOptions.js";
import type { Contrast } from "../model/contrast.js";
import type { DesignMatrix } from "../model/designMatrix.js";

/**
 * The design's model and contrasts fitted to each measure, by the same
 * edge-wise GLM code as the connectome edges (src/edges/fitEdges.ts, one QR
 * of X for every measure): t, estimate, standard error and partial r per
 * measure, the uncorrected p for the tail tested, and FDR-adjusted p-values
 * across the measures (Benjamini & Hochberg 1995, or Benjamini & Yekutieli
 * 2001 with `fdr: by`).
 */
export interface MeasureStatistics {
  contrast: Contrast;
  statistics: EdgeStatistics;
  /** Uncorrected p for the tail tested. */
  pUncorrected: Float64Array;
  qFdr: Float64Array;
}

/** `values` is measure-major: values[m·S + s], M measures over the S subjects of the design; each contrast's first row is tested (t contrasts). */
export function measureStatistics(
  matrix: DesignMatrix,
  contrasts: Contrast[],
  values: Float64Array,
  measures: number,
  inference: Pick<InferenceSpec, "tail" | "fdr">,
): MeasureStatistics[] {
  const fit = fitEdges(matrix.values, matrix.rows, matrix.cols, values, measures);
  return contrasts.map((contrast) => {
    const statistics = contrastStatistics(fit, contrast.vector);
    const pUncorrected = tailPValues(statistics.statistic, statistics.df, inference.tail);
    return { contrast, statistics, pUncorrected, qFdr: adjustFdr(pUncorrected, inference.fdr) };
  });
}
