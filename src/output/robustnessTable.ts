import type { ObservedContrast, SweepLevel } from "./contrastResults.js";
import type { PreparedAnalysis } from "./preparedAnalysis.js";
import { formatTsv, type Cell } from "./tsvWriter.js";

/**
 * threshold_robustness.tsv: every edge in a significant component at one or
 * more of the swept thresholds, with the component holding it at each
 * threshold (empty when not significant there) and how many thresholds agree.
 */
export function robustnessTable(prepared: PreparedAnalysis, observed: ObservedContrast, sweep: SweepLevel[], alpha: number): string {
  const significantSets = sweep.map((level) => new Set(level.components.filter((_, k) => level.componentP[k].p <= alpha).map((c) => c.id)));
  const rows: Cell[][] = [];
  for (let e = 0; e < prepared.pairs.edgeCount; e++) {
    const ids = sweep.map((level, i) => (significantSets[i].has(level.labels[e]) ? level.labels[e] : null));
    const count = ids.filter((id) => id !== null).length;
    if (count === 0) continue;
    rows.push([
      prepared.regions[prepared.pairs.regionA[e]].label,
      prepared.regions[prepared.pairs.regionB[e]].label,
      observed.statistics.statistic[e],
      ...ids,
      count,
    ]);
  }
  return formatTsv(["region_a", "region_b", "statistic", ...sweep.map((l) => `component_t${l.threshold}`), "significant_thresholds"], rows);
}
