import { Buffer } from "node:buffer";
import type { Region } from "../../../io/regions.js";
import type { ContrastResults } from "../loadResults.js";
import type { SignificantEdges } from "../significantEdges.js";
import { colourBar } from "./colourBar.js";
import { scaleColour, scalePosition, statisticLimit } from "./colourScale.js";
import { clipToWidth, linePitch, paragraph, spreadLabels, TEXT_GAP } from "./labelLayout.js";
import { FONT_PT, printSvgDocument, widthPt, type PrintWidth } from "./printSize.js";
import { regionOrder, type RegionBlock } from "./regionOrder.js";
import { line, n, niceTicks, rect, text } from "./svgElements.js";
import { ASCENT_EM, DESCENT_EM, textHeight, textWidth } from "./textWidth.js";

/**
 * Figure: the edge-statistic matrix as a heatmap (both triangles), regions in
 * the drawing order of regionOrder (hemisphere, then system), the statistic on
 * the shared cividis scale (t from −max|t| to +max|t|; F from 0 to its maximum), and every edge of the significant finding outlined
 * (a black and a white frame, visible on any colour) while the finding holds at
 * most a quarter of the tested edges (more would hide the colours; the
 * subtitle then says so). Cells are quantised to
 * 41 colours and drawn as one path per colour, so the file stays small for a
 * few hundred regions.
 *
 * Laid out for print: when a row is tall enough for a 7 pt label, every
 * region is named along both axes (the finding's regions in bold);
 * otherwise the axes name the hemispheres and systems, each beside its run of
 * rows and columns (where the run leaves room), and the finding's regions are
 * named at the right, each joined to its row by a leader line, when the
 * figure is wide enough for them.
 */
const LEVELS = 41;
const PAD = 3;
/** The largest cell: a few regions do not make a huge matrix. */
const MAX_CELL = 14;
/** The finding is outlined only while it holds at most this share of the tested edges. */
const OUTLINE_SHARE = 0.25;
/** The longest axis label, in points; longer labels are shortened. */
const MAX_LABEL: Record<PrintWidth, number> = { single: 62, double: 96 };

