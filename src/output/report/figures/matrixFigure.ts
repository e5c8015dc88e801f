import { Buffer } from "node:buffer";
import type { PrintWidth } from "./printSize.js";
import type { Region } from "../../../io/regions.js";
import type { ContrastResults } from "../loadResults.js";
import type { SignificantEdges } from "../significantEdges.js";
import { colourBar } from "./colourBar.js";
import { scaleColour, scalePosition, statisticLimit } from "./colourScale.js";
import { regionOrder } from "./regionOrder.js";
import { clip, line, n, rect, svgDocument, text } from "./svgElements.js";

/**
 * Figure: the edge-statistic matrix as a heatmap (both triangles), regions in
 * the drawing order of regionOrder (hemisphere, then system), the statistic on
 * the shared cividis scale (t from −max|t| to +max|t|; F from 0 to its maximum), and every edge of the significant finding outlined
 * (a black and a white frame, visible on any colour). Cells are quantised to
 * 41 colours and drawn as one path per colour, so the file stays small for a
 * few hundred regions.
 */
const LEVELS = 41;
const TARGET = 560;

/** `leftOut`: edges the design's edge rules left out (no statistic, white, but not for zero variance). */
export function matrixFigure(contrast: ContrastResults, regions: Region[], finding: SignificantEdges, leftOut: number, printWidth: PrintWidth): string {
  void printWidth; // drawn at one size until this figure is laid out for print
  const count = regions.length;
  const cell = Math.max(1.5, Math.min(14, TARGET / Math.max(count, 1)));
  const size = cell * count;
  const { order, position, blocks } = regionOrder(regions);
  const hasGroups = regions.some((r) => r.hemisphere !== undefined || r.system !== undefined);
  const left = hasGroups ? 112 : 40;
  const top = 70;
  const highlightNodes = new Set<number>();
  for (const e of finding.edges) {
    highlightNodes.add(contrast.edges.regionA[e]);
    highlightNodes.add(contrast.edges.regionB[e]);
  }
  const labelRight = cell >= 6 && highlightNodes.size > 0;
  const right = labelRight ? 150 : 30;
  const width = left + size + right;
  const height = top + size + 70;
  const { edges } = contrast;
  const limit = statisticLimit(edges.statistic);
  const signed = contrast.summary.statistic !== "F";
  const stat = signed ? "t" : "F";

  // One path per quantised colour; each cell is a unit square in matrix coordinates.
  const coordinate = Array.from(position, (p) => asciiBytes(String(p)));
  const paths = new Map<number, CellSquares>();
  let missing = 0;
  for (let e = 0; e < edges.statistic.length; e++) {
    const t = edges.statistic[e];
    if (!Number.isFinite(t)) {
      missing++;
      continue;
    }
    const level = Math.round(scalePosition(t, limit, signed) * (LEVELS - 1));
    const p = coordinate[edges.regionA[e]];
    const q = coordinate[edges.regionB[e]];
    let list = paths.get(level);
    if (list === undefined) paths.set(level, (list = new CellSquares()));
    list.add(q, p);
    list.add(p, q);
  }
  const body: string[] = [];
  body.push(text(left, 20, `Edge statistics (${stat}): ${contrast.summary.name}`, { size: 13, weight: "bold" }));
  body.push(
    text(
      left,
      37,
      finding.edges.length > 0
        ? `${finding.edges.length} edge${finding.edges.length > 1 ? "s" : ""} of the ${finding.kind === "components" ? "significant subnetworks" : "FDR-significant set"} outlined`
        : "no significant edges to outline",
      { size: 10, fill: "#444444" },
    ),
  );
  body.push(rect(left, top, size, size, "#ffffff", 'stroke="#999999" stroke-width="0.5"'));
  // data-cells: the grid of unit cells (row and column = drawing position), for report.html's script.
  body.push(`<g transform="translate(${n(left)} ${n(top)}) scale(${n(cell)})" shape-rendering="crispEdges" data-cells="${count}">`);
  for (const level of [...paths.keys()].sort((a, b) => a - b)) {
    const colour = scaleColour(level / (LEVELS - 1));
    body.push(`<path fill="${colour}" d="${paths.get(level)!.text()}"/>`);
  }
  body.push(`<path fill="#d9d9d9" d="${order.map((_, p) => `M${p} ${p}h1v1h-1z`).join("")}"/>`);
  body.push("</g>");

  // Block separators and labels.
  const hemisphereOf = (b: (typeof blocks)[number]) => b.hemisphere ?? "";
  blocks.forEach((block, k) => {
    if (k === 0) return;
    const at = top + block.start * cell;
    const atX = left + block.start * cell;
    const major = hemisphereOf(blocks[k - 1]) !== hemisphereOf(block);
    const stroke = major ? 1.6 : 0.7;
    body.push(line(left, at, left + size, at, "#ffffff", stroke), line(atX, top, atX, top + size, "#ffffff", stroke));
  });
  if (hasGroups) {
    for (const block of blocks) {
      const span = (block.end - block.start) * cell;
      const mid = top + ((block.start + block.end) / 2) * cell;
      body.push(line(left - 6, top + block.start * cell + 1, left - 6, top + block.end * cell - 1, "#555555", 1));
      if (span >= 9) {
        const label = [block.hemisphere, block.system].filter((v) => v !== undefined).join(" · ");
        body.push(text(left - 10, mid + 3.5, clip(label, 18), { anchor: "end", size: Math.min(10, span - 1) }));
      }
    }
    // Hemisphere names across the top.
    let start = 0;
    blocks.forEach((block, k) => {
      const next = blocks[k + 1];
      if (next && hemisphereOf(next) === hemisphereOf(block)) return;
      const from = blocks[start].start;
      const span = (block.end - from) * cell;
      if (block.hemisphere !== undefined && span >= 30) {
        body.push(text(left + ((from + block.end) / 2) * cell, top - 8, clip(block.hemisphere, Math.floor(span / 6)), { anchor: "middle", size: 10 }));
      }
      start = k + 1;
    });
  }

  // Outlines of the significant edges: a frame round each cell, never smaller than 6 px so that
  // it stays visible when cells are tiny (it then overlaps its neighbours a little).
  if (finding.edges.length > 0) {
    const side = Math.max(cell, 6);
    const inset = (cell - side) / 2;
    const frame = (column: number, row: number) =>
      `M${n(left + column * cell + inset)} ${n(top + row * cell + inset)}h${n(side)}v${n(side)}h${n(-side)}z`;
    const outline: string[] = [];
    for (const e of finding.edges) {
      const p = position[edges.regionA[e]];
      const q = position[edges.regionB[e]];
      outline.push(frame(q, p), frame(p, q));
    }
    const d = outline.join("");
    body.push(`<path d="${d}" fill="none" stroke="#000000" stroke-width="${n(Math.max(1.2, side * 0.28))}"/>`);
    body.push(`<path d="${d}" fill="none" stroke="#ffffff" stroke-width="${n(Math.max(0.6, side * 0.1))}"/>`);
  }

  // Labels of the regions in the finding, beside their rows.
  if (labelRight) {
    for (const region of [...highlightNodes].sort((a, b) => position[a] - position[b])) {
      const y = top + (position[region] + 0.5) * cell;
      body.push(line(left + size + 2, y, left + size + 8, y, "#555555", 0.8));
      body.push(text(left + size + 11, y + 3.2, clip(regions[region].label, 22), { size: Math.min(9, cell) }));
    }
  }

  const barWidth = Math.min(260, Math.max(160, size * 0.6));
  body.push(...colourBar(left + (size - barWidth) / 2, top + size + 30, barWidth, 10, limit, `${stat}-statistic`, signed));
  const zeroVariance = missing - leftOut;
  if (missing > 0) {
    const parts = [
      ...(leftOut > 0 ? [`${leftOut} edge${leftOut > 1 ? "s" : ""} left out by the edge rules`] : []),
      ...(zeroVariance > 0 ? [`${zeroVariance} edge${zeroVariance > 1 ? "s" : ""} with no statistic (zero variance)`] : []),
    ];
    body.push(text(left, top + size + 18, `white: ${parts.join("; ")}`, { size: 9, fill: "#444444" }));
  }
  return svgDocument(width, height, `Edge-statistic matrix for ${contrast.summary.name}`, body);
}

