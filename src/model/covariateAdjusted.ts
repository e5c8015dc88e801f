import { solveUpper, solveUpperTransposed, thinQr } from "./qr.js";
import { studentTQuantile } from "../statistics/studentT.js";

/**
 * Covariate-adjusted values of one outcome y under a fitted linear model
 * (partial residuals in the sense of Larsen & McCleary 1972, "The use of
 * partial residual plots in regression analysis", Technometrics 14:781–790,
 * centred at the nuisance columns' means as for adjusted means in the analysis
 * of covariance):
 *
 *   fitted_i   = x̃_i'β̂, where x̃_i is row i of X with every nuisance column set to its mean;
 *   adjusted_i = fitted_i + e_i = y_i − Σ_{j nuisance} β̂_j (x_ij − x̄_j), with e = y − Xβ̂;
 *   interval   = fitted_i ± t_{(1+level)/2, n−p} · σ̂ · √(x̃_i'(X'X)⁻¹x̃_i), σ̂² = e'e/(n − p).
 *
 * So the adjusted values keep the columns of interest (and the intercept) and
 * remove what the nuisance columns explain, on the outcome's own scale; their
 * mean equals y's mean when X has an intercept. The interval is the usual
 * confidence interval of the model's mean at x̃_i. Least squares through one
 * Householder QR of X (model/qr.ts). X is rows × cols, row-major, full column rank.
 */
export interface CovariateAdjusted {
  adjusted: Float64Array;
  fitted: Float64Array;
  lower: Float64Array;
  upper: Float64Array;
  /** Residual degrees of freedom n − p. */
  df: number;
}

export function covariateAdjusted(x: Float64Array, rows: number, cols: number, nuisance: ArrayLike<boolean>, y: Float64Array, level: number): CovariateAdjusted {
  const { q, r } = thinQr(x, rows, cols);
  const qty = new Float64Array(cols);
  for (let k = 0; k < cols; k++) {
    let sum = 0;
    for (let i = 0; i < rows; i++) sum += q[i * cols + k] * y[i];
    qty[k] = sum;
  }
  const beta = solveUpper(r, cols, qty);
  const residual = new Float64Array(rows);
  let sse = 0;
  for (let i = 0; i < rows; i++) {
    let fit = 0;
    for (let j = 0; j < cols; j++) fit += x[i * cols + j] * beta[j];
    residual[i] = y[i] - fit;
    sse += residual[i] * residual[i];
  }
  const df = rows - cols;
  const sigma = Math.sqrt(sse / df);
  const quantile = studentTQuantile(1 - (1 - level) / 2, df);
  const means = new Float64Array(cols);
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) means[j] += x[i * cols + j];
  for (let j = 0; j < cols; j++) means[j] /= rows;
  const adjusted = new Float64Array(rows);
  const fitted = new Float64Array(rows);
  const lower = new Float64Array(rows);
  const upper = new Float64Array(rows);
  const row = new Float64Array(cols);
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < cols; j++) row[j] = nuisance[j] ? means[j] : x[i * cols + j];
    let fit = 0;
    for (let j = 0; j < cols; j++) fit += row[j] * beta[j];
    const w = solveUpperTransposed(r, cols, row);
    let factor = 0;
    for (let j = 0; j < cols; j++) factor += w[j] * w[j];
    const half = quantile * sigma * Math.sqrt(factor);
    fitted[i] = fit;
    adjusted[i] = fit + residual[i];
    lower[i] = fit - half;
    upper[i] = fit + half;
  }
  return { adjusted, fitted, lower, upper, df };
}
