import { studentTUpperTail } from "../statistics/studentT.js";
import type { Tail } from "../common/inferenceOptions.js";

/**
 * Uncorrected p-values for the tail tested: upper P(T > t), lower P(T < t),
 * both 2·min of the two (capped at 1). Each tail is computed directly by
 * symmetry, never as 1 − CDF.
 */
export function tailPValues(statistic: Float64Array, df: number, tail: Tail): Float64Array {
  const out = new Float64Array(statistic.length);
  for (let e = 0; e < statistic.length; e++) {
    const t = statistic[e];
    if (!Number.isFinite(t)) {
      out[e] = NaN;
    } else if (tail === "upper") {
      out[e] = studentTUpperTail(t, df);
    } else if (tail === "lower") {
      out[e] = studentTUpperTail(-t, df);
    } else {
      out[e] = Math.min(1, 2 * studentTUpperTail(Math.abs(t), df));
    }
  }
  return out;
}
