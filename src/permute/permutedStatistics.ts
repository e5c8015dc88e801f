/**
 * The contrast's t at every edge for a batch of relabelings, without
 * refitting the model (Freedman & Lane 1983, J. Bus. Econ. Stat. 1:292;
 * Winkler et al. 2014, NeuroImage 92:381, Appendix A). With R = (I − H_Z)Y the
 * reduced-model residuals, x̃ the residualised effect regressor, u_k an
 * orthonormal basis of the nuisance space and T the relabeling (a row
 * permutation P or a sign flip D), the Freedman–Lane data Y* = T R + Zδ̂ give
 *   a   = (T'x̃)' R                       (numerator, = x̃'Y* because x̃ ⊥ Z)
 *   g_k = (T'u_k)' R
 *   SSE* = ‖R‖² − Σ_k g_k² − a² / x̃'x̃     (‖TR‖ = ‖R‖; H_X = H_Z + x̃x̃'/x̃'x̃)
 *   t*  = a / √(SSE* ÷ df · x̃′x̃)
 * so each relabeling costs c = 1 + (number of u_k needed) dot products of
 * length S per edge. A row permutation leaves the constant vector unchanged
 * and R sums to zero when the constant is in the nuisance space, so that u_k
 * is skipped; a sign flip needs every u_k.
 *
 * Each (relabeling, edge) sum runs over subjects in ascending order whatever
 * the batch, so results do not depend on how relabelings are grouped.
 */
export interface KernelData {
  subjects: number;
  edges: number;
  /** Reduced-model residuals, edge-major (each edge's S values contiguous): residuals[e·S + s]. */
  residuals: Float64Array;
  /** ‖R‖² per edge. */
  sumSquares: Float64Array;
  /** 1 where the observed statistic is finite; other edges stay NaN. */
  valid: Uint8Array;
  effectNorm2: number;
  df: number;
  /**
   * Number of effect vectors q leading each relabeling's vectors: 1 for a t
   * contrast (x̃, not normalised); q ≥ 2 for an F contrast, whose effect
   * vectors are orthonormal and whose statistic is
   * F = (Σ_{k<q} a_k² / q) / ((‖R‖² − Σ_{k<q} a_k² − Σ_{k≥q} g_k²) / df).
   */
  effectVectors?: number;
}

/** Edges per block: the products of one block stay in cache until the statistics are formed. */
export const EDGE_BLOCK = 1024;

/**
 * products[j·width + i] = Σ_s weights[j·S + s] · residuals[(e0 + i)·S + s] for
 * rows j and the edges e0..e0+width−1: a small matrix product whose inner
 * loop keeps a 4 × 2 tile of sums in registers (6 loads for 8 multiply–adds).
 */
export function weightedSums(
  residuals: Float64Array,
  S: number,
  weights: Float64Array,
  rows: number,
  e0: number,
  width: number,
  products: Float64Array,
): void {
  let i = 0;
  for (; i + 1 < width; i += 2) {
    const r0 = (e0 + i) * S;
    const r1 = r0 + S;
    let j = 0;
    for (; j + 3 < rows; j += 4) {
      const w0 = j * S;
      const w1 = w0 + S;
      const w2 = w1 + S;
      const w3 = w2 + S;
      let a00 = 0, a01 = 0, a10 = 0, a11 = 0, a20 = 0, a21 = 0, a30 = 0, a31 = 0; // prettier-ignore
      for (let s = 0; s < S; s++) {
        const x0 = residuals[r0 + s];
        const x1 = residuals[r1 + s];
        const v0 = weights[w0 + s];
        const v1 = weights[w1 + s];
        const v2 = weights[w2 + s];
        const v3 = weights[w3 + s];
        a00 += v0 * x0;
        a01 += v0 * x1;
        a10 += v1 * x0;
        a11 += v1 * x1;
        a20 += v2 * x0;
        a21 += v2 * x1;
        a30 += v3 * x0;
        a31 += v3 * x1;
      }
      products[j * width + i] = a00;
      products[j * width + i + 1] = a01;
      products[(j + 1) * width + i] = a10;
      products[(j + 1) * width + i + 1] = a11;
      products[(j + 2) * width + i] = a20;
      products[(j + 2) * width + i + 1] = a21;
      products[(j + 3) * width + i] = a30;
      products[(j + 3) * width + i + 1] = a31;
    }
    for (; j < rows; j++) {
      const w = j * S;
      let a0 = 0;
      let a1 = 0;
      for (let s = 0; s < S; s++) {
        a0 += weights[w + s] * residuals[r0 + s];
        a1 += weights[w + s] * residuals[r1 + s];
      }
      products[j * width + i] = a0;
      products[j * width + i + 1] = a1;
    }
  }
  for (; i < width; i++) {
    const r = (e0 + i) * S;
    for (let j = 0; j < rows; j++) {
      const w = j * S;
      let a = 0;
      for (let s = 0; s < S; s++) a += weights[w + s] * residuals[r + s];
      products[j * width + i] = a;
    }
  }
}

