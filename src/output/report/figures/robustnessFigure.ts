import type { ContrastResults } from "../loadResults.js";
import type { PrintWidth } from "./printSize.js";
import { clip, rect, svgDocument, text } from "./svgElements.js";

/**
 * Threshold robustness of a sweep: one row per edge that lies in a
 * significant component at one or more primary thresholds, one column per
 * threshold, a filled square where the edge is significant at that threshold.
 * Rows run from the most robust (significant at most thresholds, then the
 * largest |t|) down; at most `limit` rows are drawn and the rest counted.
 */
export function robustnessFigure(contrast: ContrastResults, printWidth: PrintWidth, limit = 40): string | null {
  void printWidth; // drawn at one size until this figure is laid out for print
  const table = contrast.robustness;
  if (!table || table.rows.length === 0) return null;
  const rows = [...table.rows].sort(
    (a, b) =>
      b.significant.filter(Boolean).length - a.significant.filter(Boolean).length ||
      Math.abs(b.statistic) - Math.abs(a.statistic) ||
      (a.regionA + a.regionB < b.regionA + b.regionB ? -1 : 1),
  );
  const shown = rows.slice(0, limit);
  const cell = 14;
  const labelWidth = 230;
  const top = 64;
  const left = 16;
  const width = left + labelWidth + table.thresholds.length * (cell + 10) + 120;
  const height = top + shown.length * (cell + 2) + 40;
  const body: string[] = [
    text(left, 20, `Threshold robustness: ${contrast.summary.name}`, { size: 13, weight: "bold" }),
    text(left, 36, "edges in a significant component (p_FWE ≤ α) at each primary threshold", { size: 10, fill: "#555555" }),
  ];
  table.thresholds.forEach((threshold, j) => {
    const x = left + labelWidth + j * (cell + 10);
    body.push(text(x + cell / 2, top - 8, `${threshold}`, { anchor: "middle", size: 10 }));
  });
  body.push(text(left + labelWidth - 8, top - 8, "edge  \\  threshold", { anchor: "end", size: 10, fill: "#555555" }));
  shown.forEach((row, i) => {
    const y = top + i * (cell + 2);
    body.push(text(left + labelWidth - 8, y + cell - 3, clip(`${row.regionA} – ${row.regionB}`, 40), { anchor: "end", size: 10 }));
    row.significant.forEach((significant, j) => {
      const x = left + labelWidth + j * (cell + 10);
      body.push(
        significant
          ? rect(x, y, cell, cell, "#1f2a44")
          : rect(x, y, cell, cell, "#ffffff", `stroke="#9aa0a6" stroke-width="1"`),
      );
    });
    const count = row.significant.filter(Boolean).length;
    body.push(text(left + labelWidth + table.thresholds.length * (cell + 10) + 4, y + cell - 3, `${count}/${table.thresholds.length}`, { size: 10, fill: "#555555" }));
  });
  if (rows.length > shown.length) {
    body.push(text(left, height - 14, `${rows.length - shown.length} more edges in threshold_robustness.tsv`, { size: 10, fill: "#555555" }));
  }
  return svgDocument(width, height, `Threshold robustness: ${contrast.summary.name}`, body);
}
