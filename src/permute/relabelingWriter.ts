import type { TwoLevelEffect } from "./kernels/groupSums.js";
import type { NullContext } from "./nullRangeTypes.js";
import { Relabeler } from "./relabelings.js";

/** Fills the relabeled vectors (or the summed group) of relabeling k into slot b of a batch. */
export interface RelabelingWriter {
  /** weights[(b·c + j)·S + s] = vector j relabeled by k. */
  weights(k: number, b: number, weights: Float64Array): void;
  /** members[b·groupSize …]: the subjects whose relabeled effect value is the summed group's, ascending. */
  members(k: number, b: number, members: Int32Array, level: TwoLevelEffect): void;
}

export function relabelingWriter(context: NullContext): RelabelingWriter {
  const { vectors, plan } = context;
  const S = context.kernel.subjects;
  const c = vectors.length;
  const relabeler = new Relabeler(plan);
  const permutation = new Int32Array(S);
  const signs = new Float64Array(S);
  return {
    weights(k, b, weights) {
      if (plan.kind === "permute") {
        relabeler.permutation(k, permutation);
        for (let j = 0; j < c; j++) {
          const v = vectors[j];
          const at = (b * c + j) * S;
          for (let s = 0; s < S; s++) weights[at + s] = v[permutation[s]];
        }
      } else {
        relabeler.signs(k, signs);
        for (let j = 0; j < c; j++) {
          const v = vectors[j];
          const at = (b * c + j) * S;
          for (let s = 0; s < S; s++) weights[at + s] = signs[s] * v[s];
        }
      }
    },
    members(k, b, members, level) {
      relabeler.permutation(k, permutation);
      const effect = vectors[0];
      let n = b * level.groupSize;
      for (let s = 0; s < S; s++) if (effect[permutation[s]] === level.inGroup) members[n++] = s;
    },
  };
}

