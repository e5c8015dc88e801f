import { clipToWidth, flowLegend, paragraph, TEXT_GAP, type LegendItem } from "../output/report/figures/labelLayout.js";
import { FONT_PT, printSvgDocument, widthPt, type PrintWidth } from "../output/report/figures/printSize.js";
import { line, n, text } from "../output/report/figures/svgElements.js";
import { ASCENT_EM, DESCENT_EM, textHeight, textWidth } from "../output/report/figures/textWidth.js";
import { POWER_METHODS, type PowerEstimate, type PowerMethod } from "./powerStudy.js";

/**
 * Power curves over sample size for a print width (85 or 180 mm; one SVG unit
 * is one point): one line per method with its 95% intervals as bars, the
 * target as a dashed line named at the right of the plot, the legend under
 * the axis. Methods differ in colour (Okabe & Ito's palette for colour-blind
 * readers: Okabe M, Ito K, 2008, Color Universal Design, jfly.uni-koeln.de),
 * in dash and in marker, so the figure also reads in grayscale.
 */
const PAD = 3;
const PLOT_HEIGHT: Record<PrintWidth, number> = { single: 130, double: 175 };

const STYLES: Record<PowerMethod, { colour: string; dash: string; marker: "circle" | "square" | "triangle" | "diamond" }> = {
  components: { colour: "#0072b2", dash: "", marker: "circle" },
  "max-t": { colour: "#d55e00", dash: "5 2.5", marker: "square" },
  fdr: { colour: "#009e73", dash: "1.6 1.6", marker: "triangle" },
  uncorrected: { colour: "#6e6e6e", dash: "0.8 2.4", marker: "diamond" },
};

function marker(kind: (typeof STYLES)[PowerMethod]["marker"], x: number, y: number, colour: string): string {
  const r = 2;
  switch (kind) {
    case "circle":
      return `<circle cx="${n(x)}" cy="${n(y)}" r="${n(r)}" fill="${colour}"/>`;
    case "square":
      return `<rect x="${n(x - r * 0.9)}" y="${n(y - r * 0.9)}" width="${n(r * 1.8)}" height="${n(r * 1.8)}" fill="${colour}"/>`;
    case "triangle":
      return `<path d="M${n(x)} ${n(y - r * 1.2)}L${n(x + r * 1.1)} ${n(y + r * 0.8)}H${n(x - r * 1.1)}z" fill="${colour}"/>`;
    default:
      return `<path d="M${n(x)} ${n(y - r * 1.2)}L${n(x + r * 1.1)} ${n(y)}L${n(x)} ${n(y + r * 1.2)}L${n(x - r * 1.1)} ${n(y)}z" fill="${colour}"/>`;
  }
}

