import type { ResultsSummary } from "./loadResults.js";
import { plain } from "./printNumbers.js";
import type { Segment } from "./methodsSegment.js";

// Full references, from memory of these well-known works.
const REFERENCES = {
  larsenMcCleary: "Larsen WA, McCleary SJ (1972). The use of partial residual plots in regression analysis. Technometrics 14:781–790.",
  kriegeskorte:
    "Kriegeskorte N, Simmons WK, Bellgowan PSF, Baker CI (2009). Circular analysis in systems neuroscience: the dangers of double dipping. Nature Neuroscience 12:535–540.",
} as const;

/**
 * The methods text's sentence on the data figures (summary.json's
 * `subnetwork_values` per contrast): what was averaged, what was adjusted for
 * and how, and the circularity caution. Nothing when no contrast has them.
 */
export function subnetworkValuesMethods(summary: ResultsSummary): { segments: Segment[]; references: string[] } {
  const blocks = summary.contrasts.flatMap((c) => (c.subnetwork_values ? [{ name: c.name, block: c.subnetwork_values }] : []));
  if (blocks.length === 0) return { segments: [], references: [] };
  const fdr = blocks.every(({ block }) => block.selection === "fdr components");
  const what = fdr ? `each connected set of edges with q_FDR ≤ ${plain(summary.options.inference.alpha)}` : "each significant subnetwork";
  const segments: Segment[] = [` To show the data behind ${what} of `];
  blocks.forEach(({ name }, k) => {
    if (k > 0) segments.push(k === blocks.length - 1 ? " and " : ", ");
    segments.push({ user: name });
  });
  const unit = summary.repeated?.design === "paired differences" ? "person's mean change in edge value" : summary.repeated ? "scan's mean edge value" : "participant's mean edge value";
  segments.push(`, each ${unit} over the ${fdr ? "set's" : "subnetwork's"} edges was computed`);
  const adjusted = [...new Set(blocks.flatMap(({ block }) => block.adjusted_for))];
  if (adjusted.length > 0) {
    segments.push(" and adjusted for ");
    adjusted.forEach((name, k) => {
      if (k > 0) segments.push(k === adjusted.length - 1 ? " and " : ", ");
      segments.push({ user: name });
    });
    const one = adjusted.length === 1;
    segments.push(` by removing ${one ? "its" : "their"} fitted contribution in the same linear model, centred at ${one ? "its mean" : "their means"} (partial residuals; Larsen & McCleary 1972)`);
  }
  const percent = `${plain(100 * blocks[0].block.confidence_level)}%`;
  const lines = blocks.filter(({ block }) => block.plot === "covariate").length;
  const shown =
    lines === 0
      ? `the model's fitted means and their ${percent} confidence intervals`
      : lines === blocks.length
        ? `the model's fitted line and its ${percent} confidence band`
        : `the model's fitted means or lines and their ${percent} confidence intervals`;
  segments.push(
    `, and shown with ${shown}. Because ${fdr ? "these edges" : "these subnetworks"} were selected from the same data, the plots illustrate the findings but overstate their effects (Kriegeskorte et al. 2009).`,
  );
  return { segments, references: adjusted.length > 0 ? [REFERENCES.larsenMcCleary, REFERENCES.kriegeskorte] : [REFERENCES.kriegeskorte] };
}
