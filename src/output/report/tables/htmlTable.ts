import { escapeHtml } from "../escapeHtml.js";
import type { ReportTable } from "../reportTable.js";

/**
 * A table as HTML with its caption (when numbered) and notes; every cell escaped. Number 0: no caption.
 * `rowData`: data-* attributes of each body row (names and values escaped), for report.html's script.
 */
export function htmlTable(table: ReportTable, number: number, rowData?: (row: number) => Record<string, string> | undefined): string {
  const align = (k: number) => (table.columns[k]?.align === "right" ? ' class="num"' : "");
  const head = table.columns.map((c, k) => `<th${align(k)}>${escapeHtml(c.header)}</th>`).join("");
  const body = table.rows
    .map((row, r) => {
      const cells = row.cells.map((cell, k) => `<td${k === 0 && row.indent ? ' class="indent"' : align(k)}>${escapeHtml(cell)}</td>`).join("");
      const data = Object.entries(rowData?.(r) ?? {}).map(([name, value]) => ` data-${escapeHtml(name)}="${escapeHtml(value)}"`).join("");
      return `<tr${data}>${cells}</tr>`;
    })
    .join("\n");
  const notes = table.notes.map((note) => `<p class="note">${escapeHtml(note)}</p>`).join("\n");
  return [
    `<div class="table-wrap" id="${escapeHtml(`table-${table.id}`)}">`,
    `<table>`,
    ...(number > 0 ? [`<caption>Table ${number}. ${escapeHtml(table.title)}</caption>`] : []),
    `<thead><tr>${head}</tr></thead>`,
    `<tbody>\n${body}\n</tbody>`,
    `</table>`,
    notes,
    `</div>`,
  ].join("\n");
}
