import { UnionFind } from "./components.js";

/**
 * Threshold-free enhancement of edge statistics on a network (Smith &
 * Nichols 2009, NeuroImage 44:83, eq. 1, applied to graph components as in
 * Baggio et al. 2018, Human Brain Mapping 39:2289):
 *   TFE(e) = Σ_{h = dh, 2dh, … ≤ t_e} extent(e, h)^E · h^H · dh,
 * where extent(e, h) is the number of edges in the component holding e when
 * the network is thresholded at statistic ≥ h. Positive and negative edges
 * are enhanced separately (`sign`); edges of the other sign get 0.
 *
 * Thresholds are visited from high to low while edges join one union–find,
 * so each level costs one pass over the edges already above it.
 */
export interface EnhancementParameters {
  /** Exponent E of the component extent. */
  extentExponent: number;
  /** Exponent H of the height h. */
  heightExponent: number;
  /** Step dh between thresholds. */
  step: number;
}

/** Smith & Nichols (2009)'s defaults E = 0.5, H = 2 (from memory), with dh = 0.1. */
export const DEFAULT_ENHANCEMENT: EnhancementParameters = { extentExponent: 0.5, heightExponent: 2, step: 0.1 };

export class ThresholdFreeEnhancer {
  private readonly sets: UnionFind;
  private readonly edgesOfRoot: Int32Array;
  private order: Int32Array;

  constructor(
    private readonly regionA: Uint32Array,
    private readonly regionB: Uint32Array,
    regionCount: number,
    private readonly parameters: EnhancementParameters,
  ) {
    this.sets = new UnionFind(regionCount);
    this.edgesOfRoot = new Int32Array(regionCount);
    this.order = new Int32Array(regionA.length);
  }

  /** Adds sign-side enhancement of `statistic` into `out` (out must start at 0 for a fresh result). */
  enhance(statistic: ArrayLike<number>, sign: 1 | -1, out: Float64Array): void {
    const { extentExponent, heightExponent, step } = this.parameters;
    const E = statistic.length;
    // Level of each edge: the number of thresholds h = step, 2·step, … at or below its statistic
    // (a statistic on a level counts it, despite rounding in statistic ÷ step).
    const levelOf = (e: number) => Math.floor((sign * statistic[e]) / step + 1e-9);
    let count = 0;
    for (let e = 0; e < E; e++) if (levelOf(e) >= 1) this.order[count++] = e;
    if (count === 0) return;
    const active = this.order.subarray(0, count);
    // Highest first; ties by edge index, so the order is fixed.
    active.sort((a, b) => sign * statistic[b] - sign * statistic[a] || a - b);
    this.sets.reset();
    this.edgesOfRoot.fill(0);
    const top = levelOf(active[0]);
    let joined = 0;
    for (let level = top; level >= 1; level--) {
      while (joined < count && levelOf(active[joined]) >= level) {
        const e = active[joined];
        const ra = this.sets.find(this.regionA[e]);
        const rb = this.sets.find(this.regionB[e]);
        const edgesBefore = ra === rb ? this.edgesOfRoot[ra] : this.edgesOfRoot[ra] + this.edgesOfRoot[rb];
        const root = this.sets.union(ra, rb);
        this.edgesOfRoot[root] = edgesBefore + 1;
        joined++;
      }
      const weight = (level * step) ** heightExponent * step;
      for (let k = 0; k < joined; k++) {
        const e = active[k];
        out[e] += sign * this.edgesOfRoot[this.sets.find(this.regionA[e])] ** extentExponent * weight;
      }
    }
  }

  /** The enhanced statistic for a tail: positive and negative edges enhanced separately. */
  enhanceTail(statistic: ArrayLike<number>, signs: (1 | -1)[], out: Float64Array): Float64Array {
    out.fill(0);
    for (const sign of signs) this.enhance(statistic, sign, out);
    return out;
  }
}
