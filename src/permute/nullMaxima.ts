import type { Tail } from "../io/designFile.js";
import { largestComponent, UnionFind } from "../inference/components.js";
import { signsOfTail } from "../inference/observedComponents.js";

/**
 * What one relabeling contributes to the null distributions: the largest
 * component's extent and mass (each maximised independently, over both
 * signs for a two-tailed test) and the largest statistic (|t| when two-tailed),
 * the maximum statistic of Westfall & Young (1993, Resampling-Based Multiple
 * Testing, Wiley) single-step correction. 0 when nothing is supra-threshold.
 */
export class NullMaxima {
  private readonly sets: UnionFind;
  private readonly edgesOfRoot: Int32Array;
  private readonly massOfRoot: Float64Array;
  private readonly signs: (1 | -1)[];

  constructor(
    readonly regionA: Uint32Array,
    readonly regionB: Uint32Array,
    regionCount: number,
    readonly threshold: number,
    tail: Tail,
  ) {
    this.sets = new UnionFind(regionCount);
    this.edgesOfRoot = new Int32Array(regionCount);
    this.massOfRoot = new Float64Array(regionCount);
    this.signs = signsOfTail(tail);
  }

  measure(statistic: Float64Array): { maxExtent: number; maxMass: number; maxStatistic: number } {
    let maxExtent = 0;
    let maxMass = 0;
    let maxStatistic = -Infinity;
    for (const sign of this.signs) {
      const largest = largestComponent(
        statistic,
        this.regionA,
        this.regionB,
        this.threshold,
        sign,
        this.sets,
        this.edgesOfRoot,
        this.massOfRoot,
      );
      if (largest.maxExtent > maxExtent) maxExtent = largest.maxExtent;
      if (largest.maxMass > maxMass) maxMass = largest.maxMass;
      for (let e = 0; e < statistic.length; e++) {
        const value = sign * statistic[e];
        if (value > maxStatistic) maxStatistic = value;
      }
    }
    return { maxExtent, maxMass, maxStatistic: maxStatistic === -Infinity ? NaN : maxStatistic };
  }
}
