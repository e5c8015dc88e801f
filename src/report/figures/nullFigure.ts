import type { ContrastResults, ResultsSummary } from "../loadResults.js";
import { plain, significant } from "../printNumbers.js";
import { line, n, niceTicks, rect, svgDocument, text, tickLabel } from "./svgElements.js";

/**
 * Figure: the permutation distribution of the largest component size (the
 * design's size measure) as a histogram, with the critical value at alpha
 * (dashed) and each observed component's size (solid; dark when p_fwe ≤ alpha,
 * grey otherwise) marked. Integer sizes (extent) get one bar per value up to
 * 60; otherwise 40 equal bins. Monochrome, so it reads in grayscale.
 */
const WIDTH = 640;
const HEIGHT = 360;
const MARGIN = { left: 62, right: 24, top: 64, bottom: 52 };

export function nullFigure(contrast: ContrastResults, summary: ResultsSummary): string | null {
  const rows = contrast.nullDistribution;
  if (!rows || rows.maxExtent.length === 0) return null;
  const { inference } = summary.options;
  const measure = inference.size;
  const values = measure === "mass" ? rows.maxMass : rows.maxExtent;
  const observed = contrast.components.map((c) => ({ id: c.id, size: measure === "mass" ? c.mass : c.extent, significant: c.pFwe <= inference.alpha }));
  const critical = contrast.summary.critical_size ?? NaN;

  let nullMax = 0;
  let integers = true;
  for (const v of values) {
    if (v > nullMax) nullMax = v;
    if (!Number.isInteger(v)) integers = false;
  }
  const top = Math.max(nullMax, ...observed.map((o) => o.size), Number.isFinite(critical) ? critical : 0, 1);
  const perValue = integers && measure === "extent" && top <= 60;
  const binCount = perValue ? Math.round(top) + 1 : 40;
  const low = perValue ? -0.5 : 0;
  const high = perValue ? top + 0.5 : top * 1.04;
  const binWidth = (high - low) / binCount;
  const counts = new Array<number>(binCount).fill(0);
  for (const v of values) counts[Math.min(binCount - 1, Math.max(0, Math.floor((v - low) / binWidth)))] += 1;
  const countMax = Math.max(...counts, 1);

  const plotWidth = WIDTH - MARGIN.left - MARGIN.right;
  const plotHeight = HEIGHT - MARGIN.top - MARGIN.bottom;
  const x = (v: number) => MARGIN.left + ((v - low) / (high - low)) * plotWidth;
  const y = (c: number) => MARGIN.top + plotHeight - (c / countMax) * plotHeight;
  const body: string[] = [];

  const sizeName = measure === "mass" ? "mass" : "extent (edges)";
  const mode = contrast.summary.mode === "exact" ? "all relabelings (exact)" : "Monte Carlo relabelings";
  body.push(text(MARGIN.left, 20, `Null distribution of the largest component ${measure}: ${contrast.summary.name}`, { size: 13, weight: "bold" }));
  body.push(text(MARGIN.left, 37, `${values.length} ${mode}; threshold ${plain(inference.threshold)}, α = ${plain(inference.alpha)}`, { size: 10, fill: "#444444" }));

  // Axes and ticks.
  const yTicks = niceTicks(0, countMax, 4);
  const yStep = yTicks.length > 1 ? yTicks[1] - yTicks[0] : 1;
  for (const t of yTicks) {
    body.push(line(MARGIN.left, y(t), MARGIN.left + plotWidth, y(t), "#e6e6e6", 0.8));
    body.push(text(MARGIN.left - 6, y(t) + 3.5, tickLabel(t, yStep), { anchor: "end", size: 9 }));
  }
  const xTicks = niceTicks(perValue ? 0 : low, perValue ? top : high, 8).filter((t) => t >= low && t <= high);
  const xStep = xTicks.length > 1 ? xTicks[1] - xTicks[0] : 1;
  for (const t of xTicks) {
    body.push(line(x(t), MARGIN.top + plotHeight, x(t), MARGIN.top + plotHeight + 4, "#333333", 0.8));
    body.push(text(x(t), MARGIN.top + plotHeight + 15, tickLabel(t, xStep), { anchor: "middle", size: 9 }));
  }
  body.push(text(MARGIN.left + plotWidth / 2, HEIGHT - 12, `largest component ${sizeName} in each relabeling`, { anchor: "middle", size: 10 }));
  body.push(text(16, MARGIN.top + plotHeight / 2, "relabelings", { anchor: "middle", size: 10, rotate: -90 }));

  // Bars.
  counts.forEach((c, k) => {
    if (c === 0) return;
    const x0 = x(low + k * binWidth);
    const x1 = x(low + (k + 1) * binWidth);
    body.push(rect(x0 + 0.5, y(c), Math.max(0.5, x1 - x0 - 1), MARGIN.top + plotHeight - y(c), "#a8a8a8"));
  });
  body.push(line(MARGIN.left, MARGIN.top + plotHeight, MARGIN.left + plotWidth, MARGIN.top + plotHeight, "#333333", 1));
  body.push(line(MARGIN.left, MARGIN.top, MARGIN.left, MARGIN.top + plotHeight, "#333333", 1));

  // Critical value.
  if (Number.isFinite(critical)) {
    body.push(line(x(critical), MARGIN.top - 4, x(critical), MARGIN.top + plotHeight, "#000000", 1.4, 'stroke-dasharray="5 3"'));
    body.push(text(x(critical) + 4, MARGIN.top + 8, `critical ${measure} ${significant(critical)}`, { size: 9 }));
    body.push(text(x(critical) + 4, MARGIN.top + 19, `(larger is significant)`, { size: 9, fill: "#444444" }));
  }

  // Observed components, one mark per distinct size.
  const bySize = new Map<number, { ids: number[]; significant: boolean }>();
  for (const o of observed) {
    const entry = bySize.get(o.size) ?? { ids: [], significant: false };
    entry.ids.push(o.id);
    entry.significant ||= o.significant;
    bySize.set(o.size, entry);
  }
  [...bySize.entries()]
    .sort((a, b) => b[0] - a[0])
    .forEach(([size, entry], k) => {
      const colour = entry.significant ? "#1a1a1a" : "#8c8c8c";
      const labelY = MARGIN.top + 34 + (k % 4) * 12;
      body.push(line(x(size), labelY + 3, x(size), MARGIN.top + plotHeight, colour, entry.significant ? 2.2 : 1.2));
      body.push(`<path d="M${n(x(size) - 4)} ${n(labelY + 3)}h8l-4 6z" fill="${colour}"/>`);
      const label = entry.ids.length <= 3 ? entry.ids.map((id) => `#${id}`).join(" ") : `${entry.ids.length} components`;
      body.push(text(x(size) + (k % 2 === 0 ? -6 : 6), labelY, label, { anchor: k % 2 === 0 ? "end" : "start", size: 9, fill: colour }));
    });

  // Legend.
  const legendX = WIDTH - MARGIN.right - 190;
  const legendY = 48;
  body.push(rect(legendX, legendY - 9, 10, 8, "#a8a8a8"));
  body.push(text(legendX + 14, legendY - 1, "null: largest size per relabeling", { size: 9 }));
  body.push(line(legendX, legendY + 9, legendX + 10, legendY + 9, "#1a1a1a", 2.2));
  body.push(text(legendX + 14, legendY + 12, `observed, p_FWE ≤ ${plain(inference.alpha)}`, { size: 9 }));
  body.push(line(legendX + 100 + 20, legendY + 9, legendX + 130, legendY + 9, "#8c8c8c", 1.2));
  body.push(text(legendX + 134, legendY + 12, "not", { size: 9 }));

  return svgDocument(WIDTH, HEIGHT, `Null distribution of the largest component ${measure} for ${contrast.summary.name}`, body);
}
