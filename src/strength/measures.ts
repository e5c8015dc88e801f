import type { EdgePairs } from "../edges/edgeIndex.js";

/**
 * Per-subject network strength from the edge-major connectome data
 * (data[e·S + s], upper-triangle edges after the design's transform).
 *
 * Nodal strength is the sum of the weights of a region's edges, the weighted
 * degree s_i = Σ_j w_ij (Rubinov & Sporns 2010, NeuroImage 52:1059, Table A1);
 * with `positiveOnly` the negative weights count as 0 (their s_i⁺), and with
 * `mean` the sum is divided by the N − 1 possible neighbours. Global strength
 * and the strength of a subnetwork are the mean weight over all edges, or
 * over a chosen set of edges.
 *
 * Pure: sums run over edges in ascending order, so a value does not depend
 * on how the edge set was listed. An empty edge set gives NaN.
 */
export interface NodalStrengthOptions {
  /** Count negative weights as 0. */
  positiveOnly: boolean;
  /** Divide by the N − 1 possible neighbours instead of summing. */
  mean: boolean;
}

function weight(value: number, positiveOnly: boolean): number {
  return positiveOnly && value < 0 ? 0 : value;
}

/** Nodal strength of every region, region-major: out[i·S + s]. */
export function nodalStrength(
  data: Float64Array,
  subjects: number,
  pairs: EdgePairs,
  options: NodalStrengthOptions,
): Float64Array {
  const S = subjects;
  const out = new Float64Array(pairs.regionCount * S);
  for (let e = 0; e < pairs.edgeCount; e++) {
    const at = e * S;
    const a = pairs.regionA[e] * S;
    const b = pairs.regionB[e] * S;
    for (let s = 0; s < S; s++) {
      const w = weight(data[at + s], options.positiveOnly);
      out[a + s] += w;
      out[b + s] += w;
    }
  }
  if (options.mean) {
    const neighbours = pairs.regionCount - 1;
    for (let k = 0; k < out.length; k++) out[k] /= neighbours;
  }
  return out;
}

/** Mean weight over a set of edges (indices in the i < j edge order), per subject. */
export function edgeSetMean(data: Float64Array, subjects: number, edges: ArrayLike<number>, positiveOnly: boolean): Float64Array {
  const S = subjects;
  const ordered = Uint32Array.from(edges).sort();
  const out = new Float64Array(S);
  for (let k = 0; k < ordered.length; k++) {
    const at = ordered[k] * S;
    for (let s = 0; s < S; s++) out[s] += weight(data[at + s], positiveOnly);
  }
  for (let s = 0; s < S; s++) out[s] /= ordered.length;
  return out;
}

/** Global strength: the mean weight over every edge, per subject. */
export function globalStrength(data: Float64Array, subjects: number, edgeCount: number, positiveOnly: boolean): Float64Array {
  const S = subjects;
  const out = new Float64Array(S);
  for (let e = 0; e < edgeCount; e++) {
    const at = e * S;
    for (let s = 0; s < S; s++) out[s] += weight(data[at + s], positiveOnly);
  }
  for (let s = 0; s < S; s++) out[s] /= edgeCount;
  return out;
}
