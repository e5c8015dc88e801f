import type { Region } from "../../../io/regions.js";
import type { PrintWidth } from "./printSize.js";
import { hubRegions } from "../hubRegions.js";
import type { ContrastResults } from "../loadResults.js";
import { plain } from "../printNumbers.js";
import type { SignificantEdges } from "../significantEdges.js";
import { colourBar } from "./colourBar.js";
import { statisticColour, statisticLimit } from "./colourScale.js";
import { regionOrder } from "./regionOrder.js";
import { circle, clip, n, rect, svgDocument, text } from "./svgElements.js";

/**
 * Figure: the significant edges drawn on the regions. With coordinates, three
 * orthogonal projections on one shared scale (from above: x across, y up; from
 * the side: y across, z up; from the front: x across, z up); without them, a
 * circle of regions in the drawing order of regionOrder. Every region is a
 * small grey dot; each edge is coloured by its t on the contrast's cividis
 * scale over a dark casing (so light colours stay visible on white), the
 * strongest drawn last; each region of the finding is a dark disc whose area
 * grows with its degree. Returns null when there is nothing to draw.
 */
const PANEL = 250;
const GAP = 22;
const SIDE = 20;
const TITLE = 50;
const MAX_NUMBERED = 99;
const KEY_COLUMNS = 4;
const KEY_ROW = 13;

interface Layout {
  /** Panels: where each region lands in each, and the panel's caption and frame. */
  panels: { caption: string; x: number; y: number; size: number; place: (region: number) => [number, number] }[];
  width: number;
  height: number;
  curved: boolean;
  centre?: [number, number];
  /** Drawn under everything else in the first panel (the circle's system arcs). */
  decorations: string[];
}

