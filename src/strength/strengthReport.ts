import { coverageRow } from "../output/report/coverageRow.js";
import type { CoverageSummary } from "../output/report/coverageMethods.js";
import { edgeRulesSummary } from "../output/edgeRulesSummary.js";
import { escapeHtml } from "../output/report/escapeHtml.js";
import { nodalFigure, type NodalValues } from "../output/report/figures/nodalFigure.js";
import type { PrintWidth } from "../output/report/figures/printSize.js";
import { rasterise } from "../output/report/figures/rasterise.js";
import { regionOrder } from "../output/report/figures/regionOrder.js";
import type { Region } from "../io/regions.js";
import { methodsHtml, methodsMarkdown, type MethodsText } from "../output/report/methodsText.js";
import { overridesRow } from "../output/report/overridesText.js";
import { plain } from "../output/report/printNumbers.js";
import { drawnFigure, figureFileNames, type ReportFigure } from "../output/report/reportContent.js";
import type { ReportData } from "../output/report/reportData.js";
import { figureHtml, inputsHtml, RESEARCH_NOTICE, reportPage } from "../output/report/reportPage.js";
import type { ReportTable } from "../output/report/reportTable.js";
import { resultsHtml, type ResultsText } from "../output/report/resultsText.js";
import { htmlTable } from "../output/report/tables/htmlTable.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import { residualDf } from "../model/designMatrix.js";
import { VERSION } from "../version.js";
import type { StrengthAnalysis } from "./strengthAnalysis.js";
import { strengthPrintTables } from "./strengthMarkdown.js";
import { strengthMethods, type StrengthSource } from "./strengthMethods.js";
import { criterion, significantMeasures, strengthResultsText } from "./strengthResultsText.js";
import { counted, measureNouns } from "./strengthWords.js";

/**
 * The report of `plexus strength`, as the run's report is made: methods.md,
 * the nodal figure of each contrast at both print widths (SVG and 300 dpi
 * PNG, when figures/nodalFigure.ts draws one) and report.html, one
 * self-contained page in the run report's style (its stylesheet, its
 * sortable-table script and Content-Security-Policy, the research-use notice)
 * with the summary, warnings, figures, sortable tables, the draft results and
 * the methods. Every text from the user's files is escaped; the script's data
 * are JSON escaped for a script element. Pure apart from the rasteriser.
 */
export interface StrengthReportInput {
  prepared: PreparedAnalysis;
  analysis: StrengthAnalysis;
  warnings: string[];
  source?: StrengthSource;
  /** summary.json's inputs: role, path relative to the design file, SHA-256. */
  inputs: { role: string; path: string; sha256: string }[];
  command: string[] | null;
}

export interface StrengthReportContent {
  tables: { number: number; table: ReportTable }[];
  methods: MethodsText;
  results: ResultsText;
  /** Figures per contrast, in contrast order. */
  figures: ReportFigure[][];
}

/** The nodal figure's drawing function (figures/nodalFigure.ts); a parameter so tests can stand in for it. */
export type NodalDrawing = (regions: Region[], values: NodalValues, title: string, width: PrintWidth) => string | null;

export function strengthReportContent(input: StrengthReportInput, drawNodal: NodalDrawing = nodalFigure): StrengthReportContent {
  const { prepared, analysis, source } = input;
  const { alpha } = prepared.design.inference;
  const figures = analysis.contrasts.map((result) => {
    if (analysis.choice.measure !== "nodal") return [];
    const name = result.contrast.name;
    const { label } = criterion(analysis, result);
    const chosen = new Set(significantMeasures(analysis, result, alpha));
    const values: NodalValues = {
      measure: "nodal strength",
      statisticName: "t",
      statistic: result.statistics.statistic,
      significant: analysis.names.map((_, m) => chosen.has(m)),
    };
    const figure = drawnFigure(
      `figures/${name}-nodal`,
      "nodal",
      `Nodal strength, contrast ${name}: the t-statistic of each region's strength on the regions' layout; regions with ${label} ≤ ${plain(alpha)} are marked and named.`,
      (width) => drawNodal(prepared.regions, values, `${name}: nodal strength`, width),
    );
    return figure ? [figure] : [];
  });
  return {
    tables: strengthPrintTables(prepared, analysis),
    methods: strengthMethods(prepared, analysis, source),
    results: strengthResultsText(prepared, analysis, source),
    figures,
  };
}

/** methods.md, every figure's SVG and PNG at both widths, and report.html, by path relative to the results folder. */
export function strengthReportFiles(input: StrengthReportInput, content: StrengthReportContent): Map<string, string | Uint8Array> {
  const files = new Map<string, string | Uint8Array>();
  files.set("methods.md", methodsMarkdown(content.methods));
  for (const figure of content.figures.flat()) {
    for (const names of figureFileNames(figure)) {
      files.set(names.svg, figure.svg[names.width]);
      files.set(names.png, rasterise(figure.svg[names.width], names.width));
    }
  }
  files.set("report.html", strengthReportHtml(input, content));
  return files;
}

