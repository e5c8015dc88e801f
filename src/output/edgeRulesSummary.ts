import type { Region } from "../io/regions.js";
import type { AppliedEdgeRules } from "./preparedAnalysis.js";

/** `edges.present_in` as a percentage, e.g. 0.75 → "75%", 2/3 → "66.7%" (one decimal at most). */
export function presentInPercent(fraction: number): string {
  return `${Number((100 * fraction).toFixed(1))}%`;
}

/** summary.json's `edge_rules`: the coverage rules of the design and what they kept and left out. */
export function edgeRulesSummary(rules: AppliedEdgeRules, regions: readonly Region[]): Record<string, unknown> {
  return {
    missing: rules.missing,
    present_in: rules.presentIn ?? null,
    edges: rules.allPairs.edgeCount,
    kept: rules.kept.length,
    dropped: rules.dropped.missing + rules.dropped.rare,
    dropped_missing: rules.dropped.missing,
    dropped_present_in: rules.dropped.rare,
    regions_without_edges: rules.regionsWithoutEdges.map((r) => regions[r].label),
  };
}

/** `plexus check`'s edges line: the transform, the coverage rules' counts and the scaling, in the order they run. */
export function edgeRulesLine(transform: string, scale: string, rules: AppliedEdgeRules | undefined, regions: readonly Region[]): string | null {
  const parts: string[] = [];
  if (transform === "log1p") parts.push("log(1 + x) at reading");
  if (rules) {
    const why: string[] = [];
    if (rules.missing === "drop") why.push(`${rules.dropped.missing} missing in some participant`);
    if (rules.presentIn !== undefined) why.push(`${rules.dropped.rare} present in fewer than ${presentInPercent(rules.presentIn)}`);
    parts.push(`${rules.kept.length} of ${rules.allPairs.edgeCount} kept${why.length ? ` (dropped: ${why.join(", ")})` : ""}`);
    if (rules.regionsWithoutEdges.length > 0) parts.push(`no kept edge: ${rules.regionsWithoutEdges.map((r) => regions[r].label).join(", ")}`);
  }
  if (scale === "total") parts.push("then each participant divided by the sum of its kept edges");
  return parts.length > 0 ? parts.join("; ") : null;
}
