import type { ContrastInference, ObservedContrast } from "../output/contrastResults.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import { primaryRule } from "../output/summaryParts.js";

/** One line per contrast for the terminal: its components and how many are significant. */
export function resultLines(prepared: PreparedAnalysis, contrasts: ObservedContrast[], inferred: ContrastInference[]): string[] {
  const { inference } = prepared.design;
  return contrasts.map((observed, i) => {
    const head = `${observed.contrast.name}: ${observed.components.length} supra-threshold component(s) at ${primaryRule(inference)}`;
    const { fwe } = inferred[i];
    if (!fwe) {
      const significant = observed.qFdr.filter((q) => q <= inference.alpha).length;
      return `${head}; ${significant} edge(s) with q_fdr ≤ ${inference.alpha}`;
    }
    const significant = fwe.componentP.filter((r) => r.p <= inference.alpha).length;
    const edges = fwe.edgeP ? `; ${fwe.edgeP.filter((p) => p <= inference.alpha).length} edge(s) with p_fwe ≤ ${inference.alpha}` : "";
    return `${head}; ${significant} with p_fwe ≤ ${inference.alpha}${edges}`;
  });
}