/**
 * The path data of many unit squares, `M{x} {y}h1v1h-1z` each, written as
 * ASCII bytes (a few hundred thousand cells for a few hundred regions, which
 * as separate strings cost more than the drawing itself).
 */
class CellSquares {
  private bytes = new Uint8Array(1024);
  private length = 0;

  /** The square at column `x`, row `y`, each given as the ASCII digits of its coordinate. */
  add(x: Uint8Array, y: Uint8Array): void {
    const needed = this.length + x.length + y.length + SQUARE_TAIL.length + 2;
    if (needed > this.bytes.length) {
      const grown = new Uint8Array(Math.max(2 * this.bytes.length, needed));
      grown.set(this.bytes.subarray(0, this.length));
      this.bytes = grown;
    }
    const out = this.bytes;
    let at = this.length;
    out[at++] = 0x4d; // M
    for (let i = 0; i < x.length; i++) out[at++] = x[i];
    out[at++] = 0x20; // space
    for (let i = 0; i < y.length; i++) out[at++] = y[i];
    for (let i = 0; i < SQUARE_TAIL.length; i++) out[at++] = SQUARE_TAIL[i];
    this.length = at;
  }

  text(): string {
    return Buffer.from(this.bytes.buffer, 0, this.length).toString("latin1");
  }
}

const SQUARE_TAIL = asciiBytes("h1v1h-1z");

/** The bytes of a text of ASCII characters (a number's digits, path commands). */
function asciiBytes(text: string): Uint8Array {
  return Uint8Array.from(text, (c) => c.charCodeAt(0));
}
