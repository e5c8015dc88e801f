import { acrossContrastsTableNote } from "./acrossContrastsText.js";
import { coverageTableNote } from "./coverageRow.js";
import { thresholdRule } from "../summaryParts.js";
import type { Cell } from "../tsvWriter.js";
import { contrastDirection } from "./contrastDirection.js";
import { hubRegions } from "./hubRegions.js";
import type { ContrastResults, LoadedResults } from "./loadResults.js";
import { fixed, MISSING, plain, pValue, significant } from "./printNumbers.js";
import type { ReportTable, TableColumn, TsvTable } from "./reportTable.js";
import { significantEdges, type SignificantEdges } from "./significantEdges.js";
import { EFFECT_SIZE_TSV_COLUMNS, effectSizeCells, effectSizePrint } from "./effectSizeCells.js";

/** Print tables show at most this many edges per contrast and hubs per component; the TSVs hold all. */
export const PRINT_EDGE_LIMIT = 50;
export const PRINT_HUB_LIMIT = 10;

export interface SubnetworkTables {
  /** One table over all contrasts with permutations; null when no contrast has them. */
  subnetworks: ReportTable | null;
  /** Per contrast (same order as the summary): its edge and hub tables, or null when nothing is significant. */
  perContrast: { name: string; finding: SignificantEdges; edges: ReportTable | null; hubs: ReportTable | null }[];
  tsv: TsvTable[];
}


/** p_FWE for print: with its 95% Clopper–Pearson interval (Monte Carlo) or marked exact. */
export function familywiseText(p: number, low: number, high: number, exact: boolean): string {
  if (!Number.isFinite(p)) return MISSING;
  if (exact) return `${pValue(p)} (exact)`;
  if (!Number.isFinite(low) || !Number.isFinite(high)) return pValue(p);
  return `${pValue(p)} [${significant(low, 2)}, ${significant(high, 2)}]`;
}

