import { unscaledCovariance } from "../edges/fitEdges.js";
import { thinQr } from "../model/qr.js";

/**
 * Splits the design for a contrast c into the effect of interest and the
 * nuisance (Winkler et al. 2014, NeuroImage 92:381, Appendix A; Smith et al.
 * 2007): the nuisance space is {Xβ : c'β = 0} = span(X N) with N a basis of
 * c's orthogonal complement, and the effect regressor x = X(X'X)⁻¹c / c'(X'X)⁻¹c
 * has coefficient exactly c'β in the model [x, Z]. By Frisch–Waugh–Lovell
 * (Frisch & Waugh 1933; Lovell 1963) the contrast's t equals the t of the
 * residualised regressor x̃ = (I − H_Z)x on the reduced-model residuals.
 */
export interface EffectPartition {
  subjects: number;
  /** x̃: the effect regressor with the nuisance projected out. */
  effect: Float64Array;
  /** x̃'x̃. */
  effectNorm2: number;
  /** Orthonormal basis of the nuisance space, one S-vector per entry. */
  nuisanceBasis: Float64Array[];
  /** Whether the constant vector lies in the nuisance space; it is then nuisanceBasis[0] = 1/√S. */
  constantInNuisance: boolean;
  /** Whether the constant vector lies in the column space of X (the model has an intercept, explicit or not). */
  constantInModel: boolean;
  df: number;
}

function dot(a: Float64Array, b: Float64Array): number {
  let sum = 0;
  for (let i = 0; i < a.length; i++) sum += a[i] * b[i];
  return sum;
}

/** Residual of v after projecting out an orthonormal set, twice for stability (Giraud et al. 2005). */
function projectOut(v: Float64Array, basis: Float64Array[]): Float64Array {
  const r = Float64Array.from(v);
  for (let pass = 0; pass < 2; pass++) {
    for (const u of basis) {
      const f = dot(u, r);
      for (let i = 0; i < r.length; i++) r[i] -= f * u[i];
    }
  }
  return r;
}

function column(values: Float64Array, rows: number, cols: number, j: number): Float64Array {
  const out = new Float64Array(rows);
  for (let i = 0; i < rows; i++) out[i] = values[i * cols + j];
  return out;
}

export function partitionEffect(design: Float64Array, subjects: number, columns: number, contrast: ArrayLike<number>): EffectPartition {
  const S = subjects;
  const p = columns;
  const c = Float64Array.from(contrast);
  // Orthonormal basis of c's complement: columns 2..p of the Householder reflector mapping c to a multiple of e1.
  const cNorm = Math.sqrt(dot(c, c));
  const v = Float64Array.from(c, (x) => x / cNorm);
  v[0] += v[0] >= 0 ? 1 : -1;
  const vv = dot(v, v);
  const complement: Float64Array[] = [];
  for (let j = 1; j < p; j++) {
    const h = new Float64Array(p);
    for (let i = 0; i < p; i++) h[i] = (i === j ? 1 : 0) - (2 * v[i] * v[j]) / vv;
    complement.push(h);
  }
  // Z = X N, then an orthonormal basis of span(Z) by QR.
  const z = new Float64Array(S * (p - 1));
  for (let s = 0; s < S; s++) {
    for (let j = 0; j < p - 1; j++) {
      let sum = 0;
      for (let i = 0; i < p; i++) sum += design[s * p + i] * complement[j][i];
      z[s * (p - 1) + j] = sum;
    }
  }
  const zBasis: Float64Array[] = [];
  if (p > 1) {
    const { q } = thinQr(z, S, p - 1);
    for (let j = 0; j < p - 1; j++) zBasis.push(column(q, S, p - 1, j));
  }
  // Put the constant first when it lies in the nuisance space, so permutations can skip it.
  const constant = new Float64Array(S).fill(1 / Math.sqrt(S));
  const constantResidual = projectOut(constant, zBasis);
  const constantInNuisance = Math.sqrt(dot(constantResidual, constantResidual)) < 1e-9;
  const nuisanceBasis: Float64Array[] = constantInNuisance ? [constant] : [];
  for (const u of zBasis) {
    if (nuisanceBasis.length >= zBasis.length) break;
    const r = projectOut(u, nuisanceBasis);
    const norm = Math.sqrt(dot(r, r));
    if (norm < 1e-8) continue;
    for (let i = 0; i < S; i++) r[i] /= norm;
    nuisanceBasis.push(r);
  }
  // x = X D c / (c'Dc), D = (X'X)⁻¹.
  const d = unscaledCovariance(thinQr(design, S, p));
  const dc = new Float64Array(p);
  for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) dc[i] += d[i * p + j] * c[j];
  const cdc = dot(c, dc);
  const x = new Float64Array(S);
  for (let s = 0; s < S; s++) {
    let sum = 0;
    for (let i = 0; i < p; i++) sum += design[s * p + i] * dc[i];
    x[s] = sum / cdc;
  }
  const effect = projectOut(x, nuisanceBasis);
  // Whether the model's column space holds the constant: project 1 on span(X).
  const xBasis = [...nuisanceBasis];
  const effectNorm2 = dot(effect, effect);
  xBasis.push(Float64Array.from(effect, (e) => e / Math.sqrt(effectNorm2)));
  const modelResidual = projectOut(constant, xBasis);
  const constantInModel = Math.sqrt(dot(modelResidual, modelResidual)) < 1e-9;
  return { subjects: S, effect, effectNorm2, nuisanceBasis, constantInNuisance, constantInModel, df: S - p };
}