export function networkFigure(contrast: ContrastResults, regions: Region[], finding: SignificantEdges, alpha: number, width: PrintWidth): string | null {
  void width; // drawn at one size until this figure is laid out for print
  if (finding.edges.length === 0) return null;
  const { edges } = contrast;
  const limit = statisticLimit(edges.statistic);
  const signed = contrast.summary.statistic !== "F";
  const stat = signed ? "t" : "F";
  const hasCoordinates = regions.length > 0 && regions.every((r) => r.x !== undefined && r.y !== undefined && r.z !== undefined);
  const layout = hasCoordinates ? projectionLayout(regions) : circleLayout(regions);
  const hubs = hubRegions(edges, finding.edges, false);
  const degree = new Map(hubs.map((h) => [h.region, h.degree]));
  const maxDegree = Math.max(...hubs.map((h) => h.degree));
  const radius = (d: number) => 4 + 1.8 * Math.sqrt(d);
  // Regions of the finding are numbered by hub rank in every panel, with a key of their labels below.
  const numbered = hubs.length <= MAX_NUMBERED;
  const number = new Map(hubs.map((h, k) => [h.region, k + 1]));
  const drawOrder = [...finding.edges].sort((a, b) => Math.abs(edges.statistic[a]) - Math.abs(edges.statistic[b]) || a - b);

  const body: string[] = [];
  const what = finding.kind === "components" ? "significant subnetworks" : `edges with q_FDR ≤ ${plain(alpha)}`;
  body.push(text(SIDE, 20, `The ${what}: ${contrast.summary.name}`, { size: 13, weight: "bold" }));
  body.push(
    text(SIDE, 37, `${finding.edges.length} edge${finding.edges.length > 1 ? "s" : ""} among ${hubs.length} regions; edge colour: ${stat}; node size: degree within the finding${numbered ? "; numbers: see the key" : ""}`, {
      size: 10,
      fill: "#444444",
    }),
  );

  layout.panels.forEach((panel, k) => {
    body.push(rect(panel.x, panel.y, panel.size, panel.size, "#fafafa", 'stroke="#cccccc" stroke-width="0.8"'));
    body.push(text(panel.x + panel.size / 2, panel.y + panel.size + 15, panel.caption, { anchor: "middle", size: 10 }));
    if (k === 0) body.push(...layout.decorations);
    regions.forEach((_, region) => {
      const [x, y] = panel.place(region);
      body.push(circle(x, y, 1.6, "#c4c4c4"));
    });
    const segment = (a: number, b: number) => {
      const [x1, y1] = panel.place(a);
      const [x2, y2] = panel.place(b);
      if (!layout.curved || !layout.centre) return `M${n(x1)} ${n(y1)}L${n(x2)} ${n(y2)}`;
      const [cx, cy] = layout.centre;
      // The control point lies between the chord's midpoint and the centre: long chords stay nearly
      // straight, short ones bow gently inward instead of looping.
      const mx = cx + ((x1 + x2) / 2 - cx) * 0.6;
      const my = cy + ((y1 + y2) / 2 - cy) * 0.6;
      return `M${n(x1)} ${n(y1)}Q${n(mx)} ${n(my)} ${n(x2)} ${n(y2)}`;
    };
    for (const e of drawOrder) {
      const d = segment(edges.regionA[e], edges.regionB[e]);
      // data-edge: the edge's row in edges.tsv, for report.html's script; data-casing marks the dark under-stroke.
      body.push(`<path d="${d}" fill="none" stroke="#262626" stroke-width="3.4" stroke-linecap="round" data-edge="${e}" data-casing=""/>`);
      body.push(`<path d="${d}" fill="none" stroke="${statisticColour(edges.statistic[e], limit, signed)}" stroke-width="2" stroke-linecap="round" data-edge="${e}"/>`);
    }
    const nodes = [...degree.keys()].sort((a, b) => degree.get(a)! - degree.get(b)! || a - b);
    for (const region of nodes) {
      const [x, y] = panel.place(region);
      body.push(circle(x, y, radius(degree.get(region)!), "#2b2b2b", 'stroke="#ffffff" stroke-width="0.9"'));
    }
    if (numbered) {
      for (const region of nodes) {
        const [x, y] = panel.place(region);
        body.push(text(x, y + 2.6, String(number.get(region)), { anchor: "middle", size: 7.5, weight: "bold", fill: "#ffffff" }));
      }
    }
  });

  // Legends: colour bar and node sizes, then the key of numbered regions.
  const keyRows = numbered ? Math.ceil(hubs.length / KEY_COLUMNS) : 0;
  const height = layout.height + (keyRows > 0 ? keyRows * KEY_ROW + 16 : 0);
  const legendY = layout.height - 42;
  body.push(...colourBar(SIDE + 10, legendY, 200, 10, limit, `${stat}-statistic (edge colour)`, signed));
  const sizes = [...new Set([1, Math.round((1 + maxDegree) / 2), maxDegree])].filter((d) => d >= 1);
  let x = SIDE + 270;
  body.push(text(x, legendY - 4, "degree (node size)", { size: 10 }));
  for (const d of sizes) {
    const r = radius(d);
    body.push(circle(x + r, legendY + 6, r, "#2b2b2b", 'stroke="#ffffff" stroke-width="0.9"'));
    body.push(text(x + 2 * r + 3, legendY + 9.5, String(d), { size: 9 }));
    x += 2 * r + 22;
  }
  if (numbered) {
    const columnWidth = (layout.width - 2 * SIDE) / KEY_COLUMNS;
    hubs.forEach((hub, k) => {
      const kx = SIDE + Math.floor(k / keyRows) * columnWidth;
      const ky = layout.height + 8 + (k % keyRows) * KEY_ROW;
      body.push(text(kx + 14, ky, String(k + 1), { anchor: "end", size: 9, weight: "bold" }));
      body.push(text(kx + 19, ky, clip(`${regions[hub.region].label} (degree ${hub.degree})`, Math.floor(columnWidth / 5.6) - 4), { size: 9 }));
    });
  }
  return svgDocument(layout.width, height, `Significant edges of ${contrast.summary.name} drawn on the regions`, body);
}

