import type { ContrastResults, ResultsSummary } from "../loadResults.js";
import type { PrintWidth } from "./printSize.js";
import { count, plain } from "../printNumbers.js";
import { halo, line, n, niceTicks, rect, svgDocument, text, tickLabel } from "./svgElements.js";

/**
 * Figure: the permutation distribution of the largest component size (the
 * design's size measure) as a histogram, with the critical value at alpha
 * (dashed) and each observed component's size (solid; dark when p_fwe ≤ alpha,
 * grey otherwise) marked. Integer sizes (extent) get one bar per value up to
 * 60; otherwise 40 equal bins. The axis ends soon after the observed sizes,
 * the critical value and 99.9% of the null; the few larger null values are
 * counted in a note. Monochrome, so it reads in grayscale.
 */
const WIDTH = 640;
const HEIGHT = 380;
const MARGIN = { left: 62, right: 24, top: 56, bottom: 76 };

export function nullFigure(contrast: ContrastResults, summary: ResultsSummary, width: PrintWidth): string | null {
  void width; // drawn at one size until this figure is laid out for print
  const rows = contrast.nullDistribution;
  if (!rows || rows.maxExtent.length === 0) return null;
  const { inference } = summary.options;
  const measure = inference.size;
  const values = measure === "mass" ? rows.maxMass : rows.maxExtent;
  const observed = contrast.components.map((c) => ({ id: c.id, size: measure === "mass" ? c.mass : c.extent, significant: c.pFwe <= inference.alpha }));
  const critical = contrast.summary.critical_size ?? NaN;

  // The axis reaches the observed sizes, the critical value and nearly all of the null; rarer, larger null
  // values are counted at the right edge instead of stretching the axis.
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
  const xTicks = niceTicks(perValue ? 0 : low, perValue ? Math.ceil(top) : high, 8).filter((t) => t >= low && t <= high);
  const xStep = xTicks.length > 1 ? xTicks[1] - xTicks[0] : 1;
  for (const t of xTicks) {
    body.push(line(x(t), MARGIN.top + plotHeight, x(t), MARGIN.top + plotHeight + 4, "#333333", 0.8));
    body.push(text(x(t), MARGIN.top + plotHeight + 15, tickLabel(t, xStep), { anchor: "middle", size: 9 }));
  }
  body.push(text(MARGIN.left + plotWidth / 2, MARGIN.top + plotHeight + 32, `largest component ${sizeName} in each relabeling`, { anchor: "middle", size: 10 }));
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
    body.push(halo(text(x(critical) + 4, MARGIN.top + 4, `critical ${measure}: ${count(critical)}`, { size: 9 })));
    body.push(halo(text(x(critical) + 4, MARGIN.top + 15, "(larger is significant)", { size: 9, fill: "#444444" })));
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
      const labelY = MARGIN.top + 36 + (k % 4) * 13;
      body.push(line(x(size), labelY + 3, x(size), MARGIN.top + plotHeight, colour, entry.significant ? 2.2 : 1.2));
      body.push(`<path d="M${n(x(size) - 4)} ${n(labelY + 3)}h8l-4 6z" fill="${colour}"/>`);
      const label = entry.ids.length <= 3 ? entry.ids.map((id) => `#${id}`).join(" ") : `${entry.ids.length} components`;
      const onLeft = x(size) > MARGIN.left + 0.8 * plotWidth;
      body.push(halo(text(x(size) + (onLeft ? -6 : 6), labelY + 7, label, { anchor: onLeft ? "end" : "start", size: 9, fill: colour })));
    });

  if (beyond > 0) {
    body.push(halo(text(MARGIN.left + plotWidth, MARGIN.top + plotHeight - 8, `${beyond} larger, up to ${count(nullMax)} →`, { anchor: "end", size: 9, fill: "#444444" })));
  }

  // Legend, in one row under the axis title.
  const legendY = HEIGHT - 16;
  let legendX = MARGIN.left;
  body.push(rect(legendX, legendY - 8, 12, 8, "#a8a8a8"));
  body.push(text(legendX + 17, legendY, "null: largest size in a relabeling", { size: 9 }));
  legendX += 180;
  body.push(line(legendX, legendY - 4, legendX + 14, legendY - 4, "#1a1a1a", 2.2));
  body.push(text(legendX + 19, legendY, `observed #component, p_FWE ≤ ${plain(inference.alpha)}`, { size: 9 }));
  legendX += 200;
  body.push(line(legendX, legendY - 4, legendX + 14, legendY - 4, "#8c8c8c", 1.2));
  body.push(text(legendX + 19, legendY, "observed, not significant", { size: 9 }));

  return svgDocument(WIDTH, HEIGHT, `Null distribution of the largest component ${measure} for ${contrast.summary.name}`, body);
}
