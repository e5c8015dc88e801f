import type { Region } from "../../../io/regions.js";
import { anatomyLayout, hasCoordinates, nameColumns, RING_NOTE } from "./anatomyLayout.js";
import { colourBar, header, markerKeys } from "./anatomyLegend.js";
import { scaleColour, statisticColour, statisticLimit } from "./colourScale.js";
import { divergingAt, divergingColour } from "./divergingScale.js";
import { FONT_PT, printSvgDocument, widthPt, type PrintWidth } from "./printSize.js";
import { circle } from "./svgElements.js";

/** One value per region for the nodal figure (strength per region, say). */
export interface NodalValues {
  /** What the values are, in words: "nodal strength". */
  measure: string;
  /** The statistic's name ("t" or "F") and its value per region (NaN where there is none). */
  statisticName: string;
  statistic: ArrayLike<number>;
  /** Regions whose family-wise p is at most alpha. */
  significant: ArrayLike<boolean>;
}

/**
 * Figure: one value per region drawn on the regions' plan and elevation (the
 * layout of the network figure, anatomyLayout). Each region is a disc whose
 * colour gives its statistic on a diverging red–blue scale (t; an F, never
 * negative, on the cividis scale from 0) and whose area grows with |statistic|;
 * significant regions carry a black ring and are named beside the plan, the
 * largest |statistic| first when a column is full; a region without a value
 * is a small open circle. Returns null when no region has a value.
 */
export function nodalFigure(regions: Region[], values: NodalValues, title: string, width: PrintWidth): string | null {
  const count = regions.length;
  const finite = (region: number) => Number.isFinite(values.statistic[region]);
  if (count === 0 || !regions.some((_, region) => finite(region))) return null;
  const signed = values.statisticName !== "F";
  const limit = statisticLimit(values.statistic);
  const colour = (v: number) => (signed ? divergingColour(v, limit) : statisticColour(v, limit, false));
  const significant = regions.map((_, region) => Boolean(values.significant[region]) && finite(region));
  const named = regions
    .map((_, region) => region)
    .filter((region) => significant[region])
    .sort((a, b) => Math.abs(values.statistic[b]) - Math.abs(values.statistic[a]) || a - b);
  const W = widthPt(width);
  const margin = 6;
  const noteSize = width === "single" ? FONT_PT.small : FONT_PT.label;
  const measure = values.measure.charAt(0).toUpperCase() + values.measure.slice(1);
  const note =
    named.length === 0
      ? `${measure}: no region significant.`
      : `${measure}: ${named.length} of ${count} region${count === 1 ? "" : "s"} significant (ringed and named).`;
  const head = header(margin, 4, W - 2 * margin, title, width === "single" ? FONT_PT.heading : FONT_PT.title, [note, ...(hasCoordinates(regions) ? [] : [RING_NOTE])], noteSize);
  const layout = anatomyLayout(regions, width, 4 + head.height + 8, named);
  // The largest disc: at most three quarters of the median distance between neighbouring regions in the plan, so crowded layouts stay readable.
  const largest = Math.max(2.4, Math.min(width === "single" ? 4.4 : 5.6, 0.75 * medianNeighbourDistance(regions.map((_, region) => layout.views[0].place(region)))));
  const radius = (v: number) => largest * Math.sqrt(Math.max(Math.abs(v) / limit, 0.06));
  const labels = nameColumns(layout, regions, named, new Map(named.map((region, k) => [region, k])));

  const body: string[] = [...head.elements];
  layout.views.forEach((view, k) => {
    body.push(...view.backdrop);
    if (k === 0) body.push(...labels.leaders);
    const byDepth = regions.map((_, region) => region).sort((a, b) => view.depth(a) - view.depth(b) || a - b);
    // Significant regions last, so no other disc hides their ring.
    for (const pass of [false, true]) {
      for (const region of byDepth) {
        if (significant[region] !== pass) continue;
        const [x, y] = view.place(region);
        const v = values.statistic[region];
        if (!finite(region)) body.push(circle(x, y, layout.dotRadius + 0.4, "none", 'stroke="#8a8a8a" stroke-width="0.5"'));
        else if (pass) body.push(circle(x, y, radius(v), colour(v), 'stroke="#000000" stroke-width="1.1"'));
        else body.push(circle(x, y, radius(v), colour(v), 'stroke="#5f5f5f" stroke-width="0.4"'));
      }
    }
  });
  body.push(...labels.names);

  const { legend } = layout;
  const size = layout.fontSize;
  let y = legend.y;
  const format = (v: number) => v.toFixed(1).replace("-", "−");
  const name = values.statisticName;
  const bar = signed
    ? colourBar(
        legend.x,
        y,
        Math.min(legend.width, 140),
        divergingAt,
        [
          [0, format(-limit)],
          [0.5, "0"],
          [1, format(limit)],
        ],
        `${name} (colour; disc area grows with |${name}|)`,
        size,
      )
    : colourBar(
        legend.x,
        y,
        Math.min(legend.width, 140),
        scaleColour,
        [
          [0, "0"],
          [1, format(limit)],
        ],
        `${name} (colour; disc area grows with ${name})`,
        size,
      );
  body.push(...bar.elements);
  y += bar.height + 4;
  const keys: Parameters<typeof markerKeys>[3] = [
    { marker: (cx, cy) => circle(cx, cy, size * 0.45, "#ffffff", 'stroke="#000000" stroke-width="1.1"'), text: "significant" },
    { marker: (cx, cy) => circle(cx, cy, size * 0.45, "#ffffff", 'stroke="#5f5f5f" stroke-width="0.4"'), text: "not significant" },
  ];
  if (regions.some((_, region) => !finite(region))) {
    keys.push({ marker: (cx, cy) => circle(cx, cy, layout.dotRadius + 0.4, "none", 'stroke="#8a8a8a" stroke-width="0.5"'), text: "no value" });
  }
  const key = markerKeys(legend.x, y, legend.width, keys, size);
  body.push(...key.elements);
  y += key.height;
  if (labels.leftOut > 0) {
    y += 2;
    const more = header(legend.x, y, legend.width, "", FONT_PT.small, [`${labels.leftOut} more significant region${labels.leftOut === 1 ? "" : "s"} not named (see the table).`], FONT_PT.small);
    body.push(...more.elements);
    y += more.height;
  }
  const height = Math.max(layout.bottom, y) + margin;
  return printSvgDocument(width, height, title, body);
}

/** The median over points of the distance to the nearest other point (Infinity for fewer than two). */
function medianNeighbourDistance(points: [number, number][]): number {
  if (points.length < 2) return Infinity;
  const nearest = points.map((p, i) => {
    let best = Infinity;
    points.forEach((q, j) => {
      if (i !== j) best = Math.min(best, Math.hypot(p[0] - q[0], p[1] - q[1]));
    });
    return best;
  });
  nearest.sort((a, b) => a - b);
  return nearest[Math.floor(nearest.length / 2)];
}
