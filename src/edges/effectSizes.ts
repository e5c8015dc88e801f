import { noncentralityForProbability, normalQuantile } from "../statistics/noncentralT.js";
import { studentTQuantile } from "../statistics/studentT.js";
import type { EdgeStatistics } from "./contrastStatistics.js";
import { contrastVarianceFactor, type EdgeFit } from "./fitEdges.js";

/**
 * Effect sizes of a t contrast at every edge.
 * - The confidence interval of the estimate c'β̂ ± t_{1−α/2, df}·SE (e.g.
 *   Searle 1971, Linear Models, §5.5).
 * - For a contrast between two levels of a factor, Cohen's d = c'β̂/σ̂ with σ̂
 *   the residual standard deviation of the full model (Cohen 1988, Statistical
 *   Power Analysis for the Behavioral Sciences, §2.2), so d = t·√h with
 *   h = c'(X'X)⁻¹c; its interval is the noncentrality interval of the observed
 *   t (Steiger & Fouladi 1997; Cumming & Finch 2001) times the same √h.
 * - The two levels' model means x'β̂ at the rows of `means` (model/levelComparison.ts).
 * An edge without a statistic (zero residual variance) gets NaN throughout.
 */
export interface EdgeEffectSizes {
  level: number;
  ciLow: Float64Array;
  ciHigh: Float64Array;
  cohensD?: { d: Float64Array; low: Float64Array; high: Float64Array; scale: number };
  means?: { first: Float64Array; second: Float64Array };
}

export interface EffectSizeRequest {
  /** Confidence level, e.g. 0.95. */
  level: number;
  /** The contrast's vector: Cohen's d is computed when it compares two levels. */
  contrast: ArrayLike<number>;
  compareLevels: boolean;
  /** Design rows whose model means are reported (the two levels' rows), if any. */
  means?: { first: ArrayLike<number>; second: ArrayLike<number> };
}

export function edgeEffectSizes(fit: EdgeFit, statistics: EdgeStatistics, request: EffectSizeRequest): EdgeEffectSizes {
  const E = fit.edges;
  const { df } = statistics;
  const { level } = request;
  const q = studentTQuantile((1 + level) / 2, df);
  const ciLow = new Float64Array(E);
  const ciHigh = new Float64Array(E);
  for (let e = 0; e < E; e++) {
    const estimate = statistics.estimate[e];
    const half = q * statistics.standardError[e];
    ciLow[e] = Number.isFinite(statistics.statistic[e]) ? estimate - half : NaN;
    ciHigh[e] = Number.isFinite(statistics.statistic[e]) ? estimate + half : NaN;
  }
  const out: EdgeEffectSizes = { level, ciLow, ciHigh };
  if (request.compareLevels) {
    const scale = Math.sqrt(contrastVarianceFactor(fit.qr, request.contrast));
    const d = new Float64Array(E);
    const [low, high] = noncentralIntervals(statistics.statistic, df, level);
    for (let e = 0; e < E; e++) {
      if (!Number.isFinite(statistics.statistic[e])) {
        d[e] = NaN;
        continue;
      }
      d[e] = statistics.estimate[e] / Math.sqrt(fit.sse[e] / df);
      low[e] *= scale;
      high[e] *= scale;
    }
    out.cohensD = { d, low, high, scale };
  }
  if (request.means) {
    const first = modelMeans(fit, request.means.first, statistics.statistic);
    const second = modelMeans(fit, request.means.second, statistics.statistic);
    out.means = { first, second };
  }
  return out;
}

/** x'β̂ at every edge with a statistic (coefficients are column-major by edge). */
function modelMeans(fit: EdgeFit, row: ArrayLike<number>, statistic: Float64Array): Float64Array {
  const E = fit.edges;
  const out = new Float64Array(E);
  for (let k = 0; k < fit.columns; k++) {
    const weight = row[k];
    if (weight === 0) continue;
    const from = k * E;
    for (let e = 0; e < E; e++) out[e] += weight * fit.coefficients[from + e];
  }
  for (let e = 0; e < E; e++) if (!Number.isFinite(statistic[e])) out[e] = NaN;
  return out;
}

/**
 * |t| above which the noncentrality interval is not computed (NaN): the series
 * then runs to hundreds of thousands of terms per evaluation (its Poisson weights
 * spread like √(δ²/2)), and such t's come only from near-exact fits. Up to it,
 * an interval takes at most a few tens of milliseconds (df = 1) and usually
 * well under one (bench/effectSizes.ts).
 */
export const MAX_INTERVAL_STATISTIC = 100;

/**
 * The noncentrality interval of every t (NaN where t is not finite or |t| > MAX_INTERVAL_STATISTIC). The
 * edges are solved in ascending order of t, each root's Newton search starting
 * from the line through the two previous roots (neighbouring t's differ
 * little among tens of thousands of edges, so one or two evaluations of the
 * CDF settle most roots); equal t's share their interval.
 */
export function noncentralIntervals(statistic: Float64Array, df: number, level: number): [Float64Array, Float64Array] {
  const E = statistic.length;
  const upper = (1 + level) / 2;
  const lower = (1 - level) / 2;
  const zUpper = normalQuantile(upper);
  const zLower = normalQuantile(lower);
  const low = new Float64Array(E).fill(NaN);
  const high = new Float64Array(E).fill(NaN);
  const order: number[] = [];
  for (let e = 0; e < E; e++) if (Math.abs(statistic[e]) <= MAX_INTERVAL_STATISTIC) order.push(e);
  order.sort((a, b) => statistic[a] - statistic[b] || a - b);
  // The last two solved (t, δ_L, δ_U), for the extrapolated starting points.
  let t1 = NaN;
  let l1 = NaN;
  let h1 = NaN;
  let t2 = NaN;
  let l2 = NaN;
  let h2 = NaN;
  const extrapolate = (t: number, d1: number, d2: number): number | undefined => {
    if (!Number.isFinite(t1) || t - t1 > 1) return undefined;
    if (!Number.isFinite(t2) || t1 === t2) return d1;
    return d1 + ((d1 - d2) / (t1 - t2)) * (t - t1);
  };
  for (const e of order) {
    const t = statistic[e];
    if (t === t1) {
      low[e] = l1;
      high[e] = h1;
      continue;
    }
    const l = noncentralityForProbability(t, df, upper, zUpper, extrapolate(t, l1, l2));
    const h = noncentralityForProbability(t, df, lower, zLower, extrapolate(t, h1, h2));
    low[e] = l;
    high[e] = h;
    [t2, l2, h2] = [t1, l1, h1];
    [t1, l1, h1] = [t, l, h];
  }
  return [low, high];
}
