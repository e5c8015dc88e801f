import type { PrintWidth } from "./figures/printSize.js";
import { adjustedWords, subnetworkDataFigure, type DataFigureContext } from "./figures/subnetworkDataFigure.js";
import type { ContrastResults, ResultsSummary } from "./loadResults.js";
import { pValue } from "./printNumbers.js";

/**
 * A contrast's data figures, one per significant subnetwork with values
 * (`figures/<contrast>-subnetwork<k>-data`), with captions that say what was
 * adjusted for and carry the circularity caution.
 */
export interface FigurePlan {
  file: string;
  kind: string;
  caption: string;
  draw: (width: PrintWidth) => string | null;
}

export function subnetworkDataFigures(contrast: ContrastResults, summary: ResultsSummary): FigurePlan[] {
  const values = contrast.subnetworkValues;
  if (!values) return [];
  const name = contrast.summary.name;
  const repeated = summary.repeated;
  const context: DataFigureContext = {
    transform: summary.options.transform,
    ...(repeated?.design === "paired differences" && repeated.difference ? { difference: repeated.difference } : {}),
    ...(repeated ? { person: repeated.participant } : {}),
    ...(repeated?.design === "repeated measures" ? { scans: true } : {}),
  };
  const alpha = summary.options.inference.alpha;
  return values.subnetworks.map((s, k) => {
    const component = contrast.components.find((c) => c.id === s.id);
    const which =
      values.selection === "fdr components"
        ? `connected set ${s.id} of the edges with q_FDR ≤ ${alpha} (${s.edges} edges)`
        : `subnetwork ${s.id} (${s.edges} edges${component && Number.isFinite(component.pFwe) ? `, p_FWE ${pValue(component.pFwe).startsWith("<") ? "" : "= "}${pValue(component.pFwe)}` : ""})`;
    const adjusted = adjustedWords(values, context);
    const unit = context.scans ? "scan's mean" : context.difference ? "person's mean change" : "participant's mean";
    const what =
      values.plot === "groups"
        ? `by ${values.variable}: points (spread sideways so they do not hide each other), box of the median and quartiles with whiskers to the furthest point within 1.5 × IQR, and the model's mean with its ${Math.round(values.level * 100)}% confidence interval (diamond)`
        : values.plot === "covariate"
          ? `against ${values.variable}, with the model's line and its ${Math.round(values.level * 100)}% confidence band`
          : `with the model's mean and its ${Math.round(values.level * 100)}% confidence interval (diamond) and zero (dashed line)`;
    const caption =
      `The data behind ${which}: each ${unit} over its edges${adjusted ? `, ${adjusted} (what those columns explain in the fitted model removed, at their means)` : ""}, ${what}. ` +
      `Values in ${name}/subnetwork_values.tsv. Caution: the subnetwork was selected from these same data, so this plot illustrates the finding but overstates its effect; it is not an independent estimate of its size.`;
    return { file: `figures/${name}-subnetwork${s.id}-data`, kind: "data", caption, draw: (width: PrintWidth) => subnetworkDataFigure(values, k, context, width) };
  });
}
