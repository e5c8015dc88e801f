import type { ContrastResults } from "../loadResults.js";
import { clipToWidth, linePitch, paragraph, TEXT_GAP } from "./labelLayout.js";
import { FONT_PT, printSvgDocument, widthPt, type PrintWidth } from "./printSize.js";
import { rect, text } from "./svgElements.js";
import { ASCENT_EM, DESCENT_EM, textWidth } from "./textWidth.js";

/**
 * Threshold robustness of a sweep: one row per edge that lies in a
 * significant component at one or more primary thresholds, one column per
 * threshold, a filled square where the edge is significant at that threshold.
 * Rows run from the most robust (significant at most thresholds, then the
 * largest |t|) down; at most `limit` rows are drawn and the rest counted.
 * At two columns' width the rows are set in two blocks side by side (read
 * down the left block, then the right), so the figure stays short.
 */
const PAD = 3;

export function robustnessFigure(contrast: ContrastResults, printWidth: PrintWidth, limit = 40): string | null {
  const table = contrast.robustness;
  if (!table || table.rows.length === 0) return null;
  const rows = [...table.rows].sort(
    (a, b) =>
      b.significant.filter(Boolean).length - a.significant.filter(Boolean).length ||
      Math.abs(b.statistic) - Math.abs(a.statistic) ||
      (a.regionA + a.regionB < b.regionA + b.regionB ? -1 : 1),
  );
  const W = widthPt(printWidth);
  const small = FONT_PT.small;
  const shown = rows.slice(0, limit);
  const blocks = printWidth === "double" && shown.length > 12 ? 2 : 1;
  const perBlock = Math.ceil(shown.length / blocks);
  const blockGap = 14;
  const blockWidth = (W - 2 * PAD - (blocks - 1) * blockGap) / blocks;

  // Columns: the edge's label, one square per threshold, the count of thresholds met.
  const cell = 7.5;
  const thresholdLabels = table.thresholds.map((t) => `${t}`);
  const columnPitch = Math.max(cell + 3, ...thresholdLabels.map((t) => textWidth(t, small) + 3));
  const countLabel = (k: number) => `${k}/${table.thresholds.length}`;
  const countWidth = textWidth(countLabel(table.thresholds.length), small) + 4;
  const gridWidth = table.thresholds.length * columnPitch;
  const edgeLabel = (row: (typeof rows)[number]) => `${row.regionA} – ${row.regionB}`;
  const labelWidth = Math.min(Math.max(...shown.map((row) => textWidth(edgeLabel(row), small)), textWidth("edge", small)), blockWidth - gridWidth - countWidth - 6);
  const rowPitch = Math.max(cell + 1.5, linePitch(small));

  const body: string[] = [];
  const title = paragraph(PAD, PAD + ASCENT_EM * FONT_PT.title, `Threshold robustness: ${contrast.summary.name}`, W - 2 * PAD, FONT_PT.title, { weight: "bold" });
  const subtitle = paragraph(
    PAD,
    title.lastBaseline + DESCENT_EM * FONT_PT.title + TEXT_GAP + ASCENT_EM * FONT_PT.label,
    "Edges in a significant component (p_FWE ≤ α) at each primary threshold (columns)",
    W - 2 * PAD,
    FONT_PT.label,
    { fill: "#555555" },
  );
  body.push(...title.elements, ...subtitle.elements);
  const headerBaseline = subtitle.lastBaseline + DESCENT_EM * FONT_PT.label + 5 + ASCENT_EM * small;
  const top = headerBaseline + DESCENT_EM * small + 3;
  // A text's box is centred on a row when its baseline is this far below the row's middle.
  const centreToBaseline = ((ASCENT_EM - DESCENT_EM) / 2) * small;

  for (let b = 0; b < blocks; b++) {
    const x0 = PAD + b * (blockWidth + blockGap);
    const gridX = x0 + labelWidth + 6;
    body.push(text(x0 + labelWidth, headerBaseline, "edge", { anchor: "end", size: small, fill: "#555555" }));
    thresholdLabels.forEach((label, j) => body.push(text(gridX + j * columnPitch + cell / 2, headerBaseline, label, { anchor: "middle", size: small })));
    shown.slice(b * perBlock, (b + 1) * perBlock).forEach((row, i) => {
      const y = top + i * rowPitch;
      const middle = y + cell / 2;
      body.push(text(x0 + labelWidth, middle + centreToBaseline, clipToWidth(edgeLabel(row), labelWidth, small), { anchor: "end", size: small }));
      row.significant.forEach((significant, j) => {
        const x = gridX + j * columnPitch;
        body.push(significant ? rect(x, y, cell, cell, "#1f2a44") : rect(x + 0.35, y + 0.35, cell - 0.7, cell - 0.7, "#ffffff", `stroke="#9aa0a6" stroke-width="0.7"`));
      });
      const met = row.significant.filter(Boolean).length;
      body.push(text(gridX + gridWidth + 2, middle + centreToBaseline, countLabel(met), { size: small, fill: "#555555" }));
    });
  }
  let bottom = top + perBlock * rowPitch;
  if (rows.length > shown.length) {
    const note = paragraph(PAD, bottom + 4 + ASCENT_EM * small, `${rows.length - shown.length} more edges in threshold_robustness.tsv`, W - 2 * PAD, small, { fill: "#555555" });
    body.push(...note.elements);
    bottom = note.lastBaseline + DESCENT_EM * small;
  }
  return printSvgDocument(printWidth, bottom + PAD + 1, `Threshold robustness: ${contrast.summary.name}`, body);
}