/**
 * weights: B relabelings × c vectors × S subjects (vector 0 is T'x̃, vectors
 * 1..c−1 are T'u_k); out: B × E statistics.
 */
export function permutedStatistics(
  data: KernelData,
  weights: Float64Array,
  batch: number,
  vectors: number,
  out: Float64Array,
  products: Float64Array = new Float64Array(batch * vectors * EDGE_BLOCK),
): void {
  const { subjects: S, edges: E, residuals, sumSquares, valid, effectNorm2, df } = data;
  const q = data.effectVectors ?? 1;
  const rows = batch * vectors;
  for (let e0 = 0; e0 < E; e0 += EDGE_BLOCK) {
    const width = Math.min(EDGE_BLOCK, E - e0);
    weightedSums(residuals, S, weights, rows, e0, width, products);
    for (let b = 0; b < batch; b++) {
      const numeratorRow = b * vectors * width;
      const target = b * E + e0;
      for (let i = 0; i < width; i++) {
        const e = e0 + i;
        if (valid[e] === 0) {
          out[target + i] = NaN;
          continue;
        }
        if (q > 1) {
          let effect = 0;
          for (let k = 0; k < q; k++) {
            const a = products[numeratorRow + k * width + i];
            effect += a * a;
          }
          let rest = sumSquares[e] - effect;
          for (let k = q; k < vectors; k++) {
            const g = products[numeratorRow + k * width + i];
            rest -= g * g;
          }
          out[target + i] = rest > 0 ? effect / q / (rest / df) : NaN;
          continue;
        }
        const a = products[numeratorRow + i];
        let sse = sumSquares[e] - (a * a) / effectNorm2;
        for (let k = 1; k < vectors; k++) {
          const g = products[numeratorRow + k * width + i];
          sse -= g * g;
        }
        out[target + i] = sse > 0 ? a / Math.sqrt((sse / df) * effectNorm2) : NaN;
      }
    }
  }
}

/**
 * The statistic of one relabeling at edge e, with exactly the operations of
 * permutedStatistics in the same order (t contrasts): weights[rowStart + k·S + s]
 * is vector k of the relabeling. The screened path (screening.ts) recomputes
 * its listed pairs with it.
 */
export function statisticAt(data: KernelData, weights: Float64Array, rowStart: number, vectors: number, e: number): number {
  const { subjects: S, residuals, sumSquares, valid, effectNorm2, df } = data;
  if (valid[e] === 0) return NaN;
  const r = e * S;
  let a = 0;
  for (let s = 0; s < S; s++) a += weights[rowStart + s] * residuals[r + s];
  let sse = sumSquares[e] - (a * a) / effectNorm2;
  for (let k = 1; k < vectors; k++) {
    const w = rowStart + k * S;
    let g = 0;
    for (let s = 0; s < S; s++) g += weights[w + s] * residuals[r + s];
    sse -= g * g;
  }
  return sse > 0 ? a / Math.sqrt((sse / df) * effectNorm2) : NaN;
}

/** statisticAt at the edges edges[from … from+count) into out[e]. */
export function statisticsAtEdges(
  data: KernelData,
  weights: Float64Array,
  rowStart: number,
  vectors: number,
  edges: Int32Array,
  from: number,
  count: number,
  out: Float64Array,
): void {
  for (let i = from; i < from + count; i++) out[edges[i]] = statisticAt(data, weights, rowStart, vectors, edges[i]);
}
