import { acrossContrastsRow } from "./acrossContrastsText.js";
import { coverageRow } from "./coverageRow.js";
import { escapeHtml } from "./escapeHtml.js";
import { selectionText } from "./cohortTable.js";
import { repeatedReportRows } from "./repeatedMethods.js";
import { COLOUR_SCALE_NAME } from "./figures/colourScale.js";
import type { LoadedResults, ResultsSummary } from "./loadResults.js";
import { contrastRows } from "./loadResults.js";
import { methodsHtml } from "./methodsText.js";
import { resultsHtml } from "./resultsText.js";
import { plain } from "./printNumbers.js";
import type { ReportContent } from "./reportContent.js";
import { thresholdRule } from "../summaryParts.js";
import { htmlTable } from "./tables/htmlTable.js";
import { overridesRow } from "./overridesText.js";
import { selectedCount } from "./selectionMethods.js";
import { reportData } from "./reportData.js";
import { figureHtml, inputsHtml, RESEARCH_NOTICE, reportPage } from "./reportPage.js";

/**
 * report.html: one self-contained page (inline CSS, SVG and one inline script,
 * no external resource, and a Content-Security-Policy that lets only that
 * script run and forbids any request), to open offline or send to a
 * co-author. Every string that came from the user's files is escaped; the
 * script's data are JSON escaped for a script element (reportData.ts), and the
 * page shows everything without the script (reportScript.ts adds tooltips,
 * subnetwork highlighting and sortable tables).
 */
export { RESEARCH_NOTICE } from "./reportPage.js";

