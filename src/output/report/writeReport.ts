import { formatTsv } from "../tsvWriter.js";
import type { CohortOptions } from "./cohortTable.js";
import type { KnownResults } from "../writeResults.js";
import { loadResults, type LoadedResults } from "./loadResults.js";
import { methodsMarkdown } from "./methodsText.js";
import { figureFileNames, reportContent, type ReportContent } from "./reportContent.js";
import { rasteriseInBackground } from "./figures/rasterise.js";
import { resultsMarkdown } from "./resultsText.js";
import { reportHtml } from "./reportHtml.js";
import { tablesLatex, tablesMarkdown } from "./tablesDocuments.js";
import { tablesDocx } from "./tablesDocx.js";

/**
 * The report files of a results folder, by path relative to it:
 *   tables.md, tables.tex        the print tables (Markdown; LaTeX booktabs)
 *   tables.docx                  the same as a Word document (bytes; see reportDocuments)
 *   tables/<name>.tsv            the same at full precision
 *   methods.md                   the methods paragraph and its references
 *   results.md                   a draft results paragraph per contrast
 *   figures/<contrast>-<kind>-180mm.svg, -85mm.svg and .png  each figure at two print widths
 *   report.html                  all of it in one self-contained page
 * Pure: built from the loaded results alone.
 */
export type ReportOptions = CohortOptions;

export function reportFiles(results: LoadedResults, options: ReportOptions = {}, content: ReportContent = reportContent(results, options)): Map<string, string> {
  const files = new Map<string, string>();
  files.set("tables.md", tablesMarkdown(content, results.summary));
  files.set("tables.tex", tablesLatex(content, results.summary));
  for (const table of content.tsv) files.set(`tables/${table.name}.tsv`, formatTsv(table.header, table.rows));
  files.set("methods.md", methodsMarkdown(content.methods));
  files.set("results.md", resultsMarkdown(content.results));
  for (const contrast of content.contrasts) {
    for (const figure of contrast.figures) for (const names of figureFileNames(figure)) files.set(names.svg, figure.svg[names.width]);
  }
  files.set("report.html", reportHtml(results, content));
  return files;
}

/**
 * The report's binary files (tables.docx, the figures' PNGs), whose writers are asynchronous; from the
 * same content as reportFiles. The figures start rendering on Node's thread pool at once, so the caller
 * can build the text files while they draw.
 */
export async function reportDocuments(results: LoadedResults, content: ReportContent): Promise<Map<string, Uint8Array>> {
  const names: string[] = ["tables.docx"];
  const pending: Promise<Uint8Array>[] = [tablesDocx(content.tables, results.summary.tool.version)];
  for (const contrast of content.contrasts) {
    for (const figure of contrast.figures) {
      for (const file of figureFileNames(figure)) {
        names.push(file.png);
        pending.push(rasteriseInBackground(figure.svg[file.width], file.width));
      }
    }
  }
  const bytes = await Promise.all(pending);
  return new Map(names.map((name, i) => [name, bytes[i]]));
}

/** Every report file: reportFiles' text and reportDocuments' bytes, from one ReportContent. */
export async function allReportFiles(results: LoadedResults, options: ReportOptions = {}): Promise<Map<string, string | Uint8Array>> {
  const content = reportContent(results, options);
  const documents = reportDocuments(results, content);
  // Handled here too, so that an error in the text files below does not leave it unhandled.
  documents.catch(() => undefined);
  const files = new Map<string, string | Uint8Array>(reportFiles(results, options, content));
  for (const [file, bytes] of await documents) files.set(file, bytes);
  return files;
}

/**
 * Reads the results folder at `resultsDir` and writes every report file through
 * `write`; `known` is what the writer of the folder still holds of it (see
 * loadResults), so that nothing is read back from disk.
 */
export async function writeReport(
  resultsDir: string,
  write: (relativePath: string, content: string | Uint8Array) => void,
  options: ReportOptions = {},
  known?: KnownResults,
): Promise<void> {
  // The caller awaits this before it commits the folder, so nothing is moved into place half-written.
  for (const [file, content] of await allReportFiles(loadResults(resultsDir, known), options)) write(file, content);
}