/** `leftOut`: edges the design's edge rules left out (no statistic, white, but not for zero variance). */
export function matrixFigure(contrast: ContrastResults, regions: Region[], finding: SignificantEdges, leftOut: number, printWidth: PrintWidth): string {
  const count = regions.length;
  const W = widthPt(printWidth);
  const small = FONT_PT.small;
  const axis = FONT_PT.label;
  const { order, position, blocks } = regionOrder(regions);
  const hasHemisphere = regions.some((r) => r.hemisphere !== undefined);
  const hasSystem = regions.some((r) => r.system !== undefined);
  const highlightNodes = new Set<number>();
  for (const e of finding.edges) {
    highlightNodes.add(contrast.edges.regionA[e]);
    highlightNodes.add(contrast.edges.regionB[e]);
  }
  const { edges } = contrast;
  const limit = statisticLimit(edges.statistic);
  const signed = contrast.summary.statistic !== "F";
  const stat = signed ? "t" : "F";
  const body: string[] = [];
  // Outlines help while the finding is a minority of the edges; beyond OUTLINE_SHARE they hide the colours.
  let tested = 0;
  for (let e = 0; e < edges.statistic.length; e++) if (Number.isFinite(edges.statistic[e])) tested++;
  const outlined = finding.edges.length > 0 && finding.edges.length <= OUTLINE_SHARE * tested;

  // Title and subtitle.
  const title = paragraph(PAD, PAD + ASCENT_EM * FONT_PT.title, `Edge statistics (${stat}): ${contrast.summary.name}`, W - 2 * PAD, FONT_PT.title, { weight: "bold" });
  const subtitle = paragraph(
    PAD,
    title.lastBaseline + DESCENT_EM * FONT_PT.title + TEXT_GAP + ASCENT_EM * axis,
    finding.edges.length === 0
      ? "no significant edges to outline"
      : outlined
        ? `${finding.edges.length} edge${finding.edges.length > 1 ? "s" : ""} of the ${finding.kind === "components" ? "significant subnetworks" : "FDR-significant set"} outlined`
        : `${finding.edges.length} of ${tested} edges in the ${finding.kind === "components" ? "significant subnetworks" : "FDR-significant set"}: too many to outline (see the edge table)`,
    W - 2 * PAD,
    axis,
    { fill: "#444444" },
  );
  body.push(...title.elements, ...subtitle.elements);
  const headTop = subtitle.lastBaseline + DESCENT_EM * axis + 4;

  // Every region named, when the rows are tall enough at the width left for the matrix.
  const maxLabel = MAX_LABEL[printWidth];
  const isBold = (region: number) => highlightNodes.has(region);
  const regionLabel = (region: number) => clipToWidth(regions[region].label, maxLabel, small, isBold(region));
  const regionLabelWidth = Math.max(0, ...order.map((r) => textWidth(regionLabel(r), small, isBold(r))));
  const groupLabel = (block: RegionBlock) => [block.hemisphere, block.system].filter((v) => v !== undefined).join(" · ");
  const named = (() => {
    const left = PAD + regionLabelWidth + 3;
    const cell = (W - left - PAD) / Math.max(count, 1);
    return cell >= textHeight(small) + 0.6 ? Math.min(MAX_CELL, cell) : 0;
  })();

  // Otherwise the groups: hemisphere (outer) and system (inner) along the left, the same across the top.
  const systemLabelWidth = hasSystem ? Math.min(maxLabel, Math.max(0, ...blocks.map((b) => textWidth(clipToWidth(b.system ?? "", maxLabel, small), small)))) : 0;
  const hasGroups = hasHemisphere || hasSystem;
  // Without groups, region numbers (in matrix order) along the left instead.
  const groupLeft = hasGroups
    ? PAD + (hasHemisphere ? textHeight(axis) + 3 : 0) + (hasSystem ? systemLabelWidth + 3 : 0) + 5
    : PAD + textWidth(String(count), small) + 5;
  const findingLabels = [...highlightNodes].sort((a, b) => position[a] - position[b]);
  const findingLabelWidth = Math.max(0, ...findingLabels.map((r) => textWidth(clipToWidth(regions[r].label, maxLabel, small), small)));

  let left: number;
  let top: number;
  let cell: number;
  let labelsRight = false;
  if (named > 0) {
    cell = named;
    const size = cell * count;
    // The labels and the matrix together, centred across the width.
    left = Math.max(PAD, (W - (regionLabelWidth + 3 + size)) / 2) + regionLabelWidth + 3;
    top = headTop + regionLabelWidth + 3;
  } else {
    const withRight = W - groupLeft - (findingLabelWidth + 14) - PAD;
    labelsRight = findingLabels.length > 0 && withRight >= 0.55 * W && (findingLabels.length - 1) * linePitch(small) <= withRight;
    const size = labelsRight ? withRight : W - groupLeft - PAD;
    cell = Math.min(MAX_CELL, size / Math.max(count, 1));
    left = groupLeft;
    const topLabels = (hasHemisphere ? linePitch(axis) : 0) + (hasSystem ? systemLabelWidth + 3 : 0);
    top = headTop + topLabels + (hasGroups ? 3 : textHeight(small) / 2);
  }
  // The cell grid's transform is written with two decimals; the outlines and labels use the same cell.
  cell = Math.floor(cell * 100) / 100;
  const size = cell * count;

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
  body.push(rect(left, top, size, size, "#ffffff", 'stroke="#999999" stroke-width="0.5"'));
  // data-cells: the grid of unit cells (row and column = drawing position), for report.html's script.
  body.push(`<g transform="translate(${n(left)} ${n(top)}) scale(${n(cell)})" shape-rendering="crispEdges" data-cells="${count}">`);
  for (const level of [...paths.keys()].sort((a, b) => a - b)) {
    const colour = scaleColour(level / (LEVELS - 1));
    body.push(`<path fill="${colour}" d="${paths.get(level)!.text()}"/>`);
  }
  body.push(`<path fill="#d9d9d9" d="${order.map((_, p) => `M${p} ${p}h1v1h-1z`).join("")}"/>`);
  body.push("</g>");

  // Block separators: white lines, heavier between hemispheres.
  const hemisphereOf = (b: RegionBlock) => b.hemisphere ?? "";
  blocks.forEach((block, k) => {
    if (k === 0) return;
    const at = top + block.start * cell;
    const atX = left + block.start * cell;
    const major = hemisphereOf(blocks[k - 1]) !== hemisphereOf(block);
    const stroke = major ? Math.max(0.8, Math.min(1.6, cell * 0.3)) : Math.max(0.4, Math.min(0.7, cell * 0.15));
    body.push(line(left, at, left + size, at, "#ffffff", stroke), line(atX, top, atX, top + size, "#ffffff", stroke));
  });

  // A rotated label (−90°) reads upward from (x, y); its box is centred on `centre` across.
  const rotatedX = (centre: number, fontSize: number) => centre + ((ASCENT_EM - DESCENT_EM) / 2) * fontSize;
  const baselineFor = (centre: number, fontSize: number) => centre + ((ASCENT_EM - DESCENT_EM) / 2) * fontSize;

  if (named > 0) {
    for (const region of order) {
      const p = position[region];
      const centre = (p + 0.5) * cell;
      const weight = isBold(region) ? { weight: "bold" as const } : {};
      body.push(text(left - 3, baselineFor(top + centre, small), regionLabel(region), { anchor: "end", size: small, ...weight }));
      body.push(text(rotatedX(left + centre, small), top - 3, regionLabel(region), { size: small, rotate: -90, ...weight }));
    }
  } else {
    // Runs of one hemisphere.
    const runs: { name: string | undefined; start: number; end: number }[] = [];
    for (const block of blocks) {
      const last = runs[runs.length - 1];
      if (last && last.name === block.hemisphere) last.end = block.end;
      else runs.push({ name: block.hemisphere, start: block.start, end: block.end });
    }
    if (hasHemisphere) {
      for (const run of runs) {
        if (run.name === undefined) continue;
        const from = run.start * cell;
        const to = run.end * cell;
        const label = clipToWidth(run.name, to - from - 2, axis);
        if (label === "…") continue;
        body.push(text(rotatedX(PAD + textHeight(axis) / 2, axis), top + (from + to) / 2, label, { anchor: "middle", size: axis, rotate: -90 }));
        body.push(text(left + (from + to) / 2, headTop + ASCENT_EM * axis, label, { anchor: "middle", size: axis }));
        body.push(line(left + from + 1, headTop + textHeight(axis) + 1, left + to - 1, headTop + textHeight(axis) + 1, "#555555", 0.6));
        body.push(line(PAD + textHeight(axis) + 1, top + from + 1, PAD + textHeight(axis) + 1, top + to - 1, "#555555", 0.6));
      }
    }
    if (hasSystem) {
      // One label per system run, where its run leaves room after the label before it.
      let lastEnd = -Infinity;
      for (const block of blocks) {
        if (block.system === undefined) continue;
        const from = block.start * cell;
        const to = block.end * cell;
        const centre = (from + to) / 2;
        const h = textHeight(small);
        if (centre - h / 2 < lastEnd + TEXT_GAP || to - from < h * 0.5) continue;
        lastEnd = centre + h / 2;
        const label = clipToWidth(block.system, systemLabelWidth, small);
        body.push(text(left - 5 - 3, baselineFor(top + centre, small), label, { anchor: "end", size: small }));
        body.push(text(rotatedX(left + centre, small), top - 3 - 3, label, { size: small, rotate: -90 }));
      }
      for (const block of blocks) {
        const from = block.start * cell + 0.6;
        const to = block.end * cell - 0.6;
        body.push(line(left - 4, top + from, left - 4, top + to, "#555555", 0.6));
        body.push(line(left + from, top - 4, left + to, top - 4, "#555555", 0.6));
      }
    }
    if (!hasHemisphere && !hasSystem) {
      // Region numbers in matrix order along the left.
      const ticks = niceTicks(1, count, Math.max(2, Math.floor(size / 40))).filter((t) => t >= 1 && Number.isInteger(t));
      if (ticks.length > 1 && ticks[0] > 1 && (ticks[0] - 1) * cell >= linePitch(small)) ticks.unshift(1);
      for (const t of ticks) {
        const p = position[t - 1];
        const y = top + (p + 0.5) * cell;
        body.push(line(left - 2, y, left, y, "#555555", 0.5));
        body.push(text(left - 3, baselineFor(y, small), String(t), { anchor: "end", size: small }));
      }
    }
  }

  // Outlines of the significant edges: a frame round each cell, never smaller than 2.5 pt so that
  // it stays visible when cells are tiny (it then overlaps its neighbours a little).
  if (outlined) {
    const side = Math.max(cell, 2.5);
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
    body.push(`<path d="${d}" fill="none" stroke="#000000" stroke-width="${n(Math.max(0.7, Math.min(1.6, side * 0.16)))}"/>`);
    body.push(`<path d="${d}" fill="none" stroke="#ffffff" stroke-width="${n(Math.max(0.3, Math.min(0.6, side * 0.06)))}"/>`);
  }

  // The finding's regions at the right, each joined to its row.
  if (labelsRight) {
    const wished = findingLabels.map((r) => top + (position[r] + 0.5) * cell);
    const placed = spreadLabels(wished, linePitch(small), top + textHeight(small) / 2, top + size - textHeight(small) / 2);
    if (placed) {
      findingLabels.forEach((region, k) => {
        const x0 = left + size + 1;
        body.push(`<path d="M${n(x0)} ${n(wished[k])}h3L${n(x0 + 10)} ${n(placed[k])}h2" fill="none" stroke="#555555" stroke-width="0.5"/>`);
        body.push(text(x0 + 13, baselineFor(placed[k], small), clipToWidth(regions[region].label, maxLabel, small), { size: small }));
      });
    }
  }

  // Under the matrix: the note on white cells, then the colour bar.
  let y = top + size + 4;
  const zeroVariance = missing - leftOut;
  if (missing > 0) {
    const parts = [
      ...(leftOut > 0 ? [`${leftOut} edge${leftOut > 1 ? "s" : ""} left out by the edge rules`] : []),
      ...(zeroVariance > 0 ? [`${zeroVariance} edge${zeroVariance > 1 ? "s" : ""} with no statistic (zero variance)`] : []),
    ];
    const note = paragraph(left, y + ASCENT_EM * small, `white: ${parts.join("; ")}`, W - left - PAD, small, { fill: "#444444" });
    body.push(...note.elements);
    y = note.lastBaseline + DESCENT_EM * small + 2;
  }
  // colourBar's label sits 4 + its ascent above the bar; its tick labels' baseline is 4 + their size below it.
  const barWidth = Math.min(200, Math.max(110, size * 0.6));
  const barX = Math.max(PAD + 14, Math.min(left + (size - barWidth) / 2, W - PAD - 14 - barWidth));
  const barY = y + 4 + axis * ASCENT_EM + 2;
  body.push(...colourBar(barX, barY, barWidth, 7, limit, `${stat}-statistic`, signed, [axis, small]));
  const height = barY + 7 + 4 + small + small * DESCENT_EM + PAD;
  return printSvgDocument(printWidth, height, `Edge-statistic matrix for ${contrast.summary.name}`, body);
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