export function subnetworkTables(results: LoadedResults): SubnetworkTables {
  const { inference } = results.summary.options;
  const alpha = inference.alpha;
  const rule = thresholdRule(inference.tail, inference.threshold);
  const regions = results.regions;
  const hasSystem = regions.some((r) => r.system !== undefined);
  const hasHemisphere = regions.some((r) => r.hemisphere !== undefined);

  const subnetworkRows: ReportTable["rows"] = [];
  const subnetworkNotes: string[] = [];
  const subnetworkTsv: Cell[][] = [];
  const edgeTsv: Cell[][] = [];
  const hubTsv: Cell[][] = [];
  const perContrast: SubnetworkTables["perContrast"] = [];
  const permuted = results.contrasts.filter((c) => c.summary.mode === "exact" || c.summary.mode === "monte-carlo");

  for (const contrast of results.contrasts) {
    const { summary } = contrast;
    const finding = significantEdges(contrast, alpha);
    const exact = summary.mode === "exact";
    const direction = contrastDirection(results.summary, summary);
    const directionLabel = (sign: number): string | null => (direction ? (sign > 0 ? direction.label.positive : direction.label.negative) : null);
    if (finding.kind === "components") {
      const permutations = summary.permutations === undefined ? MISSING : exact ? `${summary.permutations} (all)` : String(summary.permutations);
      if (finding.components.length === 0) {
        subnetworkRows.push({ cells: [summary.name, "none", rule, inference.size, MISSING, MISSING, MISSING, MISSING, permutations] });
        const largest = contrast.components[0];
        subnetworkNotes.push(
          largest
            ? `${summary.name}: ${contrast.components.length} supra-threshold component${contrast.components.length > 1 ? "s" : ""}, none with p_FWE ≤ ${plain(alpha)}; the largest had extent ${largest.extent}, mass ${significant(largest.mass)}, p_FWE = ${familywiseText(largest.pFwe, largest.pFweLow, largest.pFweHigh, exact)}.`
            : `${summary.name}: no edge passed the threshold (${rule}).`,
        );
      }
      for (const c of finding.components) {
        subnetworkRows.push({
          cells: [
            summary.name,
            directionLabel(c.sign) === null ? String(c.id) : `${c.id} (${directionLabel(c.sign)})`,
            rule,
            inference.size,
            String(c.extent),
            String(c.nodes),
            significant(c.mass),
            familywiseText(c.pFwe, c.pFweLow, c.pFweHigh, exact),
            permutations,
          ],
        });
      }
      for (const c of finding.components) {
        subnetworkTsv.push([
          summary.name,
          c.id,
          c.sign > 0 ? "positive" : "negative",
          directionLabel(c.sign),
          inference.threshold,
          inference.tail,
          inference.size,
          c.extent,
          c.nodes,
          c.mass,
          c.pFwe,
          exact ? null : c.pFweLow,
          exact ? null : c.pFweHigh,
          summary.mode ?? null,
          summary.permutations ?? null,
          alpha,
        ]);
      }
    }
    perContrast.push({ name: summary.name, finding, ...contrastTables(results, contrast, finding, { hasSystem, hasHemisphere, alpha }) });
    const { edges } = contrast;
    for (const e of finding.edges) {
      const a = regions[edges.regionA[e]];
      const b = regions[edges.regionB[e]];
      edgeTsv.push([
        summary.name,
        finding.kind,
        finding.kind === "components" ? edges.component[e] : null,
        a.label,
        b.label,
        a.hemisphere ?? null,
        a.system ?? null,
        b.hemisphere ?? null,
        b.system ?? null,
        summary.statistic ?? "t",
        edges.statistic[e],
        edges.estimate[e],
        edges.standardError[e],
        edges.partialR[e],
        edges.partialEtaSquared[e],
        edges.pUncorrected[e],
        edges.qFdr[e],
        edges.pFwe ? edges.pFwe[e] : null,
        ...effectSizeCells(edges.effects, e),
      ]);
    }
    for (const hub of hubRegions(edges, finding.edges, finding.kind === "components")) {
      const region = regions[hub.region];
      hubTsv.push([
        summary.name,
        finding.kind === "components" ? hub.component : null,
        region.label,
        region.hemisphere ?? null,
        region.system ?? null,
        hub.degree,
        hub.strength,
      ]);
    }
  }

  if (permuted.length < results.contrasts.length && permuted.length > 0) {
    subnetworkNotes.push("Contrasts without permutations have no subnetwork test; their edges are selected by q_FDR.");
  }
  subnetworkNotes.push(
    "Subnetwork: its number in components.tsv and, in parentheses, the direction of its edges' effect in the contrast's terms (components.tsv's sign column). " +
      "Threshold: the primary (edge) threshold on the t-statistic. Extent: edges in the subnetwork; nodes: regions it touches; mass: the sum of (|t| − threshold) over its edges. " +
      "p_FWE: family-wise error-corrected p-value of the subnetwork's size (" +
      `${inference.size}) against the permutation distribution of the largest size, with its 95% Clopper–Pearson interval for Monte Carlo permutations, or exact when every distinct relabeling was enumerated.`,
  );
  const acrossNote = acrossContrastsTableNote(results.summary);
  if (acrossNote && permuted.length > 0) subnetworkNotes.push(acrossNote);
  const coverageNote = coverageTableNote(results.summary);
  if (coverageNote) subnetworkNotes.push(coverageNote);
  const subnetworks: ReportTable | null =
    permuted.length === 0
      ? null
      : {
          id: "subnetworks",
          title: `Significant subnetworks (p_FWE ≤ ${plain(alpha)})`,
          columns: [
            { header: "Contrast", align: "left" },
            { header: "Subnetwork", align: "left" },
            { header: "Threshold", align: "left" },
            { header: "Size measure", align: "left" },
            { header: "Extent", align: "right" },
            { header: "Nodes", align: "right" },
            { header: "Mass", align: "right" },
            { header: "p_FWE", align: "right" },
            { header: "Permutations", align: "right" },
          ],
          rows: subnetworkRows,
          notes: subnetworkNotes,
        };

  return {
    subnetworks,
    perContrast,
    tsv: [
      {
        name: "subnetworks",
        header: ["contrast", "component", "sign", "direction", "threshold", "tail", "size_measure", "extent", "nodes", "mass", "p_fwe", "p_fwe_low", "p_fwe_high", "mode", "permutations", "alpha"],
        rows: subnetworkTsv,
      },
      {
        name: "subnetwork_edges",
        header: ["contrast", "selection", "component", "region_a", "region_b", "hemisphere_a", "system_a", "hemisphere_b", "system_b", "statistic_kind", "statistic", "estimate", "standard_error", "partial_r", "partial_eta_squared", "p_unc", "q_fdr", "p_fwe", ...EFFECT_SIZE_TSV_COLUMNS],
        rows: edgeTsv,
      },
      { name: "hubs", header: ["contrast", "component", "region", "hemisphere", "system", "degree", "strength"], rows: hubTsv },
    ],
  };
}

