import type { LoadedResults } from "./loadResults.js";
import { presentInPercent } from "../edgeRulesSummary.js";
import type { CoverageSummary } from "./coverageMethods.js";

/**
 * The report's summary row on the edges' path (`edges:`, `scale`, `transform: log1p`):
 * how many edges were analysed and why the others were left out. Null when none is in force.
 * Text from the user's files (region labels) goes through `h` (HTML-escaped).
 */
export function coverageRow(summary: CoverageSummary, h: (text: string) => string): [string, string] | null {
  const rules = summary.edge_rules;
  const steps: string[] = [];
  if (summary.options.transform === "log1p") steps.push("log(1 + x)");
  if (rules) {
    const why: string[] = [];
    if (rules.missing === "drop") why.push(`${rules.dropped_missing} missing`);
    if (rules.present_in !== null) why.push(`${rules.dropped_present_in} present in < ${presentInPercent(rules.present_in)} of participants`);
    steps.push(`${rules.kept} of ${rules.edges} edges analysed${why.length ? ` (left out: ${why.join(", ")})` : ""}`);
    if (rules.regions_without_edges.length > 0) steps.push(`no edge kept for ${rules.regions_without_edges.map(h).join(", ")}`);
  }
  if (summary.options.scale === "total") steps.push(`each participant scaled to the total of its ${rules ? "kept " : ""}edges`);
  return steps.length > 0 ? ["Edges", steps.join("; ")] : null;
}

/** The tables' note on the edge rules (`edges:`): how many edges were analysed and why the others were not. Null without rules. */
export function coverageTableNote(summary: LoadedResults["summary"]): string | null {
  const rules = summary.edge_rules;
  if (!rules) return null;
  const why: string[] = [];
  if (rules.missing === "drop") why.push(`${rules.dropped_missing} missing in some participant`);
  if (rules.present_in !== null) why.push(`${rules.dropped_present_in} non-zero in fewer than ${presentInPercent(rules.present_in)} of the participants`);
  return `Edges analysed: ${rules.kept} of ${rules.edges}${why.length ? ` (left out by the edge rules: ${why.join("; ")})` : ""}; subnetworks, p_FWE and q_FDR concern the analysed edges only.`;
}