const MEASURE_TITLE = { nodal: "nodal strength", global: "global strength", subnetwork: "subnetwork strength" } as const;

export function strengthReportHtml(input: StrengthReportInput, content: StrengthReportContent): string {
  const { prepared, analysis, warnings } = input;
  const { design, matrix } = prepared;
  const { inference } = design;
  const h = escapeHtml;
  const code = (text: string) => `<code>${h(text)}</code>`;
  const nouns = measureNouns(analysis);
  const M = analysis.names.length;
  const K = analysis.contrasts.length;
  const alpha = plain(inference.alpha);
  const fdrName = inference.fdr === "by" ? "Benjamini–Yekutieli" : "Benjamini–Hochberg";
  const measureTitle = MEASURE_TITLE[analysis.choice.measure];
  const regions = prepared.connectomes.regionCount;
  const edges = prepared.edgeRules?.allPairs.edgeCount ?? prepared.connectomes.edgeCount;
  const used = prepared.kept.length;
  const listedCount = prepared.participants.ids.length;
  const excluded = prepared.excluded;

  const coverage: CoverageSummary = {
    options: { transform: design.transform, scale: design.scale, inference: { method: inference.method } },
    edge_rules: prepared.edgeRules ? (edgeRulesSummary(prepared.edgeRules, prepared.regions) as CoverageSummary["edge_rules"]) : undefined,
  };
  const permuted = analysis.contrasts.map((c) => c.familywise).filter((f) => f !== undefined);
  const measureRow =
    analysis.choice.measure === "nodal"
      ? `${h(measureTitle)} of ${regions} regions: ${h(analysis.descriptions[0])}`
      : analysis.names.map((name, m) => `${code(name)}: ${h(analysis.descriptions[m])} (${analysis.edgeCounts[m]} edges)`).join("; ");
  const summaryRows: [string, string][] = [
    ["Model", code(design.model)],
    ["Design columns", matrix.columns.map((c) => code(c.name)).join(", ")],
    ["Participants", `${used} analysed of ${listedCount} listed${excluded.length ? ` (${excluded.length} excluded)` : ""}`],
    ...(design.select.length > 0
      ? ([["Subset (select)", `${design.select.map((s) => `${code(s.column)} = ${s.values.map(h).join(" or ")}`).join(" and ")}; ${prepared.notSelected.length} not selected`]] as [string, string][])
      : []),
    ["Measure", measureRow],
    ["Network", `${regions} regions, ${edges} edges${design.transform === "fisher-z" ? ", Fisher z-transformed" : ""}`],
    ...[coverageRow(coverage, h)].filter((row): row is [string, string] => row !== null),
    ["Residual df", String(residualDf(matrix))],
    [
      "Inference",
      permuted.length > 0
        ? `${M > 1 ? `family-wise error across the ${h(counted(M, nouns))} by the maximum statistic` : "permutation p-value of the single measure"}, α = ${alpha}${analysis.choice.measure === "nodal" ? `; FDR q-values by ${fdrName}` : ""}`
        : analysis.choice.measure === "nodal"
          ? `false discovery rate across the regions (${fdrName}), α = ${alpha}`
          : `uncorrected p from the t distribution, α = ${alpha}`,
    ],
  ];
  if (permuted.length > 0) {
    const f = permuted[0];
    summaryRows.push([
      "Relabelings",
      `${f.exact ? `all ${f.count} (exact)` : `${f.count} Monte Carlo, seed ${inference.seed}`}; ${f.setup.scheme === "sign-flip" ? "sign-flipping" : "Freedman–Lane permutation"}` +
        (prepared.blocks ? `; blocks ${code(prepared.blocks.column)} (${prepared.blocks.labels.length}, ${h(inference.blockPermutation)})` : ""),
    ]);
  }
  if (prepared.overrides) summaryRows.push(["Command-line overrides", `${h(overridesRow(prepared.overrides))}: the design file says otherwise`]);
  if (K > 1) summaryRows.push(["Across contrasts", `no correction: each of the ${K} contrasts tested at α = ${alpha} on its own`]);
  summaryRows.push(["Software", `plexus ${h(VERSION)}`]);

  const findings = analysis.contrasts.map((result, k) => {
    const { label } = criterion(analysis, result);
    const found = significantMeasures(analysis, result, inference.alpha).length;
    const fdr =
      analysis.choice.measure === "nodal" && result.familywise
        ? `; ${Array.from(result.qFdr).filter((q, m) => Number.isFinite(result.statistics.statistic[m]) && q <= inference.alpha).length} with q_FDR ≤ ${alpha}`
        : "";
    return `<li><a href="#contrast-${k + 1}">${h(result.contrast.name)}</a> (${code(String(result.contrast.expression))}): <strong>${found} of ${h(counted(M, nouns))}</strong> with ${label} ≤ ${alpha}${fdr}</li>`;
  });

  const warningItems = warnings.map((w) => `<li>${h(w)}</li>`);
  if (excluded.length > 0) {
    const table: ReportTable = {
      id: "excluded-list",
      title: "Excluded participants",
      columns: [
        { header: "participant_id", align: "left" },
        { header: "Line", align: "right" },
        { header: "Reason", align: "left" },
      ],
      rows: excluded.map((x) => ({ cells: [x.id, String(x.line), x.reason] })),
      notes: [],
    };
    warningItems.push(
      `<li>${excluded.length} of ${listedCount - prepared.notSelected.length} ${design.select.length > 0 ? "selected " : ""}participants ${excluded.length === 1 ? "was" : "were"} excluded from the analysis for missing values.` +
        `<details><summary>Show the excluded participants</summary>${htmlTable(table, 0)}</details></li>`,
    );
  }

  let figureNumber = 0;
  const sections = analysis.contrasts.map((result, k) => {
    const figures = content.figures[k].flatMap((figure) => figureHtml(k, figure, (figureNumber += 1)));
    const { table, number } = content.tables[k];
    const { label } = criterion(analysis, result);
    const none =
      significantMeasures(analysis, result, inference.alpha).length === 0 ? `<p class="none">No ${h(nouns.one)} reached ${label} ≤ ${alpha} for this contrast.</p>` : "";
    return [
      `<section id="contrast-${k + 1}" data-contrast="${k}">`,
      `<h2>Contrast ${h(result.contrast.name)}</h2>`,
      `<p>${code(String(result.contrast.expression))}, c = [${Array.from(result.contrast.vector, (v) => plain(v)).join(", ")}], df = ${result.statistics.df}.</p>`,
      none,
      ...figures,
      htmlTable(table, number),
      `</section>`,
    ];
  });

  // The script needs no per-edge data here: it sorts the tables; the region labels ride along as data.
  const data: ReportData = { regions: prepared.regions.map((r) => r.label), order: regionOrder(prepared.regions).order, a: [], b: [], contrasts: [] };

  return reportPage(`plexus strength report: ${design.model}`, data, [
    "<header>",
    "<h1>plexus strength results</h1>",
    `<p class="subtitle">${h(measureTitle.charAt(0).toUpperCase() + measureTitle.slice(1))} · model ${code(design.model)} · ${used} participants · ${regions} regions · plexus ${h(VERSION)}</p>`,
    "</header>",
    `<aside class="notice" role="note"><strong>Research use only.</strong> ${h(RESEARCH_NOTICE)}</aside>`,
    "<nav><h2>Contents</h2><ol>",
    '<li><a href="#summary">Summary</a></li>',
    '<li><a href="#warnings">Warnings</a></li>',
    ...analysis.contrasts.map((c, k) => `<li><a href="#contrast-${k + 1}">Contrast ${h(c.contrast.name)}</a></li>`),
    '<li><a href="#results-text">Results (draft)</a></li>',
    '<li><a href="#methods">Methods</a></li>',
    '<li><a href="#provenance">Provenance</a></li>',
    "</ol></nav>",
    "<main>",
    '<section id="summary">',
    "<h2>Summary</h2>",
    `<dl>${summaryRows.map(([key, value]) => `<dt>${h(key)}</dt><dd>${value}</dd>`).join("")}</dl>`,
    `<h3>Findings</h3><ul>${findings.join("\n")}</ul>`,
    "</section>",
    '<section id="warnings">',
    "<h2>Warnings</h2>",
    warningItems.length > 0 ? `<ul class="warnings">${warningItems.join("\n")}</ul>` : `<p>None: every listed participant was analysed and every ${h(nouns.one)} has a statistic.</p>`,
    "</section>",
    ...sections.flat(),
    '<section id="results-text">',
    "<h2>Results (draft)</h2>",
    '<p class="hint">The same text is in results.md, above its tables: a draft to check and edit.</p>',
    resultsHtml(content.results),
    "</section>",
    '<section id="methods">',
    "<h2>Methods</h2>",
    '<p class="hint">The same text is in methods.md, ready to paste and edit.</p>',
    methodsHtml(content.methods),
    "</section>",
    '<section id="provenance">',
    "<h2>Provenance</h2>",
    "<dl>",
    `<dt>Software</dt><dd>plexus ${h(VERSION)}</dd>`,
    `<dt>Command line</dt><dd>${input.command ? code(input.command.join(" ")) : "not recorded (run through the library)"}</dd>`,
    `<dt>Seed</dt><dd>${h(String(inference.seed))}${permuted.length > 0 ? "" : " (no relabelings drawn)"}</dd>`,
    "</dl>",
    ...inputsHtml(input.inputs),
    `<p class="hint">The tables are also in this folder as results.md, tables.tex and tables.docx (full precision in ${analysis.choice.measure === "nodal" ? "&lt;contrast&gt;/nodes.tsv" : "&lt;contrast&gt;/measures.tsv"}), each participant's values in strength_values.tsv${content.figures.some((f) => f.length > 0) ? ", the methods in methods.md and the figures in figures/ (SVG and PNG at 180 mm and 85 mm)" : " and the methods in methods.md"}.</p>`,
    "</section>",
    "</main>",
  ]);
}
