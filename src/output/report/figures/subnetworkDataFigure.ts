import { sortedQuantile } from "../../../statistics/describe.js";
import type { SubnetworkValues } from "../../subnetworkValues.js";
import { FONT_PT, printSvgDocument, widthPt, type PrintWidth } from "./printSize.js";
import { circle, clip, line, n, niceTicks, rect, text, tickLabel } from "./svgElements.js";
import { textHeight, textWidth } from "./textWidth.js";

/**
 * The data behind one significant subnetwork (output/subnetworkValues.ts):
 * each participant's adjusted mean over the subnetwork's edges, by group
 * (jittered points over a box of the median and quartiles, whiskers to the
 * furthest point within 1.5 × IQR, Tukey 1977, Exploratory Data Analysis;
 * beside it the model's mean with its 95% interval), against the covariate
 * (points, the model's line and its 95% confidence band), or as one set of
 * values with a zero line (a mean or a mean change). Colours from the
 * Okabe–Ito palette (Okabe & Ito 2008, "Color Universal Design"), told apart
 * by position too, so the figure reads without colour.
 */
export interface DataFigureContext {
  /** How the edges were transformed (summary.json options.transform). */
  transform: string;
  /** Paired differences: what each person's value is, e.g. "post - pre". */
  difference?: string;
  /** A repeated design's person column (adjusting for it means removing each person's own level). */
  person?: string;
  /** Repeated measures: each value is one scan. */
  scans?: boolean;
}

const PALETTE = ["#0072B2", "#E69F00", "#009E73", "#CC79A7", "#56B4E9", "#D55E00"];
const INK = "#222222";
const MUTED = "#555555";
const GRID = "#e3e3e3";

/** The values' quantity in words, for the axis title. */
export function quantityWords(values: SubnetworkValues, subnetwork: number, context: DataFigureContext): string {
  const edges = values.subnetworks[subnetwork].edges;
  const scale = context.transform === "fisher-z" ? "Fisher z" : context.transform === "log1p" ? "log(1 + connectivity)" : "connectivity";
  const change = context.difference ? `change in ${scale} (${context.difference.replace(" - ", " − ")})` : scale;
  const adjusted = adjustedWords(values, context);
  const owner = values.selection === "fdr components" ? "set's" : "subnetwork's";
  return `Mean ${change} over the ${owner} ${edges} edge${edges === 1 ? "" : "s"}${adjusted ? `, ${adjusted}` : ""}`;
}

/** "adjusted for age and sex", or "" when the model has nothing to adjust for. */
export function adjustedWords(values: SubnetworkValues, context: DataFigureContext): string {
  const names = values.adjustedFor.map((name) => (name === context.person ? "each person's own level" : name));
  if (names.length === 0) return "";
  const list = names.length === 1 ? names[0] : `${names.slice(0, -1).join(", ")} and ${names[names.length - 1]}`;
  return `adjusted for ${list}`;
}

/** A number's leading hyphen as the typographic minus sign. */
function minusSign(label: string): string {
  return label.replace(/^-/, "\u2212");
}

/** What one point is. */
function unitWords(context: DataFigureContext): string {
  return context.scans ? "one scan" : context.difference ? "one person's change" : "one participant";
}

/** Deterministic jitter in [−½, ½): the fractional parts of multiples of the golden ratio (evenly spread, no randomness). */
function jitter(rank: number): number {
  const golden = 0.6180339887498949;
  return ((rank * golden) % 1) - 0.5;
}

/** At least three round ticks inside [low, high] (more asked for until there are). */
function ticksWithin(low: number, high: number, count: number): number[] {
  let ticks: number[] = [];
  for (let c = count; c <= count + 8; c++) {
    ticks = niceTicks(low, high, c).filter((t) => t >= low && t <= high);
    if (ticks.length >= 3) break;
  }
  return ticks;
}

/** A slot's name on at most two lines no wider than `width`, the second clipped with an ellipsis. */
function slotNameLines(name: string, width: number, size: number): string[] {
  const fit = (line: string) => {
    let shown = line;
    for (let max = line.length; max > 2 && textWidth(shown, size) > width; max -= 1) shown = clip(line, max);
    return shown;
  };
  const lines = wrap(name, size, width);
  return lines.length <= 2 ? lines.map(fit) : [fit(lines[0]), fit(lines.slice(1).join(" "))];
}

