import type { LoadedResults } from "./loadResults.js";
import type { Segment } from "./methodsSegment.js";
import { presentInPercent } from "../edgeRulesSummary.js";

/** What the sentences read of a summary.json (a run's or plexus strength's). */
export type CoverageSummary = Pick<LoadedResults["summary"], "edge_rules"> & {
  options: Pick<LoadedResults["summary"]["options"], "transform" | "scale"> & { inference: Pick<LoadedResults["summary"]["options"]["inference"], "method"> };
};

const DE_REUS = "de Reus MA, van den Heuvel MP (2013). Estimating false positives and negatives in brain networks. NeuroImage 70:402–409.";

/**
 * The methods' sentences on the edges' path to the model, in the order it runs:
 * the log1p transform (at reading), the coverage rules (`edges:`), the scaling
 * to each participant's total (`scale: total`). Empty when none is in force.
 */
export function coverageMethods(summary: CoverageSummary): { segments: Segment[]; references: string[] } {
  const segments: Segment[] = [];
  const references: string[] = [];
  if (summary.options.transform === "log1p") {
    segments.push(" Edge weights were transformed to log(1 + x), common practice for skewed weights such as streamline counts, before analysis.");
  }
  const rules = summary.edge_rules;
  if (rules) {
    const edges = (n: number) => `${n} edge${n === 1 ? "" : "s"}`;
    const parts: string[] = [];
    if (rules.missing === "drop") parts.push(`${edges(rules.dropped_missing)} missing (NaN) in at least one participant`);
    if (rules.present_in !== null) {
      parts.push(
        `${edges(rules.dropped_present_in)} ${rules.missing === "drop" ? "otherwise " : ""}non-zero in fewer than ${presentInPercent(rules.present_in)} of the participants ` +
          `(a prevalence rule, common practice for streamline counts; de Reus & van den Heuvel 2013)`,
      );
      references.push(DE_REUS);
    }
    if (parts.length > 0) {
      segments.push(
        ` Edges were then selected by coverage: ${parts.join(" and ")} ${rules.dropped === 1 ? "was" : "were"} left out, and the remaining ${rules.kept} of ${rules.edges} edges ` +
          (summary.options.inference.method === "fdr" ? "entered the model and the false discovery rate." : "entered the model, the permutation inference and the false discovery rate."),
      );
    }
    const bare = rules.regions_without_edges;
    if (bare.length > 0) {
      segments.push(bare.length === 1 ? " No edge of region " : ` No edge of ${bare.length} regions (`);
      bare.forEach((label, k) => segments.push(...(k === 0 ? [] : [k === bare.length - 1 ? " and " : ", "]), { user: label }));
      segments.push(bare.length === 1 ? " remained." : ") remained.");
    }
  }
  if (summary.options.scale === "total") {
    segments.push(
      ` Each participant's edge weights were ${rules || summary.options.transform === "log1p" ? "then " : ""}divided by their sum over the ${rules ? "kept " : ""}edges (scaling to the total, common practice so that overall differences, for example from head size or tracking settings, do not drive the result).`,
    );
  }
  return { segments, references };
}
