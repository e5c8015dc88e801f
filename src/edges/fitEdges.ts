import { thinQr, solveUpperTransposed, type ThinQr } from "../model/qr.js";

/**
 * Ordinary least squares at every edge at once, from one QR factorisation of
 * the design (X = QR, so β̂ = R⁻¹Q'y and the residual is y − QQ'y; Golub &
 * Van Loan 2013, §5.3). The data are subject-major (data[s·E + e]), so each
 * pass streams over subjects and runs along contiguous edge rows.
 */
export interface EdgeFit {
  subjects: number;
  columns: number;
  edges: number;
  df: number;
  qr: ThinQr;
  /** β̂, column-major by edge: coefficients[k·E + e]. */
  coefficients: Float64Array;
  /** Residual sum of squares per edge. */
  sse: Float64Array;
  /** Σ_s y² per edge, to judge a zero residual variance relative to the data. */
  sumSquares: Float64Array;
}

export function fitEdges(design: Float64Array, subjects: number, columns: number, data: Float64Array, edges: number): EdgeFit {
  const qr = thinQr(design, subjects, columns);
  const { q, r } = qr;
  const p = columns;
  const E = edges;
  // Q'y for every edge: qty[k·E + e] = Σ_s Q[s,k] y[s,e].
  const qty = new Float64Array(p * E);
  const sumSquares = new Float64Array(E);
  for (let s = 0; s < subjects; s++) {
    const row = s * E;
    for (let k = 0; k < p; k++) {
      const weight = q[s * p + k];
      const out = k * E;
      for (let e = 0; e < E; e++) qty[out + e] += weight * data[row + e];
    }
    for (let e = 0; e < E; e++) {
      const y = data[row + e];
      sumSquares[e] += y * y;
    }
  }
  // Residuals formed explicitly (not ‖y‖² − ‖Q'y‖², which cancels when the fit is close).
  const sse = new Float64Array(E);
  const fitted = new Float64Array(E);
  for (let s = 0; s < subjects; s++) {
    const row = s * E;
    fitted.fill(0);
    for (let k = 0; k < p; k++) {
      const weight = q[s * p + k];
      const from = k * E;
      for (let e = 0; e < E; e++) fitted[e] += weight * qty[from + e];
    }
    for (let e = 0; e < E; e++) {
      const residual = data[row + e] - fitted[e];
      sse[e] += residual * residual;
    }
  }
  // β̂ = R⁻¹ Q'y by back substitution, all edges together.
  const coefficients = new Float64Array(p * E);
  for (let i = p - 1; i >= 0; i--) {
    const diagonal = r[i * p + i];
    for (let e = 0; e < E; e++) {
      let sum = qty[i * E + e];
      for (let j = i + 1; j < p; j++) sum -= r[i * p + j] * coefficients[j * E + e];
      coefficients[i * E + e] = sum / diagonal;
    }
  }
  return { subjects, columns, edges, df: subjects - columns, qr, coefficients, sse, sumSquares };
}

/** c'(X'X)⁻¹c from the QR factor: ‖R⁻ᵀc‖². */
export function contrastVarianceFactor(qr: ThinQr, contrast: ArrayLike<number>): number {
  const w = solveUpperTransposed(qr.r, qr.cols, contrast);
  let sum = 0;
  for (let i = 0; i < w.length; i++) sum += w[i] * w[i];
  return sum;
}

/** The unscaled covariance (X'X)⁻¹ = R⁻¹R⁻ᵀ, row-major p × p. */
export function unscaledCovariance(qr: ThinQr): Float64Array {
  const p = qr.cols;
  const out = new Float64Array(p * p);
  for (let j = 0; j < p; j++) {
    const unit = new Float64Array(p);
    unit[j] = 1;
    const w = solveUpperTransposed(qr.r, p, unit);
    // column j of R⁻ᵀ is w; (X'X)⁻¹ = (R⁻ᵀ)'(R⁻ᵀ), so entry (i, j) = Σ_k w_i[k] w_j[k].
    for (let k = 0; k < p; k++) out[k * p + j] = w[k];
  }
  const result = new Float64Array(p * p);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < p; j++) {
      let sum = 0;
      for (let k = 0; k < p; k++) sum += out[k * p + i] * out[k * p + j];
      result[i * p + j] = sum;
    }
  }
  return result;
}
