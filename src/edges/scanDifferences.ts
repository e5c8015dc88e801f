/**
 * Each person's within-person difference at every edge, second scan minus
 * first: the response of a paired-differences analysis (the paired t-test is
 * the one-sample t-test of these differences; Student 1908, Biometrika 6:1).
 * Edge-major in and out: data[e·scans + s] → out[e·persons + p] =
 * data[e·scans + second[p]] − data[e·scans + first[p]].
 */
export function scanDifferences(
  data: Float64Array,
  scans: number,
  edges: number,
  first: ArrayLike<number>,
  second: ArrayLike<number>,
  out: Float64Array,
): Float64Array {
  const persons = first.length;
  if (second.length !== persons) throw new RangeError("scanDifferences: first and second list different numbers of persons");
  if (out.length !== persons * edges) throw new RangeError(`scanDifferences: output holds ${out.length} values, not ${persons} × ${edges}`);
  for (let e = 0; e < edges; e++) {
    const from = e * scans;
    const to = e * persons;
    for (let p = 0; p < persons; p++) out[to + p] = data[from + second[p]] - data[from + first[p]];
  }
  return out;
}
