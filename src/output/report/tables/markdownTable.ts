import { escapeMarkdown } from "../escapeMarkdown.js";
import type { ReportTable } from "../reportTable.js";

/** A table as a GitHub-flavoured Markdown (pipe) table under a bold title, notes as paragraphs below. */
export function markdownTable(table: ReportTable, number: number): string {
  const header = `| ${table.columns.map((c) => escapeMarkdown(c.header)).join(" | ")} |`;
  const rule = `| ${table.columns.map((c) => (c.align === "right" ? "---:" : ":---")).join(" | ")} |`;
  const rows = table.rows.map((row) => {
    const cells = row.cells.map((cell, k) => {
      const text = escapeMarkdown(cell);
      return k === 0 && row.indent ? `&emsp;${text}` : text;
    });
    return `| ${cells.join(" | ")} |`;
  });
  const notes = table.notes.flatMap((note) => [escapeMarkdown(note), ""]);
  return [`**Table ${number}. ${escapeMarkdown(table.title)}**`, "", header, rule, ...rows, "", ...notes].join("\n");
}