/**
 * Residuals of the reduced (nuisance-only) model at every edge, R_z = (I − H_Z)Y,
 * and their sums of squares. Data and residuals are edge-major (x[e·S + s]);
 * `residuals` may be `data` itself, to overwrite it in place.
 */
export function reducedResiduals(
  data: Float64Array,
  subjects: number,
  edges: number,
  nuisanceBasis: Float64Array[],
  residuals: Float64Array = new Float64Array(subjects * edges),
): { residuals: Float64Array; sumSquares: Float64Array } {
  const S = subjects;
  const E = edges;
  const sumSquares = new Float64Array(E);
  const column = new Float64Array(S);
  for (let e = 0; e < E; e++) {
    const at = e * S;
    for (let s = 0; s < S; s++) column[s] = data[at + s];
    for (const u of nuisanceBasis) {
      let f = 0;
      for (let s = 0; s < S; s++) f += u[s] * data[at + s];
      for (let s = 0; s < S; s++) column[s] -= f * u[s];
    }
    let ss = 0;
    for (let s = 0; s < S; s++) {
      residuals[at + s] = column[s];
      ss += column[s] * column[s];
    }
    sumSquares[e] = ss;
  }
  return { residuals, sumSquares };
}

/**
 * The partition for a multi-row contrast C (q × p, an F test): the nuisance
 * space is {Xβ : Cβ = 0} = span(X N) with N an orthonormal basis of the
 * complement of C's row space, and the effect space is spanned by
 * (I − H_Z) X (X'X)⁻¹C' (Winkler et al. 2014, Appendix A). The effect basis
 * is returned orthonormal, so the numerator sum of squares of a relabeling is
 * Σ_k (u_k' T R)² (the F statistic's numerator times q).
 */
export interface MultiEffectPartition {
  subjects: number;
  /** Orthonormal basis of the effect space (q vectors). */
  effectBasis: Float64Array[];
  nuisanceBasis: Float64Array[];
  constantInNuisance: boolean;
  constantInModel: boolean;
  df: number;
}

/** Orthonormalises `vectors` against `against` and each other (two passes); drops those that vanish. */
function orthonormalize(vectors: Float64Array[], against: Float64Array[], tolerance: number): Float64Array[] {
  const out: Float64Array[] = [];
  for (const v of vectors) {
    const r = projectOut(v, [...against, ...out]);
    const norm = Math.sqrt(dot(r, r));
    const scale = Math.sqrt(dot(v, v));
    if (!(norm > tolerance * Math.max(scale, 1e-300))) continue;
    for (let i = 0; i < r.length; i++) r[i] /= norm;
    out.push(r);
  }
  return out;
}

export function partitionEffectRows(
  design: Float64Array,
  subjects: number,
  columns: number,
  rows: ArrayLike<number>[],
): MultiEffectPartition {
  const S = subjects;
  const p = columns;
  const rowVectors = rows.map((r) => Float64Array.from(r));
  const rowBasis = orthonormalize(rowVectors, [], 1e-12);
  const units = Array.from({ length: p }, (_, j) => {
    const e = new Float64Array(p);
    e[j] = 1;
    return e;
  });
  const complement = orthonormalize(units, rowBasis, 1e-8).slice(0, p - rowBasis.length);
  const multiply = (vector: Float64Array) => {
    const out = new Float64Array(S);
    for (let s = 0; s < S; s++) {
      let sum = 0;
      for (let i = 0; i < p; i++) sum += design[s * p + i] * vector[i];
      out[s] = sum;
    }
    return out;
  };
  const zColumns = complement.map(multiply);
  const constant = new Float64Array(S).fill(1 / Math.sqrt(S));
  const zBasis = orthonormalize(zColumns, [], 1e-10);
  const constantResidual = projectOut(constant, zBasis);
  const constantInNuisance = Math.sqrt(dot(constantResidual, constantResidual)) < 1e-9;
  const nuisanceBasis = constantInNuisance ? [constant, ...orthonormalize(zBasis, [constant], 1e-8)] : zBasis;
  // Effect directions X (X'X)⁻¹ C'_k for each row; their span with the nuisance projected out.
  const qr = thinQr(design, S, p);
  const d = unscaledCovariance(qr);
  const effectColumns = rowVectors.map((c) => {
    const dc = new Float64Array(p);
    for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) dc[i] += d[i * p + j] * c[j];
    return multiply(dc);
  });
  const effectBasis = orthonormalize(effectColumns, nuisanceBasis, 1e-10);
  const modelResidual = projectOut(constant, [...nuisanceBasis, ...effectBasis]);
  const constantInModel = Math.sqrt(dot(modelResidual, modelResidual)) < 1e-9;
  return { subjects: S, effectBasis, nuisanceBasis, constantInNuisance, constantInModel, df: S - p };
}
