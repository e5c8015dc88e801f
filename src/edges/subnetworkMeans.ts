/**
 * Each subject's mean over a set of edges (a subnetwork), from edge-major
 * data (data[e·S + s]). `copyEdges` keeps the rows of chosen edges (ascending
 * edge indices) so that the means can be taken after the full data are gone;
 * `meanOverEdges` sums in the listed order, one subject at a time.
 */
export function copyEdges(data: Float64Array, subjects: number, edges: Uint32Array): Float64Array {
  const out = new Float64Array(edges.length * subjects);
  edges.forEach((e, k) => out.set(data.subarray(e * subjects, (e + 1) * subjects), k * subjects));
  return out;
}

/** Per subject, the mean over the rows `positions` of edge-major `rows` (rows[k·S + s]). */
export function meanOverEdges(rows: Float64Array, subjects: number, positions: ArrayLike<number>): Float64Array {
  const mean = new Float64Array(subjects);
  for (let k = 0; k < positions.length; k++) {
    const at = positions[k] * subjects;
    for (let s = 0; s < subjects; s++) mean[s] += rows[at + s];
  }
  for (let s = 0; s < subjects; s++) mean[s] /= positions.length;
  return mean;
}
