import type { AppliedEdgeRules } from "./preparedAnalysis.js";

/**
 * A per-edge array over the analysed (kept) edges spread to every edge of the
 * matrices, in the fixed edge order: edges left out by the edge rules get
 * `fill` (NaN: an empty cell in edges.tsv; 0: no component).
 */
export function toAllEdges<T extends Float64Array | Int32Array>(values: ArrayLike<number>, rules: AppliedEdgeRules, make: (length: number) => T, fill: number): T {
  const out = make(rules.allPairs.edgeCount);
  out.fill(fill);
  const kept = rules.kept;
  for (let k = 0; k < kept.length; k++) out[kept[k]] = values[k];
  return out;
}

export const allEdgesFloat = (values: ArrayLike<number>, rules: AppliedEdgeRules): Float64Array =>
  toAllEdges(values, rules, (n) => new Float64Array(n), NaN);
export const allEdgesLabels = (values: ArrayLike<number>, rules: AppliedEdgeRules): Int32Array =>
  toAllEdges(values, rules, (n) => new Int32Array(n), 0);
