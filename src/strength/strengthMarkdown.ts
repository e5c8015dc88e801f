import { formatFormula } from "../model/formula.js";
import { overridesSentence } from "../output/report/overridesText.js";
import { selectionText } from "../io/selectParticipants.js";
import { escapeMarkdown } from "../output/report/escapeMarkdown.js";
import { fixed, MISSING, pValue, significant } from "../output/report/printNumbers.js";
import type { ReportTable } from "../output/report/reportTable.js";
import { resultsMarkdown, type ResultsText } from "../output/report/resultsText.js";
import { latexTable } from "../output/report/tables/latexTable.js";
import { markdownTable } from "../output/report/tables/markdownTable.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import type { StrengthAnalysis, StrengthContrast } from "./strengthAnalysis.js";

/**
 * The print tables of results.md, tables.tex and tables.docx: a table per contrast — β (the
 * contrast's estimate c'β̂), SE, t, df, p and partial r per measure, with
 * p_FWE (and q_FDR for regions) — in the house style of printed numbers
 * (src/output/report/printNumbers.ts: p to three decimals, "< 0.001" below).
 */
const TAIL_TEXT = {
  upper: "one-sided, upper tail (P(T > t))",
  lower: "one-sided, lower tail (P(T < t))",
  both: "two-sided",
} as const;

const MEASURE_TITLE = { nodal: "Nodal strength", global: "Global strength", subnetwork: "Subnetwork strength" } as const;

/**
 * The order of a table's rows: regions by p, smallest first (a region without
 * a statistic last; ties in matrix order), so the regions that matter lead;
 * global and subnetwork measures as computed. nodes.tsv keeps matrix order.
 */
export function printOrder(analysis: StrengthAnalysis, result: StrengthContrast): number[] {
  const order = analysis.names.map((_, m) => m);
  if (analysis.choice.measure !== "nodal") return order;
  const key = (m: number) => (Number.isFinite(result.statistics.statistic[m]) && Number.isFinite(result.pUncorrected[m]) ? result.pUncorrected[m] : Infinity);
  return order.sort((a, b) => key(a) - key(b) || a - b);
}