export function powerCurveSvg(estimates: PowerEstimate[], target: number, width: PrintWidth): string {
  const W = widthPt(width);
  const small = FONT_PT.small;
  const axis = FONT_PT.label;
  const body: string[] = [];

  const title = paragraph(PAD, PAD + ASCENT_EM * FONT_PT.title, "Power by sample size", W - 2 * PAD, FONT_PT.title, { weight: "bold" });
  const subtitle = paragraph(
    PAD,
    title.lastBaseline + DESCENT_EM * FONT_PT.title + TEXT_GAP + ASCENT_EM * axis,
    "Share of simulated cohorts in which a planted edge is declared significant; bars: 95% Clopper–Pearson intervals",
    W - 2 * PAD,
    axis,
    { fill: "#444444" },
  );
  body.push(...title.elements, ...subtitle.elements);

  const targetLabel = `target ${Math.round(target * 100)}%`;
  const yTicks = [0, 0.2, 0.4, 0.6, 0.8, 1];
  const yLabel = (v: number) => `${Math.round(v * 100)}%`;
  const left = PAD + textHeight(axis) + 4 + Math.max(...yTicks.map((v) => textWidth(yLabel(v), small))) + 4;
  const right = PAD + textWidth(targetLabel, small) + 4;
  const plotTop = subtitle.lastBaseline + DESCENT_EM * axis + 6 + textHeight(small) / 2;
  const plotHeight = PLOT_HEIGHT[width];
  const plotBottom = plotTop + plotHeight;
  const plotWidth = W - left - right;

  const sizes = [...new Set(estimates.map((e) => e.perGroup))].sort((a, b) => a - b);
  const lo = sizes[0];
  const hi = sizes[sizes.length - 1];
  const inset = 8;
  const x = (size: number) => left + inset + (hi === lo ? 0.5 : (size - lo) / (hi - lo)) * (plotWidth - 2 * inset);
  const y = (p: number) => plotBottom - p * plotHeight;

  // Axes, grid and ticks.
  for (const v of yTicks) {
    body.push(line(left, y(v), left + plotWidth, y(v), "#e6e6e6", 0.5));
    body.push(text(left - 4, y(v) + ((ASCENT_EM - DESCENT_EM) / 2) * small, yLabel(v), { anchor: "end", size: small }));
  }
  body.push(line(left, plotBottom, left + plotWidth, plotBottom, "#333333", 0.7));
  body.push(line(left, plotTop, left, plotBottom, "#333333", 0.7));
  // Sample sizes as ticks; a label that would touch the one before it is left out (its tick stays).
  let lastEnd = -Infinity;
  for (const size of sizes) {
    body.push(line(x(size), plotBottom, x(size), plotBottom + 3, "#333333", 0.6));
    const half = textWidth(String(size), small) / 2;
    if (x(size) - half < lastEnd + 2 * TEXT_GAP) continue;
    lastEnd = x(size) + half;
    body.push(text(x(size), plotBottom + 4 + ASCENT_EM * small, String(size), { anchor: "middle", size: small }));
  }
  const xTitleBaseline = plotBottom + 4 + textHeight(small) + TEXT_GAP + ASCENT_EM * axis;
  body.push(text(left + plotWidth / 2, xTitleBaseline, clipToWidth("participants per group", plotWidth, axis), { anchor: "middle", size: axis }));
  body.push(text(PAD + ASCENT_EM * axis, (plotTop + plotBottom) / 2, "power", { anchor: "middle", size: axis, rotate: -90 }));

  // The target, named in the margin at the right of the plot, where nothing else is drawn.
  body.push(line(left, y(target), left + plotWidth, y(target), "#777777", 0.8, 'stroke-dasharray="3 2"'));
  body.push(text(left + plotWidth + 3, y(target) + ((ASCENT_EM - DESCENT_EM) / 2) * small, targetLabel, { size: small, fill: "#444444" }));

  // One curve per method, nudged sideways a little so that intervals at one size stay apart.
  const methods = POWER_METHODS.filter((m) => estimates.some((e) => e.method === m));
  const spread = Math.min(1.8, sizes.length > 1 ? (x(sizes[1]) - x(sizes[0])) / 12 : 1.8);
  methods.forEach((method, k) => {
    const style = STYLES[method];
    const nudge = (k - (methods.length - 1) / 2) * spread;
    const points = sizes
      .map((size) => estimates.find((e) => e.perGroup === size && e.method === method))
      .filter((e): e is PowerEstimate => e !== undefined);
    for (const e of points) {
      const at = x(e.perGroup) + nudge;
      body.push(line(at, y(e.low), at, y(e.high), style.colour, 0.6));
      body.push(line(at - 1.2, y(e.low), at + 1.2, y(e.low), style.colour, 0.6), line(at - 1.2, y(e.high), at + 1.2, y(e.high), style.colour, 0.6));
    }
    const path = points.map((e, i) => `${i === 0 ? "M" : "L"}${n(x(e.perGroup) + nudge)} ${n(y(e.power))}`).join("");
    if (points.length > 1) body.push(`<path d="${path}" fill="none" stroke="${style.colour}" stroke-width="1.3"${style.dash ? ` stroke-dasharray="${style.dash}"` : ""}/>`);
    for (const e of points) body.push(marker(style.marker, x(e.perGroup) + nudge, y(e.power), style.colour));
  });

  const items: LegendItem[] = methods.map((method) => {
    const style = STYLES[method];
    return {
      keyWidth: 16,
      label: method === "uncorrected" ? "uncorrected (reference only)" : method,
      key: (kx, middle) => [
        line(kx, middle, kx + 16, middle, style.colour, 1.3, style.dash ? `stroke-dasharray="${style.dash}"` : ""),
        marker(style.marker, kx + 8, middle, style.colour),
      ],
    };
  });
  const legend = flowLegend(items, left, xTitleBaseline + DESCENT_EM * axis + TEXT_GAP + 2 + ASCENT_EM * small, W - left - PAD, small);
  body.push(...legend.elements);
  return printSvgDocument(width, legend.lastBaseline + DESCENT_EM * small + PAD + 1, "Power by sample size", body);
}
