import type { ContrastInference, ObservedContrast } from "../output/contrastResults.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import { primaryRule } from "../output/summaryParts.js";

function counted(value: number, noun: string): string {
  return `${value} ${value === 1 ? noun : `${noun}s`}`;
}

/**
 * One line per contrast for the terminal, in the words of the inference that
 * was run: significant subnetworks among the supra-threshold components,
 * edges with p_FWE at most alpha (threshold-free; the components they form), or edges with q_FDR at most
 * alpha (FDR).
 */
export function resultLines(prepared: PreparedAnalysis, contrasts: ObservedContrast[], inferred: ContrastInference[]): string[] {
  const { inference } = prepared.design;
  const alpha = inference.alpha;
  return contrasts.map((observed, i) => {
    const name = observed.contrast.name;
    const { fwe, free } = inferred[i];
    if (free) {
      const significant = free.edgeP.filter((p) => p <= alpha).length;
      return `${name}: ${counted(significant, "edge")} with p_FWE ≤ ${alpha} (threshold-free), in ${counted(free.components.length, "connected component")}`;
    }
    if (!fwe) {
      const significant = observed.qFdr.filter((q) => q <= alpha).length;
      return `${name}: ${counted(significant, "edge")} with q_FDR ≤ ${alpha} (false discovery rate over ${counted(observed.qFdr.length, "edge")})`;
    }
    const significant = fwe.componentP.filter((r) => r.p <= alpha).length;
    const edges = fwe.edgeP ? `; ${counted(fwe.edgeP.filter((p) => p <= alpha).length, "edge")} with edge-level p_FWE ≤ ${alpha}` : "";
    return `${name}: ${counted(observed.components.length, "supra-threshold component")} at ${primaryRule(inference)}; ${significant} with p_FWE ≤ ${alpha}${edges}`;
  });
}