function projectionLayout(regions: Region[]): Layout {
  const xs = regions.map((r) => r.x!);
  const ys = regions.map((r) => r.y!);
  const zs = regions.map((r) => r.z!);
  const span = (v: number[]) => [Math.min(...v), Math.max(...v)] as const;
  const [x0, x1] = span(xs);
  const [y0, y1] = span(ys);
  const [z0, z1] = span(zs);
  const range = Math.max(x1 - x0, y1 - y0, z1 - z0) || 1;
  const padding = 18;
  const scale = (PANEL - 2 * padding) / range;
  const panelAt = (k: number) => SIDE + k * (PANEL + GAP);
  const top = TITLE + 6;
  // Maps (horizontal, vertical) data values into panel k, centred, vertical axis pointing up.
  const project =
    (k: number, h: (i: number) => number, v: (i: number) => number, hRange: readonly [number, number], vRange: readonly [number, number]) =>
    (region: number): [number, number] => {
      const cx = panelAt(k) + PANEL / 2 + (h(region) - (hRange[0] + hRange[1]) / 2) * scale;
      const cy = top + PANEL / 2 - (v(region) - (vRange[0] + vRange[1]) / 2) * scale;
      return [cx, cy];
    };
  return {
    panels: [
      { caption: "from above (x across, y up)", x: panelAt(0), y: top, size: PANEL, place: project(0, (i) => xs[i], (i) => ys[i], [x0, x1], [y0, y1]) },
      { caption: "from the side (y across, z up)", x: panelAt(1), y: top, size: PANEL, place: project(1, (i) => ys[i], (i) => zs[i], [y0, y1], [z0, z1]) },
      { caption: "from the front (x across, z up)", x: panelAt(2), y: top, size: PANEL, place: project(2, (i) => xs[i], (i) => zs[i], [x0, x1], [z0, z1]) },
    ],
    width: SIDE * 2 + 3 * PANEL + 2 * GAP,
    height: top + PANEL + 90,
    curved: false,
    decorations: [],
  };
}

function circleLayout(regions: Region[]): Layout {
  const { position, blocks } = regionOrder(regions);
  const size = 2 * PANEL;
  const top = TITLE + 6;
  const left = SIDE + 150;
  const centre: [number, number] = [left + size / 2, top + size / 2];
  const r = size / 2 - 40;
  const angle = (p: number) => -Math.PI / 2 + (2 * Math.PI * p) / Math.max(regions.length, 1);
  const at = (a: number, radius: number) => [centre[0] + radius * Math.cos(a), centre[1] + radius * Math.sin(a)];
  const decorations: string[] = [];
  const grouped = regions.some((region) => region.hemisphere !== undefined || region.system !== undefined);
  if (grouped) {
    blocks.forEach((block, k) => {
      const from = angle(block.start - 0.4);
      const to = angle(block.end - 0.6);
      const [ax, ay] = at(from, r + 9);
      const [bx, by] = at(to, r + 9);
      const large = to - from > Math.PI ? 1 : 0;
      const shade = k % 2 === 0 ? "#7a7a7a" : "#bdbdbd";
      decorations.push(`<path d="M${n(ax)} ${n(ay)}A${n(r + 9)} ${n(r + 9)} 0 ${large} 1 ${n(bx)} ${n(by)}" fill="none" stroke="${shade}" stroke-width="4"/>`);
      if (to - from >= 0.3) {
        const [lx, ly] = at((from + to) / 2, r - 18);
        const label = [block.hemisphere, block.system].filter((v) => v !== undefined).join(" · ");
        decorations.push(text(lx, ly + 3, clip(label, 16), { anchor: "middle", size: 8, fill: "#555555" }));
      }
    });
  }
  return {
    panels: [
      {
        caption: "regions on a circle, ordered by hemisphere and system (no coordinates given)",
        x: left,
        y: top,
        size,
        place: (region) => [centre[0] + r * Math.cos(angle(position[region])), centre[1] + r * Math.sin(angle(position[region]))],
      },
    ],
    width: left + size + 150 + SIDE,
    height: top + size + 90,
    curved: true,
    centre,
    decorations,
  };
}
