import { formatTsv, type Cell } from "../output/tsvWriter.js";
import type { StrengthAnalysis, StrengthContrast } from "./strengthAnalysis.js";

/**
 * The tab-separated tables of `plexus strength`, written with the results
 * folder's TSV writer (shortest round-trip numbers, empty cells for missing
 * values). A measure without a statistic (zero residual variance) has empty
 * statistic, p and q cells, as in edges.tsv.
 */
export const NODE_COLUMNS = ["region", "statistic", "estimate", "p_unc", "p_fwe", "q_fdr"] as const;
export const NODE_EXTRA_COLUMNS = ["partial_r", "standard_error"] as const;

/** <contrast>/nodes.tsv: one row per region, in matrix order. */
export function nodesTable(analysis: StrengthAnalysis, result: StrengthContrast): string {
  const { statistics, pUncorrected, qFdr, familywise } = result;
  const rows: Cell[][] = analysis.names.map((label, m) => {
    const finite = Number.isFinite(statistics.statistic[m]);
    return [
      label,
      finite ? statistics.statistic[m] : null,
      statistics.estimate[m],
      finite ? pUncorrected[m] : null,
      finite && familywise ? familywise.pFwe[m] : null,
      finite ? qFdr[m] : null,
      statistics.partialR[m],
      statistics.standardError[m],
    ];
  });
  return formatTsv([...NODE_COLUMNS, ...NODE_EXTRA_COLUMNS], rows);
}

export const MEASURE_COLUMNS = ["measure", "beta", "se", "t", "df", "p_unc", "partial_r"] as const;
export const MEASURE_EXTRA_COLUMNS = ["p_fwe", "edges", "description"] as const;

/** <contrast>/measures.tsv: one row per global or subnetwork measure. */
export function measuresTable(analysis: StrengthAnalysis, result: StrengthContrast): string {
  const { statistics, pUncorrected, familywise } = result;
  const rows: Cell[][] = analysis.names.map((name, m) => {
    const finite = Number.isFinite(statistics.statistic[m]);
    return [
      name,
      statistics.estimate[m],
      statistics.standardError[m],
      finite ? statistics.statistic[m] : null,
      statistics.df,
      finite ? pUncorrected[m] : null,
      statistics.partialR[m],
      finite && familywise ? familywise.pFwe[m] : null,
      analysis.edgeCounts[m],
      analysis.descriptions[m],
    ];
  });
  return formatTsv([...MEASURE_COLUMNS, ...MEASURE_EXTRA_COLUMNS], rows);
}

/** Column names made distinct from those before them (and each other) by a `_2`, `_3`, … suffix. */
export function distinctNames(taken: readonly string[], names: readonly string[]): string[] {
  const used = new Set(taken);
  return names.map((name) => {
    let candidate = name;
    for (let k = 2; used.has(candidate); k++) candidate = `${name}_${k}`;
    used.add(candidate);
    return candidate;
  });
}

/**
 * Per-subject values: participant_id, then `columns` (e.g. the model's
 * variables as read), then one column per measure, then `trailing` columns
 * (e.g. the rest of the participants table, under their own names: a measure
 * whose name one of them holds is the one renamed); one row per subject.
 */
export function valuesTable(
  ids: string[],
  columns: { name: string; cells: (string | null)[] }[],
  names: string[],
  values: Float64Array,
  trailing: { name: string; cells: (string | null)[] }[] = [],
): string {
  const S = ids.length;
  const header = ["participant_id", ...columns.map((c) => c.name)];
  const rows: Cell[][] = ids.map((id, s) => [
    id,
    ...columns.map((c) => c.cells[s] ?? "n/a"),
    ...names.map((_, m) => values[m * S + s]),
    ...trailing.map((c) => c.cells[s] ?? "n/a"),
  ]);
  const trailingNames = trailing.map((c) => c.name);
  return formatTsv([...header, ...distinctNames([...header, ...trailingNames], names), ...trailingNames], rows);
}
