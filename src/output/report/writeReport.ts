import { formatTsv } from "../tsvWriter.js";
import type { CohortOptions } from "./cohortTable.js";
import type { KnownResults } from "../writeResults.js";
import { loadResults, type LoadedResults } from "./loadResults.js";
import { methodsMarkdown } from "./methodsText.js";
import { reportContent } from "./reportContent.js";
import { resultsMarkdown } from "./resultsText.js";
import { reportHtml } from "./reportHtml.js";
import { tablesLatex, tablesMarkdown } from "./tablesDocuments.js";

/**
 * The report files of a results folder, by path relative to it:
 *   tables.md, tables.tex        the print tables (Markdown; LaTeX booktabs)
 *   tables/<name>.tsv            the same at full precision
 *   methods.md                   the methods paragraph and its references
 *   results.md                   a draft results paragraph per contrast
 *   figures/<contrast>-null.svg, -matrix.svg, -network.svg
 *   report.html                  all of it in one self-contained page
 * Pure: built from the loaded results alone.
 */
export type ReportOptions = CohortOptions;

export function reportFiles(results: LoadedResults, options: ReportOptions = {}): Map<string, string> {
  const content = reportContent(results, options);
  const files = new Map<string, string>();
  files.set("tables.md", tablesMarkdown(content, results.summary));
  files.set("tables.tex", tablesLatex(content, results.summary));
  for (const table of content.tsv) files.set(`tables/${table.name}.tsv`, formatTsv(table.header, table.rows));
  files.set("methods.md", methodsMarkdown(content.methods));
  files.set("results.md", resultsMarkdown(content.results));
  for (const contrast of content.contrasts) for (const figure of contrast.figures) files.set(figure.file, figure.svg);
  files.set("report.html", reportHtml(results, content));
  return files;
}

/**
 * Reads the results folder at `resultsDir` and writes every report file through
 * `write`; `known` is what the writer of the folder still holds of it (see
 * loadResults), so that nothing is read back from disk.
 */
export function writeReport(
  resultsDir: string,
  write: (relativePath: string, content: string) => void,
  options: ReportOptions = {},
  known?: KnownResults,
): void {
  for (const [file, text] of reportFiles(loadResults(resultsDir, known), options)) write(file, text);
}