function contrastTable(prepared: PreparedAnalysis, analysis: StrengthAnalysis, result: StrengthContrast): ReportTable {
  const { choice } = analysis;
  const nodal = choice.measure === "nodal";
  const { statistics, pUncorrected, qFdr, familywise } = result;
  const rows = printOrder(analysis, result).map((m) => {
    const name = analysis.names[m];
    const finite = Number.isFinite(statistics.statistic[m]);
    const cells = [
      name,
      ...(nodal ? [] : [String(analysis.edgeCounts[m])]),
      significant(statistics.estimate[m]),
      significant(statistics.standardError[m]),
      finite ? fixed(statistics.statistic[m], 2) : MISSING,
      String(statistics.df),
      finite ? pValue(pUncorrected[m]) : MISSING,
      finite && familywise ? pValue(familywise.pFwe[m]) : MISSING,
      ...(nodal ? [finite ? pValue(qFdr[m]) : MISSING] : []),
      finite ? fixed(statistics.partialR[m], 2) : MISSING,
    ];
    return { cells };
  });
  const headers = [
    nodal ? "Region" : "Measure",
    ...(nodal ? [] : ["Edges"]),
    "β",
    "SE",
    "t",
    "df",
    "p",
    "p_FWE",
    ...(nodal ? ["q_FDR"] : []),
    "partial r",
  ];
  const { inference } = prepared.design;
  const notes = [
    `Model: ${formatFormula(prepared.formula)}; N = ${prepared.kept.length}${prepared.excluded.length > 0 ? ` (${prepared.excluded.length} left out for missing values)` : ""}` +
      `${prepared.design.select.length > 0 ? `, analysed subset ${selectionText(prepared.design.select)}` : ""}. ` +
      `β is the contrast's estimate c'β̂ on the scale of the measure, SE its standard error, t = β/SE on df = N − rank(X) degrees of freedom; partial r = t/√(t² + df).`,
    `${MEASURE_TITLE[choice.measure]}: ${nodal ? analysis.descriptions[0] : analysis.names.map((n, m) => `${n}, ${analysis.descriptions[m]}`).join("; ")}` +
      `${prepared.design.transform === "fisher-z" ? ", on the Fisher z scale" : prepared.design.transform === "log1p" ? ", of log(1 + x)" : ""}` +
      `${prepared.design.scale === "total" ? ", each participant scaled to the total of its edges" : ""}` +
      `${prepared.edgeRules ? `, over the ${prepared.edgeRules.kept.length} of ${prepared.edgeRules.allPairs.edgeCount} edges the edge rules kept` : ""}.`,
    `p: ${TAIL_TEXT[inference.tail]}, from the t distribution.` +
      (familywise
        ? ` p_FWE: ${
            analysis.names.length === 1
              ? "permutation p-value (a single measure needs no correction)"
              : `family-wise error-corrected across the ${analysis.names.length} ${nodal ? "regions" : "measures"} by the maximum statistic (Westfall & Young 1993)`
          } from ${familywise.count} ${
            familywise.exact
              ? "relabelings (all of them: exact)"
              : `random relabelings (Monte Carlo, ${familywise.setup.scheme === "sign-flip" ? "sign flips" : "Freedman–Lane"}, seed ${inference.seed})`
          }.`
        : " No permutations were drawn (the design's method is fdr), so p_FWE is not given.") +
      (nodal ? ` q_FDR: ${inference.fdr === "by" ? "Benjamini–Yekutieli (2001)" : "Benjamini–Hochberg (1995)"} adjusted p across the regions.` : "") +
      (familywise && prepared.overrides ? ` ${overridesSentence(prepared.overrides)}` : ""),
    ...(nodal ? ["Regions are listed by p, smallest first (ties in matrix order); nodes.tsv lists them in matrix order at full precision."] : []),
  ];
  return {
    id: `strength-${result.contrast.name}`,
    title: `${MEASURE_TITLE[choice.measure]}, ${result.contrast.name} (${String(result.contrast.expression)})`,
    columns: headers.map((header, k) => ({ header, align: k === 0 ? "left" : "right" })),
    rows,
    notes,
  };
}

/** The print tables of `plexus strength`, one per contrast, numbered from 1: results.md and tables.docx show these. */
export function strengthPrintTables(prepared: PreparedAnalysis, analysis: StrengthAnalysis): { number: number; table: ReportTable }[] {
  return analysis.contrasts.map((result, k) => ({ number: k + 1, table: contrastTable(prepared, analysis, result) }));
}

/**
 * A terminal message as words for the results text: a code span's backticks
 * go (its content, a command or a name, reads as it is); the rest is escaped
 * as plain text by escapeMarkdown, like every user text here.
 */
function plainWords(text: string): string {
  return text.replace(/`([^`\n]+)`/g, "$1");
}

/**
 * results.md: the warnings, the draft results paragraphs (strengthResultsText.ts) and the print
 * tables, so the file holds the text and the numbers it quotes.
 */
export function strengthMarkdown(prepared: PreparedAnalysis, analysis: StrengthAnalysis, warnings: string[], results?: ResultsText): string {
  const parts = ["# Network strength", ""];
  for (const warning of warnings) parts.push(`> **Caution.** ${escapeMarkdown(plainWords(warning.charAt(0).toUpperCase() + warning.slice(1)))}`, "");
  if (results) parts.push(resultsMarkdown(results).trimEnd(), "", "## Tables", "");
  for (const { table, number } of strengthPrintTables(prepared, analysis)) parts.push(markdownTable(table, number).trimEnd(), "");
  return `${parts.join("\n").trimEnd()}\n`;
}

/** tables.tex: the print tables as booktabs floats, to \input into a manuscript. */
export function strengthLatex(tables: readonly { table: ReportTable }[], version: string, twins: string): string {
  return [
    `% Tables written by plexus ${version} (plexus strength); numbers rounded for print (${twins} at full precision).`,
    "% Needs \\usepackage{booktabs} and \\usepackage{graphicx} in the preamble; include with \\input{tables.tex}.",
    "",
    ...tables.map(({ table }) => latexTable(table)),
  ].join("\n");
}
