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
  /** Reduced-model residuals, subject-major: residuals[s·E + e]. */
  residuals: Float64Array;
  /** ‖R‖² per edge. */
  sumSquares: Float64Array;
  /** 1 where the observed statistic is finite; other edges stay NaN. */
  valid: Uint8Array;
  effectNorm2: number;
  df: number;
}

/** Edges per cache block: a block of residual rows stays in cache while the whole batch streams over it. */
export const EDGE_BLOCK = 512;

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
  scratch: Float64Array = new Float64Array(batch * vectors * EDGE_BLOCK),
): void {
  const { subjects: S, edges: E, residuals, sumSquares, valid, effectNorm2, df } = data;
  const rows = batch * vectors;
  for (let e0 = 0; e0 < E; e0 += EDGE_BLOCK) {
    const width = Math.min(EDGE_BLOCK, E - e0);
    scratch.fill(0, 0, rows * EDGE_BLOCK);
    for (let s = 0; s < S; s++) {
      const base = s * E + e0;
      for (let j = 0; j < rows; j++) {
        const w = weights[j * S + s];
        if (w === 0) continue;
        const acc = j * EDGE_BLOCK;
        for (let i = 0; i < width; i++) scratch[acc + i] += w * residuals[base + i];
      }
    }
    for (let b = 0; b < batch; b++) {
      const numeratorRow = b * vectors * EDGE_BLOCK;
      const target = b * E + e0;
      for (let i = 0; i < width; i++) {
        const e = e0 + i;
        if (valid[e] === 0) {
          out[target + i] = NaN;
          continue;
        }
        const a = scratch[numeratorRow + i];
        let sse = sumSquares[e] - (a * a) / effectNorm2;
        for (let k = 1; k < vectors; k++) {
          const g = scratch[numeratorRow + k * EDGE_BLOCK + i];
          sse -= g * g;
        }
        out[target + i] = sse > 0 ? a / Math.sqrt((sse / df) * effectNorm2) : NaN;
      }
    }
  }
}
