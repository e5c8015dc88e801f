import { Matrix, inverse } from "ml-matrix";
import { fisherFUpperTail } from "../statistics/fisherF.js";
import { isDegenerate } from "./contrastStatistics.js";
import { unscaledCovariance, type EdgeFit } from "./fitEdges.js";

/**
 * The F statistic of a multi-row contrast C (q × p) at every edge,
 * F = (Cβ̂)' [C (X'X)⁻¹ C']⁻¹ (Cβ̂) / (q s²), with (q, S − rank X) degrees of
 * freedom (Searle 1971, Linear Models, §5.5), its upper-tail p-value, and the
 * partial eta squared q F / (q F + df) as an effect size (Cohen 1973,
 * Educational and Psychological Measurement 33:107).
 */
export interface EdgeFStatistics {
  df1: number;
  df2: number;
  statistic: Float64Array;
  pUncorrected: Float64Array;
  partialEtaSquared: Float64Array;
  degenerate: number;
}

export function contrastFStatistics(fit: EdgeFit, rows: ArrayLike<number>[]): EdgeFStatistics {
  const { edges: E, columns: p, df, coefficients, sse, sumSquares } = fit;
  const q = rows.length;
  const covariance = unscaledCovariance(fit.qr);
  const middle = new Matrix(q, q);
  for (let a = 0; a < q; a++) {
    for (let b = 0; b < q; b++) {
      let sum = 0;
      for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) sum += rows[a][i] * covariance[i * p + j] * rows[b][j];
      middle.set(a, b, sum);
    }
  }
  const weight = inverse(middle);
  const statistic = new Float64Array(E);
  const pUncorrected = new Float64Array(E);
  const partialEtaSquared = new Float64Array(E);
  const estimates = new Float64Array(q);
  let degenerate = 0;
  for (let e = 0; e < E; e++) {
    if (isDegenerate(sse[e], sumSquares[e])) {
      degenerate++;
      statistic[e] = NaN;
      pUncorrected[e] = NaN;
      partialEtaSquared[e] = NaN;
      continue;
    }
    for (let a = 0; a < q; a++) {
      let sum = 0;
      for (let i = 0; i < p; i++) sum += rows[a][i] * coefficients[i * E + e];
      estimates[a] = sum;
    }
    let quadratic = 0;
    for (let a = 0; a < q; a++) for (let b = 0; b < q; b++) quadratic += estimates[a] * weight.get(a, b) * estimates[b];
    const f = quadratic / q / (sse[e] / df);
    statistic[e] = f;
    pUncorrected[e] = fisherFUpperTail(f, q, df);
    partialEtaSquared[e] = (q * f) / (q * f + df);
  }
  return { df1: q, df2: df, statistic, pUncorrected, partialEtaSquared, degenerate };
}
