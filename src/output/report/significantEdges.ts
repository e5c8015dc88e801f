import type { ContrastResults, ComponentRow } from "./loadResults.js";

/**
 * What a contrast's report shows as its finding. With permutations: the
 * supra-threshold components whose p_fwe ≤ alpha and their edges. Without
 * (method fdr): the edges whose q_fdr ≤ alpha. Edges are listed component by
 * component (most significant first, as numbered), strongest |statistic|
 * first within each, ties by edge order.
 */
export interface SignificantEdges {
  kind: "components" | "fdr";
  components: ComponentRow[];
  edges: number[];
}

export function significantEdges(contrast: ContrastResults, alpha: number): SignificantEdges {
  const { edges } = contrast;
  const strength = (e: number) => Math.abs(edges.statistic[e]);
  const byStrength = (a: number, b: number) => strength(b) - strength(a) || a - b;
  if (contrast.summary.mode === null || contrast.summary.mode === undefined) {
    const selected: number[] = [];
    for (let e = 0; e < edges.qFdr.length; e++) if (edges.qFdr[e] <= alpha) selected.push(e);
    return { kind: "fdr", components: [], edges: selected.sort(byStrength) };
  }
  const components = contrast.components.filter((c) => c.pFwe <= alpha);
  const order = new Map(components.map((c, k) => [c.id, k]));
  const selected: number[] = [];
  for (let e = 0; e < edges.component.length; e++) if (order.has(edges.component[e])) selected.push(e);
  selected.sort((a, b) => order.get(edges.component[a])! - order.get(edges.component[b])! || byStrength(a, b));
  return { kind: "components", components, edges: selected };
}
