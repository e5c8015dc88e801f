import type { ContrastResults, ResultsSummary } from "../loadResults.js";
import { count, plain } from "../printNumbers.js";
import { boxKey, clipToWidth, flowLegend, lineKey, linePitch, paragraph, TEXT_GAP } from "./labelLayout.js";
import { FONT_PT, printSvgDocument, widthPt, type PrintWidth } from "./printSize.js";
import { halo, line, n, niceTicks, rect, text, tickLabel } from "./svgElements.js";
import { ASCENT_EM, DESCENT_EM, textHeight, textWidth } from "./textWidth.js";

/**
 * Figure: the permutation distribution of the largest component size (the
 * design's size measure) as a histogram, with the critical value at alpha
 * (dashed) and each observed component's size (solid; dark when p_fwe ≤ alpha,
 * grey otherwise) marked. Integer sizes (extent) get one bar per value up to
 * 60; otherwise 40 equal bins. The axis ends soon after the observed sizes,
 * the critical value and 99.9% of the null; the few larger null values are
 * counted in a note. Monochrome, so it reads in grayscale.
 *
 * Laid out for print at either width: the components' labels (#1, #2 …) sit
 * in rows above the plot, each in the lowest row where it clears its
 * neighbours; marks that find no room in MARKER_ROWS rows are named in a note
 * under the legend instead.
 */
const PAD = 3;
const MARKER_ROWS = 3;
const PLOT_HEIGHT: Record<PrintWidth, number> = { single: 118, double: 170 };

