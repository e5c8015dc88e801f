import { studentTUpperTail } from "../statistics/studentT.js";
import { contrastVarianceFactor, type EdgeFit } from "./fitEdges.js";

/**
 * The t statistic of a contrast at every edge, t = c'β̂ / √(s² c'(X'X)⁻¹c)
 * with s² = SSE/(S − rank X) (e.g. Searle 1971, Linear Models, §5.5), its
 * upper-tail p-value, and the partial correlation r = t/√(t² + df) as an
 * effect size (Rosenthal 1994, in The Handbook of Research Synthesis).
 * An edge whose residual variance is zero relative to its data (`isDegenerate`)
 * gets NaN for all five: its estimate and standard error would be rounding
 * noise too (a constant edge, or one the design fits exactly).
 */
export interface EdgeStatistics {
  df: number;
  statistic: Float64Array;
  estimate: Float64Array;
  standardError: Float64Array;
  pUncorrected: Float64Array;
  partialR: Float64Array;
  /** Number of edges without a finite statistic (zero residual variance). */
  degenerate: number;
}

/** Residual norms at or below this fraction of the data norm count as zero (rounding level). */
export const ZERO_RESIDUAL_RELATIVE = 1e-10;

/**
 * The one rule for "zero residual variance": SSE ≤ (1e-10)² · Σ y² over the
 * edge's values (√SSE at most 1e-10 of the data's norm), or SSE not finite.
 * Such an edge has no statistic, estimate, standard error, p or effect size.
 */
export function isDegenerate(sse: number, sumSquares: number): boolean {
  return !(sse > ZERO_RESIDUAL_RELATIVE * ZERO_RESIDUAL_RELATIVE * sumSquares) || !Number.isFinite(sse);
}

export function contrastStatistics(fit: EdgeFit, contrast: ArrayLike<number>): EdgeStatistics {
  const { edges: E, columns: p, df, coefficients, sse, sumSquares } = fit;
  const factor = contrastVarianceFactor(fit.qr, contrast);
  const statistic = new Float64Array(E);
  const estimate = new Float64Array(E);
  const standardError = new Float64Array(E);
  const pUncorrected = new Float64Array(E);
  const partialR = new Float64Array(E);
  let degenerate = 0;
  for (let e = 0; e < E; e++) {
    if (isDegenerate(sse[e], sumSquares[e])) {
      degenerate++;
      statistic[e] = NaN;
      estimate[e] = NaN;
      standardError[e] = NaN;
      pUncorrected[e] = NaN;
      partialR[e] = NaN;
      continue;
    }
    let value = 0;
    for (let k = 0; k < p; k++) value += contrast[k] * coefficients[k * E + e];
    estimate[e] = value;
    const se = Math.sqrt((sse[e] / df) * factor);
    const t = value / se;
    standardError[e] = se;
    statistic[e] = t;
    pUncorrected[e] = studentTUpperTail(t, df);
    partialR[e] = t / Math.sqrt(t * t + df);
  }
  return { df, statistic, estimate, standardError, pUncorrected, partialR, degenerate };
}
