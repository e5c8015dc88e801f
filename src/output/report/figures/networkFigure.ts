import type { Region } from "../../../io/regions.js";
import { hubRegions } from "../hubRegions.js";
import type { ContrastResults } from "../loadResults.js";
import { plain } from "../printNumbers.js";
import type { SignificantEdges } from "../significantEdges.js";
import { anatomyLayout, hasCoordinates, nameColumns, RING_NOTE } from "./anatomyLayout.js";
import { colourBar, header, markerKeys } from "./anatomyLegend.js";
import { scaleColour, statisticColour, statisticLimit } from "./colourScale.js";
import { FONT_PT, printSvgDocument, widthPt, type PrintWidth } from "./printSize.js";
import { circle } from "./svgElements.js";

/**
 * Figure: the significant edges drawn on the regions' plan and elevation
 * (anatomyLayout). Every region is a small grey dot inside the outline of all
 * regions; each edge of the finding is a gentle arc coloured by its statistic
 * on the contrast's cividis scale over a dark casing (so light colours stay
 * visible), the strongest drawn last; the regions of the finding are dark
 * dots, named in the columns beside the plan (left-hemisphere regions on the
 * left), the regions with most edges first when a column is full. Each edge
 * path carries `data-edge` (its row in edges.tsv) and the casing
 * `data-casing`, for report.html's script. Returns null when there is nothing
 * to draw.
 */
export function networkFigure(contrast: ContrastResults, regions: Region[], finding: SignificantEdges, alpha: number, width: PrintWidth): string | null {
  if (finding.edges.length === 0) return null;
  const { edges } = contrast;
  const limit = statisticLimit(edges.statistic);
  const signed = contrast.summary.statistic !== "F";
  const stat = signed ? "t" : "F";
  const hubs = hubRegions(edges, finding.edges, false);
  const inFinding = new Set(hubs.map((h) => h.region));
  const W = widthPt(width);
  const margin = 6;
  const small = FONT_PT.small;
  const noteSize = width === "single" ? FONT_PT.small : FONT_PT.label;

  const what = finding.kind === "components" ? "significant subnetworks" : `edges with q_FDR ≤ ${plain(alpha)}`;
  const positive = finding.edges.filter((e) => edges.statistic[e] > 0).length;
  const count = `${finding.edges.length} edge${finding.edges.length === 1 ? "" : "s"} among ${hubs.length} regions`;
  const bySign = signed ? ` (${positive} with t > 0, ${finding.edges.length - positive} with t < 0)` : "";
  const head = header(margin, 4, W - 2 * margin, `${contrast.summary.name}: ${what}`, width === "single" ? FONT_PT.heading : FONT_PT.title, [`${count}${bySign}.`, ...(hasCoordinates(regions) ? [] : [RING_NOTE])], noteSize);
  const layout = anatomyLayout(regions, width, 4 + head.height + 8, hubs.map((h) => h.region));

  const body: string[] = [...head.elements];
  const drawOrder = [...finding.edges].sort((a, b) => Math.abs(edges.statistic[a]) - Math.abs(edges.statistic[b]) || a - b);
  const casing = width === "single" ? 2.5 : 3.1;
  const stroke = width === "single" ? 1.4 : 1.8;
  const rank = new Map(hubs.map((h, k) => [h.region, k]));
  const named = nameColumns(layout, regions, hubs.map((h) => h.region), rank);
  layout.views.forEach((view, k) => {
    body.push(...view.backdrop);
    if (k === 0) body.push(...named.leaders);
    const byDepth = regions.map((_, region) => region).sort((a, b) => view.depth(a) - view.depth(b) || a - b);
    body.push('<g pointer-events="none">');
    for (const region of byDepth) {
      if (inFinding.has(region)) continue;
      const [x, y] = view.place(region);
      body.push(circle(x, y, layout.dotRadius, "#9b9b98"));
    }
    body.push("</g>");
    for (const e of drawOrder) {
      const d = view.edgePath(edges.regionA[e], edges.regionB[e]);
      // data-edge: the edge's row in edges.tsv, for report.html's script; data-casing marks the dark under-stroke.
      body.push(`<path d="${d}" fill="none" stroke="#262626" stroke-width="${casing}" stroke-linecap="round" data-edge="${e}" data-casing=""/>`);
      body.push(`<path d="${d}" fill="none" stroke="${statisticColour(edges.statistic[e], limit, signed)}" stroke-width="${stroke}" stroke-linecap="round" data-edge="${e}"/>`);
    }
    body.push('<g pointer-events="none">');
    for (const region of byDepth) {
      if (!inFinding.has(region)) continue;
      const [x, y] = view.place(region);
      body.push(circle(x, y, layout.markRadius, "#1a1a1a", 'stroke="#ffffff" stroke-width="0.6"'));
    }
    body.push("</g>");
  });
  body.push(...named.names);

  // Legend: the colour bar, the markers, and how many regions of the finding went unnamed.
  const { legend } = layout;
  const size = layout.fontSize;
  let y = legend.y;
  const barWidth = Math.min(legend.width, width === "single" ? 150 : 140);
  const format = (v: number) => v.toFixed(1).replace("-", "−");
  const ticks: [number, string][] = signed
    ? [
        [0, format(-limit)],
        [0.5, "0"],
        [1, format(limit)],
      ]
    : [
        [0, "0"],
        [1, format(limit)],
      ];
  const bar = colourBar(legend.x, y, barWidth, scaleColour, ticks, `${stat} of each edge (colour)`, size);
  body.push(...bar.elements);
  y += bar.height + 4;
  const keys = markerKeys(
    legend.x,
    y,
    legend.width,
    [
      { marker: (cx, cy) => circle(cx, cy, layout.markRadius, "#1a1a1a"), text: "region of the finding" },
      { marker: (cx, cy) => circle(cx, cy, layout.dotRadius, "#9b9b98"), text: "other region" },
    ],
    size,
  );
  body.push(...keys.elements);
  y += keys.height;
  if (named.leftOut > 0) {
    y += 2;
    const note = header(legend.x, y, legend.width, "", small, [`${named.leftOut} more region${named.leftOut === 1 ? "" : "s"} of the finding not named (see the hubs table).`], small);
    body.push(...note.elements);
    y += note.height;
  }
  const height = Math.max(layout.bottom, y) + margin;
  return printSvgDocument(width, height, `Significant edges of ${contrast.summary.name} drawn on the regions`, body);
}