export function nullFigure(contrast: ContrastResults, summary: ResultsSummary, width: PrintWidth): string | null {
  const rows = contrast.nullDistribution;
  if (!rows || rows.maxExtent.length === 0) return null;
  const { inference } = summary.options;
  const measure = inference.size;
  const values = measure === "mass" ? rows.maxMass : rows.maxExtent;
  const observed = contrast.components.map((c) => ({ id: c.id, size: measure === "mass" ? c.mass : c.extent, significant: c.pFwe <= inference.alpha }));
  const critical = contrast.summary.critical_size ?? NaN;

  // The axis reaches the observed sizes, the critical value and nearly all of the null; rarer, larger null
  // values are counted in a note instead of stretching the axis.
  let integers = true;
  for (const v of values) if (!Number.isInteger(v)) integers = false;
  const sorted = Float64Array.from(values).sort();
  const nullHigh = sorted[Math.min(sorted.length - 1, Math.floor(0.999 * sorted.length))];
  const nullMax = sorted[sorted.length - 1];
  const reach = Math.max(nullHigh, ...observed.map((o) => o.size), Number.isFinite(critical) ? critical : 0, 1);
  const top = nullMax <= reach * 1.25 ? Math.max(reach, nullMax) : reach * 1.15;
  const perValue = integers && measure === "extent" && top <= 60;
  const binCount = perValue ? Math.ceil(top) + 1 : 40;
  const low = perValue ? -0.5 : 0;
  const high = perValue ? Math.ceil(top) + 0.5 : top * 1.04;
  const binWidth = (high - low) / binCount;
  const counts = new Array<number>(binCount).fill(0);
  let beyond = 0;
  for (const v of values) {
    if (v >= high) beyond++;
    else counts[Math.max(0, Math.floor((v - low) / binWidth))] += 1;
  }
  const countMax = Math.max(...counts, 1);

  const W = widthPt(width);
  const tick = FONT_PT.small;
  const axis = FONT_PT.label;
  const body: string[] = [];

  // Title and subtitle, wrapped to the width.
  const sizeName = measure === "mass" ? "mass" : "extent (edges)";
  const mode = contrast.summary.mode === "exact" ? "all relabelings (exact)" : "Monte Carlo relabelings";
  const title = paragraph(PAD, PAD + ASCENT_EM * FONT_PT.title, `Null distribution of the largest component ${measure}: ${contrast.summary.name}`, W - 2 * PAD, FONT_PT.title, { weight: "bold" });
  body.push(...title.elements);
  const subtitle = paragraph(PAD, title.lastBaseline + linePitch(FONT_PT.title) - (FONT_PT.title - axis) * ASCENT_EM, `${values.length} ${mode}; primary threshold ${plain(inference.threshold)}; α\u00a0=\u00a0${plain(inference.alpha)}`, W - 2 * PAD, axis, { fill: "#444444" });
  body.push(...subtitle.elements);

  // Counts axis: whole numbers only, its top a tick at or above the tallest bar.
  let yTicks = niceTicks(0, countMax, width === "single" ? 3 : 4).filter((t) => Number.isInteger(t));
  if (yTicks.length < 2) yTicks = [0, countMax];
  const yStep = yTicks[1] - yTicks[0];
  if (yTicks[yTicks.length - 1] < countMax) yTicks.push(yTicks[yTicks.length - 1] + yStep);
  const yTop = yTicks[yTicks.length - 1];
  const yLabelWidth = Math.max(...yTicks.map((t) => textWidth(tickLabel(t, yStep), tick)));
  const left = PAD + textHeight(axis) + 4 + yLabelWidth + 4;

  // Size axis: as many round ticks as fit with their labels apart.
  const xFrom = perValue ? 0 : low;
  const xTo = perValue ? Math.ceil(top) : high;
  const ticksFor = (k: number) => niceTicks(xFrom, xTo, k).filter((t) => t >= low && t <= high && (!integers || Number.isInteger(t)));
  const lastLabelHalf = (ticks: number[], step: number) => textWidth(tickLabel(ticks[ticks.length - 1], step), tick) / 2;
  let xTicks = ticksFor(2);
  let right = PAD + 4;
  for (let k = width === "single" ? 6 : 10; k >= 2; k--) {
    const ticks = ticksFor(k);
    const step = ticks.length > 1 ? ticks[1] - ticks[0] : 1;
    const r = Math.max(PAD + 4, lastLabelHalf(ticks, step) + PAD);
    const spacing = ((ticks.length > 1 ? step : 1) / (high - low)) * (W - left - r);
    const widest = Math.max(...ticks.map((t) => textWidth(tickLabel(t, step), tick)));
    if (ticks.length <= 1 || spacing >= widest + 6) {
      xTicks = ticks;
      right = r;
      break;
    }
  }
  const xStep = xTicks.length > 1 ? xTicks[1] - xTicks[0] : 1;
  const plotWidth = W - left - right;
  const x = (v: number) => left + ((v - low) / (high - low)) * plotWidth;

  // The components' labels, one per distinct size, each in the lowest row where it clears the others.
  const bySize = new Map<number, { ids: number[]; significant: boolean }>();
  for (const o of observed) {
    const entry = bySize.get(o.size) ?? { ids: [], significant: false };
    entry.ids.push(o.id);
    entry.significant ||= o.significant;
    bySize.set(o.size, entry);
  }
  const marks = [...bySize.entries()]
    .sort((a, b) => a[0] - b[0])
    .map(([size, entry]) => {
      const label = entry.ids.length <= 3 ? entry.ids.map((id) => `#${id}`).join(" ") : `${entry.ids.length} components`;
      const half = textWidth(label, tick) / 2;
      const centre = Math.min(Math.max(x(size), left + half), W - PAD - half);
      return { size, ...entry, label, from: centre - half, to: centre + half, centre, row: -1 };
    });
  const rowEnds: number[] = [];
  for (const mark of marks) {
    for (let r = 0; r < MARKER_ROWS; r++) {
      if (rowEnds[r] === undefined || rowEnds[r] + 2 * TEXT_GAP <= mark.from) {
        mark.row = r;
        rowEnds[r] = mark.to;
        break;
      }
    }
  }
  const rowsUsed = rowEnds.length;
  const markPitch = linePitch(tick) + 1;
  const bandTop = subtitle.lastBaseline + DESCENT_EM * axis + 4;
  // The top count label reaches half a line above the plot.
  const plotTop = bandTop + Math.max(rowsUsed * markPitch + 4, textHeight(tick) / 2 + TEXT_GAP);
  const plotHeight = PLOT_HEIGHT[width];
  const plotBottom = plotTop + plotHeight;
  const y = (c: number) => plotBottom - (c / yTop) * plotHeight;
  // Row 0 is the one nearest the plot.
  const rowBaseline = (r: number) => plotTop - 4 - r * markPitch - DESCENT_EM * tick - 3;

  for (const t of yTicks) {
    body.push(line(left, y(t), left + plotWidth, y(t), "#e6e6e6", 0.5));
    body.push(text(left - 4, y(t) + 0.36 * tick, tickLabel(t, yStep), { anchor: "end", size: tick }));
  }
  for (const t of xTicks) {
    body.push(line(x(t), plotBottom, x(t), plotBottom + 3, "#333333", 0.6));
    body.push(text(x(t), plotBottom + 4 + ASCENT_EM * tick, tickLabel(t, xStep), { anchor: "middle", size: tick }));
  }
  const xTitleBaseline = plotBottom + 4 + textHeight(tick) + TEXT_GAP + ASCENT_EM * axis;
  body.push(text(left + plotWidth / 2, xTitleBaseline, clipToWidth(`largest component ${sizeName}`, plotWidth, axis), { anchor: "middle", size: axis }));
  body.push(text(PAD + ASCENT_EM * axis, plotTop + plotHeight / 2, "relabelings", { anchor: "middle", size: axis, rotate: -90 }));

  // Bars.
  counts.forEach((c, k) => {
    if (c === 0) return;
    const x0 = x(low + k * binWidth);
    const x1 = x(low + (k + 1) * binWidth);
    const gap = Math.min(0.6, (x1 - x0) * 0.15);
    body.push(rect(x0 + gap / 2, y(c), Math.max(0.3, x1 - x0 - gap), plotBottom - y(c), "#a8a8a8"));
  });
  body.push(line(left, plotBottom, left + plotWidth, plotBottom, "#333333", 0.7));
  body.push(line(left, plotTop, left, plotBottom, "#333333", 0.7));

  // Critical value.
  if (Number.isFinite(critical)) {
    body.push(line(x(critical), plotTop, x(critical), plotBottom, "#000000", 1, 'stroke-dasharray="3.5 2"'));
  }

  // Observed components: a line from the axis up to its label (or to the top of the plot when the label is in the note).
  for (const mark of marks) {
    const colour = mark.significant ? "#1a1a1a" : "#8c8c8c";
    const at = x(mark.size);
    const tipY = mark.row >= 0 ? rowBaseline(mark.row) + DESCENT_EM * tick + 1.5 : plotTop;
    body.push(line(at, tipY + 3, at, plotBottom, colour, mark.significant ? 1.6 : 0.9));
    body.push(`<path d="M${n(at - 2.8)} ${n(tipY)}h5.6l-2.8 4z" fill="${colour}"/>`);
    if (mark.row >= 0) body.push(halo(text(mark.centre, rowBaseline(mark.row), mark.label, { anchor: "middle", size: tick, fill: colour })));
  }

  // Legend, wrapped to the width, then the notes.
  const legend = flowLegend(
    [
      { key: boxKey("#a8a8a8", tick), label: "null: largest size in a relabeling" },
      ...(Number.isFinite(critical) ? [{ key: lineKey("#000000", 1, "3.5 2"), label: `critical ${measure} at α = ${plain(inference.alpha)}: ${count(critical)} (larger is significant)` }] : []),
      { key: lineKey("#1a1a1a", 1.6), label: `observed component #, p_FWE ≤ ${plain(inference.alpha)}` },
      { key: lineKey("#8c8c8c", 0.9), label: "observed, not significant" },
    ],
    left,
    xTitleBaseline + DESCENT_EM * axis + TEXT_GAP + 2 + ASCENT_EM * tick,
    W - left - PAD,
    tick,
  );
  body.push(...legend.elements);
  let lastBaseline = legend.lastBaseline;
  const notes: string[] = [];
  const unplaced = marks.filter((m) => m.row < 0);
  if (unplaced.length > 0) notes.push(`Marks not labelled for want of room: ${unplaced.map((m) => `${m.label} at ${count(m.size)}`).join("; ")}.`);
  if (beyond > 0) notes.push(`${beyond} larger null value${beyond > 1 ? "s" : ""}, up to ${count(nullMax)}, beyond the axis.`);
  for (const note of notes) {
    const block = paragraph(left, lastBaseline + linePitch(tick), note, W - left - PAD, tick, { fill: "#444444" });
    body.push(...block.elements);
    lastBaseline = block.lastBaseline;
  }

  return printSvgDocument(width, lastBaseline + DESCENT_EM * tick + PAD + 1, `Null distribution of the largest component ${measure} for ${contrast.summary.name}`, body);
}
