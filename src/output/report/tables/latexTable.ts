import { escapeLatex } from "../escapeLatex.js";
import type { ReportTable } from "../reportTable.js";

/**
 * A table in the booktabs style (\toprule, \midrule, \bottomrule; no vertical
 * rules), as a `table` float with its caption and notes; needs
 * \usepackage{booktabs} and \usepackage{graphicx}. A table wider than the
 * text is scaled down to the text width (never up). The label is
 * `tab:plexus-<id>`.
 */
export function latexTable(table: ReportTable): string {
  const spec = table.columns.map((c) => (c.align === "right" ? "r" : "l")).join("");
  const line = (cells: string[]) => `${cells.join(" & ")} \\\\`;
  const body = table.rows.map((row) =>
    line(row.cells.map((cell, k) => (k === 0 && row.indent ? `\\quad ${escapeLatex(cell)}` : escapeLatex(cell)))),
  );
  const notes = table.notes.map((note) => `\\par\\footnotesize ${escapeLatex(note)}`);
  return [
    "\\begin{table}[htbp]",
    "\\centering",
    "\\small",
    `\\caption{${escapeLatex(table.title)}}`,
    `\\label{tab:plexus-${table.id.replace(/[^A-Za-z0-9_-]/g, "-")}}`,
    "\\resizebox{\\ifdim\\width>\\linewidth\\linewidth\\else\\width\\fi}{!}{%",
    `\\begin{tabular}{${spec}}`,
    "\\toprule",
    line(table.columns.map((c) => escapeLatex(c.header))),
    "\\midrule",
    ...body,
    "\\bottomrule",
    "\\end{tabular}}",
    ...(notes.length > 0 ? ["\\begin{minipage}{\\linewidth}", ...notes, "\\end{minipage}"] : []),
    "\\end{table}",
    "",
  ].join("\n");
}