function contrastTables(
  results: LoadedResults,
  contrast: ContrastResults,
  finding: SignificantEdges,
  shape: { hasSystem: boolean; hasHemisphere: boolean; alpha: number },
): { edges: ReportTable | null; hubs: ReportTable | null } {
  if (finding.edges.length === 0) return { edges: null, hubs: null };
  const { edges } = contrast;
  const { regions } = results;
  const name = contrast.summary.name;
  const byComponent = finding.kind === "components";
  const edgePFwe = edges.pFwe !== undefined;
  const isF = contrast.summary.statistic === "F";
  const effects = effectSizePrint(edges.effects, finding.edges);

  const columns: TableColumn[] = [];
  if (byComponent) columns.push({ header: "Subnetwork", align: "right" });
  columns.push({ header: "Region A", align: "left" });
  if (shape.hasSystem) columns.push({ header: "System A", align: "left" });
  columns.push({ header: "Region B", align: "left" });
  if (shape.hasSystem) columns.push({ header: "System B", align: "left" });
  if (isF) columns.push({ header: "F", align: "right" }, { header: "Partial η²", align: "right" }, { header: "p (unc.)", align: "right" });
  else
    columns.push(
      { header: "t", align: "right" },
      { header: effects.estimateHeader, align: "right" },
      ...effects.columns,
      { header: "Partial r", align: "right" },
      { header: "p (unc.)", align: "right" },
    );
  if (!byComponent) columns.push({ header: "q_FDR", align: "right" });
  if (edgePFwe) columns.push({ header: "p_FWE (edge)", align: "right" });

  const shown = finding.edges.slice(0, PRINT_EDGE_LIMIT);
  const rows = shown.map((e) => {
    const a = regions[edges.regionA[e]];
    const b = regions[edges.regionB[e]];
    const cells: string[] = [];
    if (byComponent) cells.push(String(edges.component[e]));
    cells.push(a.label);
    if (shape.hasSystem) cells.push(a.system ?? MISSING);
    cells.push(b.label);
    if (shape.hasSystem) cells.push(b.system ?? MISSING);
    if (isF) cells.push(fixed(edges.statistic[e], 2), fixed(edges.partialEtaSquared[e], 2), pValue(edges.pUncorrected[e]));
    else cells.push(fixed(edges.statistic[e], 2), effects.estimate(e, edges.estimate[e]), ...effects.cells(e), fixed(edges.partialR[e], 2), pValue(edges.pUncorrected[e]));
    if (!byComponent) cells.push(pValue(edges.qFdr[e]));
    if (edgePFwe) cells.push(pValue(edges.pFwe![e]));
    return { cells };
  });
  const edgeNotes = [
    isF
      ? "F: the contrast's F-statistic; partial η²: the share of the variance left by the other terms that the contrast explains; p (unc.): uncorrected p-value of the edge."
      : `t: the contrast's t-statistic; estimate: the contrast of the fitted coefficients on the analysed scale${effects.note}; partial r = t/√(t² + df); p (unc.): uncorrected p-value of the edge.`,
  ];
  if (finding.edges.length > shown.length) {
    edgeNotes.unshift(`Showing the first ${shown.length} of ${finding.edges.length} edges (strongest first); tables/subnetwork_edges.tsv lists all.`);
  }
  const edgesTable: ReportTable = {
    id: `edges-${name}`,
    title: byComponent ? `Edges of the significant subnetworks: ${name}` : `Edges with q_FDR ≤ ${plain(shape.alpha)}: ${name}`,
    columns,
    rows,
    notes: edgeNotes,
  };

  const hubs = hubRegions(edges, finding.edges, byComponent);
  const perComponent = new Map<number, number>();
  const hubRows = hubs
    .filter((hub) => {
      const seen = perComponent.get(hub.component) ?? 0;
      perComponent.set(hub.component, seen + 1);
      return seen < PRINT_HUB_LIMIT;
    })
    .map((hub) => {
      const region = regions[hub.region];
      const cells: string[] = [];
      if (byComponent) cells.push(String(hub.component));
      cells.push(region.label);
      if (shape.hasHemisphere) cells.push(region.hemisphere ?? MISSING);
      if (shape.hasSystem) cells.push(region.system ?? MISSING);
      cells.push(String(hub.degree), fixed(hub.strength, 2));
      return { cells };
    });
  const hubColumns: TableColumn[] = [];
  if (byComponent) hubColumns.push({ header: "Subnetwork", align: "right" });
  hubColumns.push({ header: "Region", align: "left" });
  if (shape.hasHemisphere) hubColumns.push({ header: "Hemisphere", align: "left" });
  if (shape.hasSystem) hubColumns.push({ header: "System", align: "left" });
  const stat = isF ? "F" : "t";
  hubColumns.push({ header: "Degree", align: "right" }, { header: `Σ|${stat}|`, align: "right" });
  const hubNotes = [`Degree: the number of the listed edges that touch the region; Σ|${stat}|: the sum of their |${stat}| (ties in degree are ordered by it).`];
  if (hubRows.length < hubs.length) hubNotes.unshift(`Showing at most ${PRINT_HUB_LIMIT} regions per subnetwork; tables/hubs.tsv lists all.`);
  return {
    edges: edgesTable,
    hubs: {
      id: `hubs-${name}`,
      title: byComponent ? `Hub regions of the significant subnetworks: ${name}` : `Hub regions of the edges with q_FDR ≤ ${plain(shape.alpha)}: ${name}`,
      columns: hubColumns,
      rows: hubRows,
      notes: hubNotes,
    },
  };
}
