import type { NullChunk } from "../permute/nullRangeTypes.js";

/**
 * The null of the maxima over contrasts (Winkler, Webster, Brooks, Tracey,
 * Smith & Nichols 2016, Hum. Brain Mapp. 37:1486, the joint null of the
 * maxima): row k is, column by column, the largest of the contrasts' row-k
 * values, for contrasts whose relabeling k is the same rearrangement of the
 * subjects. Comparing each contrast's observed values with it gives p-values
 * corrected for every contrast and the whole network at once. A NaN (a
 * relabeling without any statistic) is passed over; a row NaN in every
 * contrast stays NaN.
 */
export function jointNull(nulls: readonly NullChunk[]): NullChunk {
  if (nulls.length === 0) throw new RangeError("jointNull: no null distribution");
  const first = nulls[0];
  for (const other of nulls) {
    if (other.from !== first.from || other.to !== first.to) {
      throw new RangeError(`jointNull: relabelings ${other.from}..${other.to - 1} against ${first.from}..${first.to - 1}`);
    }
    if (other.extraNames.join("\t") !== first.extraNames.join("\t")) {
      throw new RangeError(`jointNull: null columns ${other.extraNames.join(", ")} against ${first.extraNames.join(", ")}`);
    }
  }
  const rowwiseMax = (column: (chunk: NullChunk) => Float64Array): Float64Array => {
    const out = new Float64Array(first.to - first.from).fill(NaN);
    for (const chunk of nulls) {
      const values = column(chunk);
      for (let i = 0; i < out.length; i++) {
        const v = values[i];
        if (!Number.isNaN(v) && !(v <= out[i])) out[i] = v;
      }
    }
    return out;
  };
  return {
    from: first.from,
    to: first.to,
    maxExtent: rowwiseMax((c) => c.maxExtent),
    maxMass: rowwiseMax((c) => c.maxMass),
    maxStatistic: rowwiseMax((c) => c.maxStatistic),
    extraNames: [...first.extraNames],
    extra: first.extraNames.map((_, j) => rowwiseMax((c) => c.extra[j])),
  };
}
