import { escapeMarkdown } from "../escapeMarkdown.js";
import type { ReportTable } from "../reportTable.js";

/** Indent of a level row (an em space, U+2003): plain text, where `&emsp;` would show as an entity once pasted. */
export const LEVEL_INDENT = "\u2003";

/** A table as a GitHub-flavoured Markdown (pipe) table under a bold title, notes as paragraphs below. */
export function markdownTable(table: ReportTable, number: number): string {
  const header = `| ${table.columns.map((c) => escapeMarkdown(c.header, "cell")).join(" | ")} |`;
  const rule = `| ${table.columns.map((c) => (c.align === "right" ? "---:" : ":---")).join(" | ")} |`;
  const rows = table.rows.map((row) => {
    const cells = row.cells.map((cell, k) => {
      const text = escapeMarkdown(cell, "cell");
      return k === 0 && row.indent ? `${LEVEL_INDENT}${text}` : text;
    });
    return `| ${cells.join(" | ")} |`;
  });
  const notes = table.notes.flatMap((note) => [escapeMarkdown(note), ""]);
  return [`**Table ${number}. ${escapeMarkdown(table.title, "cell")}**`, "", header, rule, ...rows, "", ...notes].join("\n");
}