/** Words split into lines no wider than `width` at `size`. */
function wrap(words: string, size: number, width: number, bold = false): string[] {
  const lines: string[] = [];
  let current = "";
  for (const word of words.split(" ")) {
    const next = current ? `${current} ${word}` : word;
    if (current && textWidth(next, size, bold) > width) {
      lines.push(current);
      current = word;
    } else current = next;
  }
  if (current) lines.push(current);
  return lines;
}

export function subnetworkDataFigure(values: SubnetworkValues, subnetwork: number, context: DataFigureContext, width: PrintWidth): string | null {
  const s = values.subnetworks[subnetwork];
  if (!s) return null;
  const rows = values.ids.map((_, i) => i).filter((i) => Number.isFinite(s.adjusted[i]));
  if (rows.length === 0) return null;
  const single = width === "single";
  const W = widthPt(width);
  const small = FONT_PT.small;
  const label = FONT_PT.label;
  const lineStep = textHeight(label) + 1;

  // The y axis's title, horizontal above the plot and wrapped to the figure's width.
  const title = wrap(quantityWords(values, subnetwork, context), label, W - 12);
  const top = 6 + title.length * lineStep + 8;

  // The y range: the points, the model's interval, and zero for a mean (its reference line).
  const ys = rows.flatMap((i) => [s.adjusted[i], s.lower[i], s.upper[i]]).filter(Number.isFinite);
  let low = Math.min(...ys);
  let high = Math.max(...ys);
  if (values.plot === "mean") {
    low = Math.min(low, 0);
    high = Math.max(high, 0);
  }
  const pad = (high - low) * 0.06 || Math.abs(high) * 0.1 || 1;
  low -= pad;
  high += pad;
  const plotHeight = single ? 150 : 190;
  const ticks = ticksWithin(low, high, single ? 4 : 5);
  const step = ticks.length > 1 ? ticks[1] - ticks[0] : Math.abs(ticks[0]) || 1;
  const tickTexts = ticks.map((t) => minusSign(tickLabel(t, step)));
  const left = 6 + Math.max(...tickTexts.map((t) => textWidth(t, small))) + 6;
  // At two columns' width the plot keeps a readable aspect and the key stands beside it.
  const slotCount = values.plot === "groups" ? values.levels.filter((level) => rows.some((i) => values.groups[i] === level)).length : 1;
  const plotMax = single ? Infinity : values.plot === "covariate" ? 330 : Math.max(220, slotCount * 130);
  const right = Math.min(W - 8, left + plotMax);
  const keyBeside = W - right >= 120;
  const bottom = top + plotHeight;
  const y = (v: number) => bottom - ((v - low) / (high - low)) * plotHeight;

  const body: string[] = [];
  title.forEach((t, k) => body.push(text(6, 6 + (k + 1) * lineStep - 3, t, { size: label, fill: INK })));
  ticks.forEach((t, k) => {
    body.push(line(left, y(t), right, y(t), GRID, 0.5));
    body.push(text(left - 4, y(t) + small * 0.35, tickTexts[k], { anchor: "end", size: small, fill: MUTED }));
  });
  body.push(line(left, top, left, bottom, INK, 0.75));
  body.push(line(left, bottom, right, bottom, INK, 0.75));
  const radius = single ? 2 : 2.4;
  let belowAxis: number;

  if (values.plot === "covariate") {
    // Points against the covariate; the model's line (nuisance at its means) and its 95% confidence band.
    const xs = rows.map((i) => values.covariate[i]).filter(Number.isFinite);
    let xLow = Math.min(...xs);
    let xHigh = Math.max(...xs);
    const xPad = (xHigh - xLow) * 0.05 || 1;
    xLow -= xPad;
    xHigh += xPad;
    const plotLeft = left + 4;
    const x = (v: number) => plotLeft + ((v - xLow) / (xHigh - xLow)) * (right - plotLeft);
    let count = single ? 5 : 8;
    let xTicks = niceTicks(xLow, xHigh, count).filter((t) => t >= xLow && t <= xHigh);
    const fits = (list: number[]) => {
      const st = list.length > 1 ? list[1] - list[0] : 1;
      const spacing = list.length > 1 ? x(list[1]) - x(list[0]) : Infinity;
      return list.every((t) => textWidth(tickLabel(t, st), small) + 6 < spacing);
    };
    while (count > 2 && !fits(xTicks)) {
      count -= 1;
      xTicks = niceTicks(xLow, xHigh, count).filter((t) => t >= xLow && t <= xHigh);
    }
    const xStep = xTicks.length > 1 ? xTicks[1] - xTicks[0] : 1;
    // A tick whose label would leave the figure is left out.
    xTicks = xTicks.filter((t) => {
      const half = textWidth(tickLabel(t, xStep), small) / 2;
      return x(t) - half >= 2 && x(t) + half <= W - 2;
    });
    for (const t of xTicks) {
      body.push(line(x(t), bottom, x(t), bottom + 3, INK, 0.75));
      body.push(text(x(t), bottom + 4 + small, minusSign(tickLabel(t, xStep)), { anchor: "middle", size: small, fill: MUTED }));
    }
    const ordered = [...rows].filter((i) => Number.isFinite(values.covariate[i])).sort((a, b) => values.covariate[a] - values.covariate[b] || a - b);
    const upper = ordered.map((i) => `${n(x(values.covariate[i]))},${n(y(s.upper[i]))}`);
    const lower = ordered.map((i) => `${n(x(values.covariate[i]))},${n(y(s.lower[i]))}`).reverse();
    body.push(`<polygon points="${[...upper, ...lower].join(" ")}" fill="${PALETTE[0]}" fill-opacity="0.18" stroke="none"/>`);
    const first = ordered[0];
    const last = ordered[ordered.length - 1];
    body.push(line(x(values.covariate[first]), y(s.fitted[first]), x(values.covariate[last]), y(s.fitted[last]), PALETTE[0], 1.5));
    for (const i of ordered) body.push(circle(x(values.covariate[i]), y(s.adjusted[i]), radius, PALETTE[0], `fill-opacity="0.75" stroke="#ffffff" stroke-width="0.4"`));
    const axisTitle = wrap(`${values.variable ?? ""} (in the participants table's units)`, label, right - plotLeft);
    belowAxis = bottom + 4 + small + 4 + label;
    axisTitle.forEach((t, k) => body.push(text((plotLeft + right) / 2, belowAxis + k * lineStep, t, { anchor: "middle", size: label, fill: INK })));
    belowAxis += (axisTitle.length - 1) * lineStep;
  } else {
    // One slot per group (or one for a mean): jittered points, the box, and the model's mean with its interval.
    const slots =
      values.plot === "groups"
        ? values.levels.filter((level) => rows.some((i) => values.groups[i] === level)).map((level) => ({ name: level, members: rows.filter((i) => values.groups[i] === level) }))
        : [{ name: context.difference ? `every person (${context.difference.replace(" - ", " − ")})` : "every participant", members: rows }];
    const span = right - left;
    const slotWidth = Math.min(span / slots.length, 150);
    const start = left + (span - slotWidth * slots.length) / 2;
    if (values.plot === "mean") body.push(line(left, y(0), right, y(0), MUTED, 0.75, `stroke-dasharray="3 2"`));
    const nameRows = Math.max(...slots.map((slot) => slotNameLines(slot.name, slotWidth - 6, label).length));
    slots.forEach((slot, k) => {
      const centre = start + (k + 0.5) * slotWidth;
      const colour = PALETTE[k % PALETTE.length];
      const boxWidth = Math.min(slotWidth * 0.42, 44);
      const sorted = slot.members.map((i) => s.adjusted[i]).sort((a, b) => a - b);
      const q1 = sortedQuantile(sorted, 0.25);
      const median = sortedQuantile(sorted, 0.5);
      const q3 = sortedQuantile(sorted, 0.75);
      const reach = 1.5 * (q3 - q1);
      const whiskerLow = sorted.find((v) => v >= q1 - reach) ?? q1;
      const whiskerHigh = [...sorted].reverse().find((v) => v <= q3 + reach) ?? q3;
      const boxCentre = centre - boxWidth * 0.2;
      body.push(line(boxCentre, y(whiskerLow), boxCentre, y(q1), INK, 0.75));
      body.push(line(boxCentre, y(q3), boxCentre, y(whiskerHigh), INK, 0.75));
      body.push(line(boxCentre - boxWidth * 0.2, y(whiskerLow), boxCentre + boxWidth * 0.2, y(whiskerLow), INK, 0.75));
      body.push(line(boxCentre - boxWidth * 0.2, y(whiskerHigh), boxCentre + boxWidth * 0.2, y(whiskerHigh), INK, 0.75));
      body.push(rect(boxCentre - boxWidth / 2, y(q3), boxWidth, Math.max(0.5, y(q1) - y(q3)), colour, `fill-opacity="0.16" stroke="${INK}" stroke-width="0.75"`));
      body.push(line(boxCentre - boxWidth / 2, y(median), boxCentre + boxWidth / 2, y(median), INK, 1.5));
      slot.members.forEach((i, rank) => {
        body.push(circle(boxCentre + jitter(rank + 1) * boxWidth * 0.9, y(s.adjusted[i]), radius, colour, `fill-opacity="0.8" stroke="#ffffff" stroke-width="0.4"`));
      });
      // The model's mean (the same for every member of the slot) and its 95% interval, right of the box.
      const member = slot.members[0];
      const meanX = boxCentre + boxWidth / 2 + 7;
      body.push(line(meanX, y(s.lower[member]), meanX, y(s.upper[member]), INK, 1));
      body.push(line(meanX - 2.5, y(s.lower[member]), meanX + 2.5, y(s.lower[member]), INK, 1));
      body.push(line(meanX - 2.5, y(s.upper[member]), meanX + 2.5, y(s.upper[member]), INK, 1));
      const d = 3.2;
      const my = y(s.fitted[member]);
      body.push(`<path d="M${n(meanX)} ${n(my - d)}L${n(meanX + d)} ${n(my)}L${n(meanX)} ${n(my + d)}L${n(meanX - d)} ${n(my)}Z" fill="${INK}"/>`);
      // The slot's name (on up to two lines, clipped to the slot) over its size.
      const nameLines = slotNameLines(slot.name, slotWidth - 6, label);
      nameLines.forEach((t, line) => body.push(text(centre, bottom + 4 + label + line * lineStep, t, { anchor: "middle", size: label, fill: INK })));
      body.push(text(centre, bottom + 4 + label + nameRows * lineStep, `n = ${slot.members.length}`, { anchor: "middle", size: small, fill: MUTED }));
    });
    belowAxis = bottom + 4 + label + nameRows * lineStep;
  }

  // The key, flowed over lines that fit the width.
  const items: { mark: string; words: string }[] =
    values.plot === "covariate"
      ? [
          { mark: "point", words: unitWords(context) },
          { mark: "line", words: `model fit with its ${Math.round(values.level * 100)}% confidence band` },
        ]
      : [
          { mark: "point", words: unitWords(context) },
          { mark: "box", words: "median, quartiles; whiskers to 1.5\u00a0×\u00a0IQR" },
          { mark: "diamond", words: `model mean, ${Math.round(values.level * 100)}% CI` },
        ];
  // Beside the plot (two columns) or below it (one), each item's words wrapped to the room left.
  const keyLeft = keyBeside ? right + 18 : 6;
  let keyX = keyLeft;
  let keyY = keyBeside ? top + 10 : belowAxis + 8 + small;
  const keyStep = textHeight(small) + 3;
  items.forEach((item, index) => {
    const words = wrap(item.words, small, W - 6 - keyLeft - 12);
    const itemWidth = 12 + Math.max(...words.map((w) => textWidth(w, small)));
    if (index > 0 && (keyBeside || keyX + itemWidth > W - 6)) {
      keyX = keyLeft;
      keyY += keyStep + (keyBeside ? 3 : 0);
    }
    const cy = keyY - small * 0.35;
    if (item.mark === "point") body.push(circle(keyX + 4, cy, radius, PALETTE[0], `fill-opacity="0.8"`));
    else if (item.mark === "line") {
      body.push(rect(keyX, cy - 3, 9, 6, PALETTE[0], `fill-opacity="0.18"`));
      body.push(line(keyX, cy, keyX + 9, cy, PALETTE[0], 1.5));
    } else if (item.mark === "box") body.push(rect(keyX + 1, cy - 3.5, 7, 7, "#ffffff", `stroke="${INK}" stroke-width="0.75"`));
    else body.push(`<path d="M${n(keyX + 4)} ${n(cy - 3.2)}L${n(keyX + 7.2)} ${n(cy)}L${n(keyX + 4)} ${n(cy + 3.2)}L${n(keyX + 0.8)} ${n(cy)}Z" fill="${INK}"/>`);
    words.forEach((w, k) => body.push(text(keyX + 12, keyY + k * keyStep, w, { size: small, fill: MUTED })));
    keyY += (words.length - 1) * keyStep;
    keyX += itemWidth + 12;
  });
  const height = Math.max(keyY, belowAxis) + 6;
  return printSvgDocument(width, height, `Data behind subnetwork ${s.id}`, body);
}
