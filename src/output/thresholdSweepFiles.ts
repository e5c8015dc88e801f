import { finiteOrNull } from "../common/finiteOrNull.js";
import type { ObservedContrast, SweepLevel } from "./contrastResults.js";
import type { PreparedAnalysis } from "./preparedAnalysis.js";
import { componentsTable } from "./resultTables.js";
import { formatTsv, type Cell } from "./tsvWriter.js";

// Everything written about a threshold sweep: each threshold's components.tsv,
// threshold_robustness.tsv, and the entries of summary.json's threshold_sweep.

/** Each swept threshold's components.tsv (its own folder) and the contrast's threshold_robustness.tsv, as [relative path, text]. */
export function thresholdSweepFiles(
  name: string,
  prepared: PreparedAnalysis,
  observed: ObservedContrast,
  sweep: SweepLevel[],
  options: { alpha: number; exact: boolean },
): [string, string][] {
  const files: [string, string][] = sweep.map((level) => [
    `${name}/threshold-${level.threshold}/components.tsv`,
    componentsTable(level.components, {
      pFwe: level.componentP.map((r) => r.p),
      ...(options.exact ? {} : { pFweLow: level.componentP.map((r) => r.low), pFweHigh: level.componentP.map((r) => r.high) }),
    }),
  ]);
  files.push([`${name}/threshold_robustness.tsv`, robustnessTable(prepared, observed, sweep, options.alpha)]);
  return files;
}

/** summary.json's `threshold_sweep` of a contrast: one entry per swept threshold. */
export function thresholdSweepSummary(sweep: SweepLevel[], alpha: number): Record<string, unknown>[] {
  return sweep.map((level) => ({
    threshold: level.threshold,
    supra_threshold_components: level.components.length,
    significant_components: level.componentP.filter((r) => r.p <= alpha).length,
    critical_size: finiteOrNull(level.criticalSize),
  }));
}

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
