import type { ReportContent } from "./reportContent.js";
import type { ResultsSummary } from "./loadResults.js";
import { latexTable } from "./tables/latexTable.js";
import { markdownTable } from "./tables/markdownTable.js";

/** tables.md: every print table in order, under a short header saying where the full-precision values are. */
export function tablesMarkdown(content: ReportContent, summary: ResultsSummary): string {
  return [
    "# Tables",
    "",
    `Written by plexus ${summary.tool.version} from this results folder. Numbers are rounded for print; tables/*.tsv hold the same tables at full precision.`,
    "",
    ...content.tables.map(({ table, number }) => markdownTable(table, number)),
  ].join("\n");
}

/** tables.tex: the same tables as booktabs floats, to \input into a manuscript. */
export function tablesLatex(content: ReportContent, summary: ResultsSummary): string {
  return [
    `% Tables written by plexus ${summary.tool.version}; numbers rounded for print (tables/*.tsv hold full precision).`,
    "% Needs \\usepackage{booktabs} and \\usepackage{graphicx} in the preamble; include with \\input{tables.tex}.",
    "",
    ...content.tables.map(({ table }) => latexTable(table)),
  ].join("\n");
}
