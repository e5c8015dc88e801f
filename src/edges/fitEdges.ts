import { thinQr, solveUpperTransposed, type ThinQr } from "../model/qr.js";

/**
 * Ordinary least squares at every edge at once, from one QR factorisation of
 * the design (X = QR, so β̂ = R⁻¹Q'y and the residual is y − QQ'y; Golub &
 * Van Loan 2013, §5.3). The data are edge-major (data[e·S + s]), so each
 * edge's fit runs over one contiguous vector.
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
  const S = subjects;
  const p = columns;
  const E = edges;
  // Q by column (p × S), so that each Q'y is a contiguous dot product.
  const qColumns = new Float64Array(p * S);
  for (let s = 0; s < S; s++) for (let k = 0; k < p; k++) qColumns[k * S + s] = q[s * p + k];
  const coefficients = new Float64Array(p * E);
  const sse = new Float64Array(E);
  const sumSquares = new Float64Array(E);
  const qty = new Float64Array(p);
  const beta = new Float64Array(p);
  for (let e = 0; e < E; e++) {
    const at = e * S;
    let yy = 0;
    for (let s = 0; s < S; s++) yy += data[at + s] * data[at + s];
    sumSquares[e] = yy;
    for (let k = 0; k < p; k++) {
      const from = k * S;
      let sum = 0;
      for (let s = 0; s < S; s++) sum += qColumns[from + s] * data[at + s];
      qty[k] = sum;
    }
    // Residuals formed explicitly (not ‖y‖² − ‖Q'y‖², which cancels when the fit is close).
    let rss = 0;
    for (let s = 0; s < S; s++) {
      let fitted = 0;
      for (let k = 0; k < p; k++) fitted += q[s * p + k] * qty[k];
      const residual = data[at + s] - fitted;
      rss += residual * residual;
    }
    sse[e] = rss;
    // β̂ = R⁻¹ Q'y by back substitution.
    for (let i = p - 1; i >= 0; i--) {
      let sum = qty[i];
      for (let j = i + 1; j < p; j++) sum -= r[i * p + j] * beta[j];
      beta[i] = sum / r[i * p + i];
      coefficients[i * E + e] = beta[i];
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