export function reportHtml(results: LoadedResults, content: ReportContent): string {
  const { summary } = results;
  const { inference } = summary.options;
  const h = escapeHtml;
  const code = (text: string) => `<code>${h(text)}</code>`;
  let figureNumber = 0;

  const permuted = summary.contrasts.filter((c) => c.mode === "exact" || c.mode === "monte-carlo");
  const summaryRows: [string, string][] = [
    ["Model", code(summary.design.model)],
    ["Design columns", summary.design.columns.map(code).join(", ")],
    summary.repeated
      ? [
          "Participants",
          `${summary.repeated.people} people (${summary.subjects.used} scans) analysed of ${summary.subjects.in_table} scans listed${summary.subjects.excluded.length ? ` (${summary.subjects.excluded.length} scan${summary.subjects.excluded.length === 1 ? "" : "s"} excluded)` : ""}`,
        ]
      : ["Participants", `${summary.subjects.used} analysed of ${summary.subjects.in_table} listed${summary.subjects.excluded.length ? ` (${summary.subjects.excluded.length} excluded)` : ""}`],
    ...(summary.subjects.selection ? ([["Subset (select)", `${h(selectionText(summary.subjects.selection))}; ${summary.subjects.not_selected ?? 0} not selected`]] as [string, string][]) : []),
    ...(summary.cohort_table ? ([["Table 1", cohortTableLine(summary.cohort_table, code)]] as [string, string][]) : []),
    ...repeatedReportRows(summary, code),
    ["Network", `${summary.regions} regions, ${summary.edges} edges${summary.options.transform === "fisher-z" ? ", Fisher z-transformed" : ""}`],
    ...[coverageRow(summary, h)].filter((row): row is [string, string] => row !== null),
    ["Residual df", String(summary.df)],
    [
      "Inference",
      inference.method === "fdr"
        ? `false discovery rate over edges (${inference.fdr === "by" ? "Benjamini–Yekutieli" : "Benjamini–Hochberg"}), α = ${plain(inference.alpha)}`
        : `connected subnetworks, threshold ${h(thresholdRule(inference.tail, inference.threshold))}, size measure ${h(inference.size)}, α = ${plain(inference.alpha)}` +
          (inference.method === "max-t" ? "; edge-level maximum statistic" : "") +
          `; FDR q-values by ${inference.fdr === "by" ? "Benjamini–Yekutieli" : "Benjamini–Hochberg"}`,
    ],
  ];
  if (permuted.length > 0) {
    const c = permuted[0];
    const schemeName = (scheme: string | undefined) => (scheme === "sign-flip" ? "sign-flipping" : "Freedman–Lane permutation");
    const schemes = new Set(permuted.map((p) => p.scheme));
    const schemeText =
      schemes.size > 1 ? permuted.map((p) => `${h(p.name)}: ${schemeName(p.scheme)}`).join(", ") : schemeName(c.scheme);
    summaryRows.push([
      "Relabelings",
      `${c.mode === "exact" ? `all ${c.permutations} (exact)` : `${c.permutations} Monte Carlo, seed ${c.seed}`}; ${schemeText}` +
        (c.exchangeability_blocks ? `; blocks ${code(c.exchangeability_blocks.column)} (${c.exchangeability_blocks.count}, ${h(c.exchangeability_blocks.permutation)})` : ""),
    ]);
  }
  if (inference.command_line_overrides) summaryRows.push(["Command-line overrides", `${h(overridesRow(inference.command_line_overrides))}: the design file says otherwise`]);
  const acrossRow = acrossContrastsRow(summary);
  if (acrossRow) summaryRows.push([acrossRow[0], h(acrossRow[1])]);
  summaryRows.push(["Software", `plexus ${h(summary.tool.version)}`]);

  const findings = summary.contrasts.map((c, k) => {
    const found = content.contrasts[k].finding;
    const parts =
      c.mode === "exact" || c.mode === "monte-carlo"
        ? `${c.supra_threshold_components} supra-threshold component${c.supra_threshold_components === 1 ? "" : "s"}, <strong>${found.components.length} significant</strong> (p_FWE ≤ ${plain(inference.alpha)}); ${c.significant_edges_fdr} edge${c.significant_edges_fdr === 1 ? "" : "s"} with q_FDR ≤ ${plain(inference.alpha)}`
        : `<strong>${c.significant_edges_fdr} edge${c.significant_edges_fdr === 1 ? "" : "s"}</strong> with q_FDR ≤ ${plain(inference.alpha)}`;
    return `<li><a href="#contrast-${k + 1}">${h(c.name)}</a> (${code(c.expression)}): ${parts}</li>`;
  });

  // Warnings: the run's own, excluded participants, edges without a statistic.
  const warnings: string[] = summary.warnings.map((w) => `<li>${h(w)}</li>`);
  if (summary.subjects.excluded.length > 0) {
    warnings.push(
      `<li>${summary.subjects.excluded.length} of ${selectedCount(summary.subjects)} ${summary.subjects.selection ? "selected " : ""}${summary.repeated ? "scans" : "participants"} ${summary.subjects.excluded.length === 1 ? "was" : "were"} excluded from the analysis.` +
        `<details><summary>Show the excluded ${summary.repeated ? "scans" : "participants"}</summary>${htmlTable({ ...content.excluded, id: "excluded-list" }, 0)}</details></li>`,
    );
  }
  for (const c of summary.contrasts) {
    if (c.edges_without_statistic > 0) {
      warnings.push(
        `<li>${h(c.name)}: ${c.edges_without_statistic} edge${c.edges_without_statistic > 1 ? "s have" : " has"} zero residual variance (for example, absent in every participant) and no statistic; ${c.edges_without_statistic > 1 ? "they are" : "it is"} left out of the inference.</li>`,
      );
    }
  }

  // Rows of the edge tables carry their edge's index, rows of the subnetworks table their contrast and component.
  const edgeRows = (table: { id: string }) => {
    const k = content.contrasts.findIndex((c) => table.id === `edges-${c.name}`);
    return k < 0 ? undefined : (row: number) => ({ edge: String(content.contrasts[k].finding.edges[row]) });
  };
  const tablesFor = (contrast?: string) =>
    content.tables.filter((t) => t.contrast === contrast).map(({ table, number }) => htmlTable(table, number, edgeRows(table)));
  const general = content.tables.filter((t) => t.contrast === undefined);
  const cohortTables = general.filter((t) => t.table.id === "cohort" || t.table.id === "excluded").map(({ table, number }) => htmlTable(table, number));
  const subnetworkRow = (table: { rows: { cells: string[] }[] }) => (row: number) => {
    const [name, subnetwork] = table.rows[row].cells;
    const k = summary.contrasts.findIndex((c) => c.name === name);
    const id = Number.parseInt(subnetwork, 10);
    return k >= 0 && Number.isInteger(id) ? { contrast: String(k), component: String(id) } : undefined;
  };
  const subnetworkTable = general.filter((t) => t.table.id === "subnetworks").map(({ table, number }) => htmlTable(table, number, subnetworkRow(table)));

  // Sections and figures are lists of lines, joined once with the whole page: a matrix figure
  // of a few hundred regions is megabytes of text, copied at every join.
  const contrastSections = content.contrasts.map((contrast, k) => {
    const c = summary.contrasts[k];
    const figures = contrast.figures.flatMap((figure) => figureHtml(k, figure, (figureNumber += 1)));
    const none =
      contrast.finding.edges.length === 0
        ? `<p class="none">No ${contrast.finding.kind === "components" ? "subnetwork reached" : "edge reached"} ${contrast.finding.kind === "components" ? "p_FWE" : "q_FDR"} ≤ ${plain(inference.alpha)} for this contrast.</p>`
        : "";
    return [
      `<section id="contrast-${k + 1}" data-contrast="${k}">`,
      `<h2>Contrast ${h(c.name)}</h2>`,
      c.statistic === "F"
        ? `<p>${code(c.expression)}, C = [${contrastRows(c).map((row) => row.map((v) => plain(v)).join(", ")).join("; ")}], df = ${plain(c.df1 ?? contrastRows(c).length)} and ${plain(c.df)}.</p>`
        : `<p>${code(c.expression)}, c = [${contrastRows(c)[0].map((v) => plain(v)).join(", ")}], df = ${plain(c.df)}.</p>`,
      none,
      ...figures,
      ...tablesFor(contrast.name),
      `</section>`,
    ];
  });

  const inputs = summary.inputs;
  const seeds = [...new Set(permuted.map((c) => c.seed))];

  return reportPage(`plexus report: ${summary.design.model}`, reportData(results, content), [
    "<header>",
    "<h1>plexus results</h1>",
    `<p class="subtitle">Model ${code(summary.design.model)} · ${summary.repeated ? `${summary.repeated.people} participants (${summary.subjects.used} scans)` : `${summary.subjects.used} participants`} · ${summary.regions} regions · plexus ${h(summary.tool.version)}</p>`,
    "</header>",
    `<aside class="notice" role="note"><strong>Research use only.</strong> ${h(RESEARCH_NOTICE)}</aside>`,
    "<nav><h2>Contents</h2><ol>",
    '<li><a href="#summary">Run summary</a></li>',
    '<li><a href="#warnings">Warnings</a></li>',
    '<li><a href="#cohort">Cohort</a></li>',
    ...(subnetworkTable.length > 0 ? ['<li><a href="#subnetworks">Significant subnetworks</a></li>'] : []),
    ...summary.contrasts.map((c, k) => `<li><a href="#contrast-${k + 1}">Contrast ${h(c.name)}</a></li>`),
    '<li><a href="#results-text">Results (draft)</a></li>',
    '<li><a href="#methods">Methods</a></li>',
    '<li><a href="#provenance">Provenance</a></li>',
    "</ol></nav>",
    "<main>",
    '<section id="summary">',
    "<h2>Run summary</h2>",
    `<dl>${summaryRows.map(([k, v]) => `<dt>${h(k)}</dt><dd>${v}</dd>`).join("")}</dl>`,
    `<h3>Findings</h3><ul>${findings.join("\n")}</ul>`,
    "</section>",
    '<section id="warnings">',
    "<h2>Warnings</h2>",
    warnings.length > 0 ? `<ul class="warnings">${warnings.join("\n")}</ul>` : "<p>None: every listed participant was analysed and every edge has a statistic.</p>",
    "</section>",
    '<section id="cohort">',
    "<h2>Cohort</h2>",
    ...cohortTables,
    "</section>",
    ...(subnetworkTable.length > 0 ? ['<section id="subnetworks">', "<h2>Significant subnetworks</h2>", ...subnetworkTable, "</section>"] : []),
    ...contrastSections.flat(),
    '<section id="results-text">',
    "<h2>Results (draft)</h2>",
    '<p class="hint">The same text is in results.md, a draft to check and edit.</p>',
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
    `<dt>Software</dt><dd>${h(summary.tool.name)} ${h(summary.tool.version)}</dd>`,
    `<dt>Command line</dt><dd>${summary.command ? code(summary.command.join(" ")) : "not recorded (run through the library)"}</dd>`,
    `<dt>Seed</dt><dd>${seeds.length > 0 ? seeds.map((s) => h(String(s))).join(", ") : `${h(String(inference.seed))} (no relabelings drawn)`}</dd>`,
    ...(summary.matrices_read ? [`<dt>Matrices read</dt><dd>${h(matricesRead(summary.matrices_read))}</dd>`] : []),
    "</dl>",
    ...inputsHtml(inputs),
    `<p class="hint">Figures use the ${h(COLOUR_SCALE_NAME)} colour scale, whose lightness rises steadily from dark blue to yellow, so they read in grayscale and for colour-blind readers. The tables, figures and methods are also in this folder as tables.md, tables.tex, tables/*.tsv, figures/*.svg, methods.md and results.md; <code>plexus report</code> rewrites them from the results without recomputing.</p>`,
    "</section>",
    "</main>",
  ]);
}

/** How the matrices were read, e.g. "MATLAB 5 .mat, variable conn, 90 × 90 × 85, participants on the last axis; region labels from the regions table". */
function matricesRead(read: NonNullable<ResultsSummary["matrices_read"]>): string {
  const parts = [
    read.reader,
    ...(read.variable !== null ? [`variable ${read.variable}`] : []),
    read.shape.join(" × "),
    ...(read.subjects_axis !== null ? [`participants on the ${read.subjects_axis} axis`] : []),
  ];
  return `${parts.join(", ")}; region labels: ${read.labels}${read.reordered ? " (rows and columns reordered to the regions table's order)" : ""}`;
}

/** The report's Table 1 row: its grouping and where it came from. */
function cohortTableLine(table: NonNullable<ResultsSummary["cohort_table"]>, code: (text: string) => string): string {
  if (table.by === null) return table.by_from === "design" ? "all analysed participants in one column (cohort_table.by: ~)" : "all analysed participants in one column (no contrast compares a factor)";
  return `by ${code(table.by)} (${table.by_from === "design" ? "cohort_table.by" : "the factor compared by the first contrast between its levels"})`;
}
