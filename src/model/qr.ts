/**
 * Thin QR factorisation X = Q R of a tall matrix by Householder reflections
 * (Golub & Van Loan, Matrix Computations, 4th ed. 2013, Algorithm 5.2.1),
 * the numerically stable route to least squares (no normal equations).
 * X is rows × cols, row-major; Q is rows × cols with orthonormal columns,
 * R is cols × cols upper triangular (row-major). A zero column gives a zero
 * diagonal in R; rank is decided elsewhere (see rank.ts).
 */
export interface ThinQr {
  rows: number;
  cols: number;
  q: Float64Array;
  r: Float64Array;
}

export function thinQr(x: Float64Array, rows: number, cols: number): ThinQr {
  const a = Float64Array.from(x);
  const vectors: Float64Array[] = [];
  const betas: number[] = [];
  for (let k = 0; k < cols; k++) {
    let scale = 0;
    for (let i = k; i < rows; i++) scale = Math.max(scale, Math.abs(a[i * cols + k]));
    const v = new Float64Array(rows - k);
    if (scale === 0) {
      vectors.push(v);
      betas.push(0);
      continue;
    }
    let norm2 = 0;
    for (let i = k; i < rows; i++) {
      const value = a[i * cols + k] / scale;
      v[i - k] = value;
      norm2 += value * value;
    }
    const alpha = -Math.sign(v[0] || 1) * Math.sqrt(norm2);
    v[0] -= alpha;
    let vnorm2 = 0;
    for (let i = 0; i < v.length; i++) vnorm2 += v[i] * v[i];
    const beta = vnorm2 === 0 ? 0 : 2 / vnorm2;
    // Apply H = I - beta v v' to the remaining columns.
    for (let j = k; j < cols; j++) {
      let dot = 0;
      for (let i = k; i < rows; i++) dot += v[i - k] * a[i * cols + j];
      const f = beta * dot;
      for (let i = k; i < rows; i++) a[i * cols + j] -= f * v[i - k];
    }
    vectors.push(v);
    betas.push(beta);
  }
  const r = new Float64Array(cols * cols);
  for (let i = 0; i < cols; i++) for (let j = i; j < cols; j++) r[i * cols + j] = a[i * cols + j];
  // Q = H_0 H_1 … H_{cols-1} applied to the first `cols` columns of the identity.
  const q = new Float64Array(rows * cols);
  for (let j = 0; j < cols; j++) q[j * cols + j] = 1;
  for (let k = cols - 1; k >= 0; k--) {
    const v = vectors[k];
    const beta = betas[k];
    if (beta === 0) continue;
    for (let j = 0; j < cols; j++) {
      let dot = 0;
      for (let i = k; i < rows; i++) dot += v[i - k] * q[i * cols + j];
      const f = beta * dot;
      for (let i = k; i < rows; i++) q[i * cols + j] -= f * v[i - k];
    }
  }
  return { rows, cols, q, r };
}

/** Solves R b = y for upper-triangular R (cols × cols, row-major) by back substitution. */
export function solveUpper(r: Float64Array, cols: number, y: Float64Array): Float64Array {
  const b = new Float64Array(cols);
  for (let i = cols - 1; i >= 0; i--) {
    let sum = y[i];
    for (let j = i + 1; j < cols; j++) sum -= r[i * cols + j] * b[j];
    b[i] = sum / r[i * cols + i];
  }
  return b;
}

/** Solves R' w = c for upper-triangular R, so that c'(X'X)⁻¹c = ‖w‖² when X = QR. */
export function solveUpperTransposed(r: Float64Array, cols: number, c: ArrayLike<number>): Float64Array {
  const w = new Float64Array(cols);
  for (let i = 0; i < cols; i++) {
    let sum = c[i];
    for (let j = 0; j < i; j++) sum -= r[j * cols + i] * w[j];
    w[i] = sum / r[i * cols + i];
  }
  return w;
}
