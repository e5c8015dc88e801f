import type { Region } from "../../../io/regions.js";
import { FONT_PT, widthPt, type PrintWidth } from "./printSize.js";
import { roundedHull, verticalSpan, type Point } from "./outlineHull.js";
import { placeMarginLabels } from "./marginLabels.js";
import { regionOrder } from "./regionOrder.js";
import { n, text } from "./svgElements.js";
import { textWidth } from "./textWidth.js";

/**
 * The region layout shared by the network and nodal figures: a plan and an
 * elevation, as in a technical drawing. With coordinates, the plan shows the
 * regions from above (x across, the front at the top) and the elevation shows
 * them from behind (x across, up at the top), both at one scale and with the
 * participant's left on the left, so a region sits at the same x in both; on
 * one column the elevation stands under the plan, aligned with it, on two
 * columns beside it. Each view has its outline (the rounded hull of all its
 * regions), the midline x = 0 dashed, and L and R over its sides. Names are
 * set in two columns beside the plan, left-hemisphere regions (x < 0) on the
 * left and the others on the right (see marginLabels). Without coordinates
 * the regions stand on a ring ordered by hemisphere and system (regionOrder),
 * left-hemisphere regions on its left half when the table says which they are.
 *
 * Coordinates follow the usual neuroimaging convention (README, Regions): x
 * grows to the participant's right, y to the front, z upward, in mm.
 */
export interface AnatomyView {
  kind: "plan" | "elevation" | "ring";
  /** Where the view's outline and regions lie, [x, y, width, height] in pt. */
  box: [number, number, number, number];
  /** A region's position in the view, in pt. */
  place: (region: number) => [number, number];
  /** Drawing order: regions nearer the viewer have a larger depth and are drawn later. */
  depth: (region: number) => number;
  /** The path of an edge between two regions (a gentle arc). */
  edgePath: (a: number, b: number) => string;
  /** The outline, the midline, the L/R marks and the view's name, drawn first. */
  backdrop: string[];
  /** The name row's text boxes, [x, y, width, height]. */
  texts: [number, number, number, number][];
}

export interface AnatomyLayout {
  width: PrintWidth;
  widthPt: number;
  /** The view whose regions are named in the columns beside it comes first. */
  views: AnatomyView[];
  /** Columns for region names beside views[0]. */
  columns: { left: LabelColumn; right: LabelColumn };
  /** Which column names a region. */
  sideOf: (region: number) => "left" | "right";
  /** Where the legend goes: its left edge, top and the width it may take. */
  legend: { x: number; y: number; width: number };
  /** The lowest point of the views and name columns. */
  bottom: number;
  /** Font size of region names and legend text. */
  fontSize: number;
  /** Marker radii: a region of interest and any other region. */
  markRadius: number;
  dotRadius: number;
  hasCoordinates: boolean;
}

export interface LabelColumn {
  edge: number;
  width: number;
  top: number;
  bottom: number;
}

const MARGIN = 4;
const LEADER_GAP = 12;
const COLUMN_GAP = 16;
const RING_LEGEND = 150;

/** Sizes per print width: the widest name column, the largest plan height, the view name's row. */
const SIZES: Record<PrintWidth, { nameColumn: number; planHeight: number; font: number; mark: number; dot: number; pad: number }> = {
  single: { nameColumn: 56, planHeight: 270, font: FONT_PT.small, mark: 2.3, dot: 1.1, pad: 6 },
  double: { nameColumn: 96, planHeight: 330, font: FONT_PT.label, mark: 2.9, dot: 1.4, pad: 8 },
};

/** What the figures say under their title when the regions have no coordinates. */
export const RING_NOTE = "Regions on a circle (no coordinates given), grouped by hemisphere and system (grey arcs).";

export function hasCoordinates(regions: readonly Region[]): boolean {
  return regions.length > 0 && regions.every((r) => Number.isFinite(r.x) && Number.isFinite(r.y) && Number.isFinite(r.z));
}

/**
 * The layout at a print width, below a header of `top` pt. `named` are the
 * regions whose names will be set beside the plan (they size the name columns).
 */
export function anatomyLayout(regions: readonly Region[], width: PrintWidth, top: number, named: readonly number[]): AnatomyLayout {
  const size = SIZES[width];
  const W = widthPt(width);
  const coordinates = hasCoordinates(regions);
  // Which column names each region: with coordinates, by the sign of x (or the middle of the x range when
  // the regions do not straddle x = 0); on the ring, by the half it stands on.
  let sideOf: (region: number) => "left" | "right";
  let midline = 0;
  const ring = coordinates ? undefined : ringAngles(regions);
  if (coordinates) {
    const xs = regions.map((r) => r.x!);
    const [x0, x1] = [Math.min(...xs), Math.max(...xs)];
    midline = x0 < 0 && x1 > 0 ? 0 : (x0 + x1) / 2;
    sideOf = (region) => (regions[region].x! < midline ? "left" : "right");
  } else {
    sideOf = (region) => (Math.cos(ring!.angle[region]) < -1e-9 ? "left" : "right");
  }
  // Each name column as wide as its widest name, up to the width's limit.
  const columnWidth = (side: "left" | "right") =>
    Math.min(size.nameColumn, Math.max(0, ...named.filter((region) => sideOf(region) === side).map((region) => textWidth(regions[region].label, size.font))));
  const leftColumn = columnWidth("left");
  const rightColumn = columnWidth("right");
  const viewTitle = size.font + 5;
  // Horizontal bands: [names | view | names] and, on two columns, a second view or the legend to the right.
  const sides = leftColumn + rightColumn + 2 * LEADER_GAP;
  // Without coordinates, two columns keep a band of RING_LEGEND pt on the right for the legend.
  const mainWidth =
    width === "single" ? W - 2 * MARGIN - sides : coordinates ? (W - 2 * MARGIN - sides - COLUMN_GAP) / 2 : W - 2 * MARGIN - sides - COLUMN_GAP - RING_LEGEND;
  const mainLeft = MARGIN + leftColumn + LEADER_GAP;
  const rightBand = mainLeft + mainWidth + rightColumn + LEADER_GAP + COLUMN_GAP;
  const viewTop = top + viewTitle;

  const views: AnatomyView[] = [];
  let planBottom: number;
  let secondBottom = viewTop;
  if (coordinates) {
    const xs = regions.map((r) => r.x!);
    const ys = regions.map((r) => r.y!);
    const zs = regions.map((r) => r.z!);
    const [x0, x1] = [Math.min(...xs), Math.max(...xs)];
    const [y0, y1] = [Math.min(...ys), Math.max(...ys)];
    const [z0, z1] = [Math.min(...zs), Math.max(...zs)];
    const fallback = Math.max(x1 - x0, y1 - y0, z1 - z0) || 1;
    const xr = x1 - x0 || fallback;
    const yr = y1 - y0 || fallback;
    const zr = z1 - z0 || fallback;
    const pad = size.pad;
    let scale = (mainWidth - 2 * pad) / xr;
    if (yr * scale + 2 * pad > size.planHeight) scale = (size.planHeight - 2 * pad) / yr;
    const drawnWidth = xr * scale + 2 * pad;
    const planLeft = mainLeft + (mainWidth - drawnWidth) / 2;
    const planHeight = yr * scale + 2 * pad;
    const elevationHeight = zr * scale + 2 * pad;
    const xAt = (left: number) => (x: number) => left + pad + (x - (x0 + x1) / 2 + xr / 2) * scale;
    const planX = xAt(planLeft);
    const planYTop = viewTop;
    const plan = anatomicalView(
      "plan",
      [planLeft, planYTop, drawnWidth, planHeight],
      (region) => [planX(xs[region]), planYTop + pad + ((y0 + y1) / 2 + yr / 2 - ys[region]) * scale],
      (region) => zs[region],
      planX(midline),
      midline === 0,
      "from above, front at top",
      size.font,
      pad * 0.8,
      regions.length,
    );
    views.push(plan);
    planBottom = planYTop + planHeight;
    const elevationLeft = width === "single" ? planLeft : rightBand + (mainWidth - drawnWidth) / 2;
    const elevationTop = width === "single" ? planBottom + 8 + viewTitle : viewTop;
    const elevationX = xAt(elevationLeft);
    views.push(
      anatomicalView(
        "elevation",
        [elevationLeft, elevationTop, drawnWidth, elevationHeight],
        (region) => [elevationX(xs[region]), elevationTop + pad + ((z0 + z1) / 2 + zr / 2 - zs[region]) * scale],
        (region) => -ys[region],
        elevationX(midline),
        midline === 0,
        "from behind",
        size.font,
        pad * 0.8,
        regions.length,
      ),
    );
    secondBottom = elevationTop + elevationHeight;
  } else {
    const view = ringView(regions, ring!, [mainLeft, viewTop, mainWidth, Math.min(mainWidth, size.planHeight)], size.font);
    views.push(view);
    planBottom = viewTop + view.box[3];
  }

  const first = views[0].box;
  const columnTop = first[1] + size.font * 0.7;
  const columnBottom = first[1] + first[3] - size.font * 0.7;
  const columns = {
    left: { edge: mainLeft - LEADER_GAP, width: leftColumn, top: columnTop, bottom: columnBottom },
    right: { edge: mainLeft + mainWidth + LEADER_GAP, width: rightColumn, top: columnTop, bottom: columnBottom },
  };
  const legend =
    width === "single"
      ? { x: MARGIN + 2, y: Math.max(planBottom, secondBottom) + 12, width: W - 2 * MARGIN - 4 }
      : { x: rightBand, y: (views.length > 1 ? secondBottom : top) + 12, width: W - MARGIN - rightBand };
  return {
    width,
    widthPt: W,
    views,
    columns,
    sideOf,
    legend,
    bottom: Math.max(planBottom, secondBottom),
    fontSize: size.font,
    markRadius: size.mark,
    dotRadius: size.dot,
    hasCoordinates: coordinates,
  };
}

/** Names the chosen regions in the columns beside the first view; `rank` orders who is kept when a column is full. */
export function nameColumns(layout: AnatomyLayout, regions: readonly Region[], chosen: readonly number[], rank: Map<number, number>) {
  const view = layout.views[0];
  const leaders: string[] = [];
  const names: string[] = [];
  const boxes: [number, number, number, number][] = [];
  let leftOut = 0;
  for (const side of ["left", "right"] as const) {
    const column = layout.columns[side];
    const labels = chosen.filter((region) => layout.sideOf(region) === side).map((region) => ({ label: regions[region].label, at: view.place(region), rank: rank.get(region) ?? 0 }));
    const placed = placeMarginLabels(labels, { side, edge: column.edge, width: column.width, top: column.top, bottom: column.bottom, size: layout.fontSize });
    leaders.push(...placed.leaders);
    names.push(...placed.names);
    boxes.push(...placed.boxes);
    leftOut += placed.leftOut.length;
  }
  return { leaders, names, boxes, leftOut };
}

/** An arc from p to q bowed away from `centre` by a tenth of its length (straight when the points coincide). */
function bowedPath(p: Point, q: Point, centre: Point): string {
  const dx = q[0] - p[0];
  const dy = q[1] - p[1];
  const length = Math.hypot(dx, dy);
  const mx = (p[0] + q[0]) / 2;
  const my = (p[1] + q[1]) / 2;
  if (length === 0) return `M${n(p[0])} ${n(p[1])}L${n(q[0])} ${n(q[1])}`;
  let nx = -dy / length;
  let ny = dx / length;
  if (nx * (mx - centre[0]) + ny * (my - centre[1]) < 0) {
    nx = -nx;
    ny = -ny;
  }
  const bow = 0.1 * length;
  return `M${n(p[0])} ${n(p[1])}Q${n(mx + 2 * bow * nx)} ${n(my + 2 * bow * ny)} ${n(q[0])} ${n(q[1])}`;
}

function anatomicalView(
  kind: "plan" | "elevation",
  box: [number, number, number, number],
  place: (region: number) => [number, number],
  depth: (region: number) => number,
  midlineX: number,
  hasMidline: boolean,
  name: string,
  font: number,
  margin: number,
  count: number,
): AnatomyView {
  const points = Array.from({ length: count }, (_, region) => place(region));
  const outline = roundedHull(points, margin);
  const centre: Point = [box[0] + box[2] / 2, box[1] + box[3] / 2];
  const backdrop: string[] = [];
  backdrop.push(
    `<path d="${outline.map((p, k) => `${k === 0 ? "M" : "L"}${n(p[0])} ${n(p[1])}`).join("")}Z" fill="#f1f1ef" stroke="#a9a9a6" stroke-width="0.7" stroke-linejoin="round" pointer-events="none"/>`,
  );
  const span = hasMidline ? verticalSpan(outline, midlineX) : null;
  if (span) {
    backdrop.push(
      `<line x1="${n(midlineX)}" y1="${n(span[0])}" x2="${n(midlineX)}" y2="${n(span[1])}" stroke="#c2c2bf" stroke-width="0.6" stroke-dasharray="2 2" pointer-events="none"/>`,
    );
  }
  const { marks, texts } = viewTitle(box, name, font, true);
  backdrop.push(...marks);
  return { kind, box, place, depth, edgePath: (a, b) => bowedPath(place(a), place(b), centre), backdrop, texts };
}

/** The row over a view: L at its left, its name in the middle, R at its right (L and R left out when `sides` is false). */
function viewTitle(box: [number, number, number, number], name: string, font: number, sides: boolean) {
  const y = box[1] - 4;
  const marks: string[] = [];
  const texts: [number, number, number, number][] = [];
  const add = (x: number, content: string, anchor: "start" | "middle" | "end", bold: boolean) => {
    const w = textWidth(content, font, bold);
    const left = anchor === "start" ? x : anchor === "end" ? x - w : x - w / 2;
    texts.push([left, y - font * 0.9, w, font * 1.15]);
    marks.push(text(x, y, content, { anchor, size: font, weight: bold ? "bold" : undefined, fill: bold ? "#1a1a1a" : "#555555" }));
  };
  const sideWidth = textWidth("L", font, true) + 3;
  if (sides) {
    add(box[0], "L", "start", true);
    add(box[0] + box[2], "R", "end", true);
  }
  // The view's name, shortened to its first words when the full name does not fit between L and R.
  const words = name.split(",")[0];
  const fitting = [name, words, words.split(" ").slice(-1)[0]].find((candidate) => textWidth(candidate, font) <= box[2] - 2 * sideWidth);
  if (fitting) add(box[0] + box[2] / 2, fitting, "middle", false);
  return { marks, texts };
}

const LEFT = /^(l|lh|left)$/i;
const RIGHT = /^(r|rh|right)$/i;

/**
 * The fallback without coordinates: regions on a ring in the order of
 * regionOrder. When every region's hemisphere is left or right, the left
 * hemisphere's regions run down the left half from the top and the right
 * hemisphere's down the right half, so homologous groups face each other;
 * otherwise the ring runs clockwise from the top.
 */
interface RingAngles {
  order: number[];
  blocks: ReturnType<typeof regionOrder>["blocks"];
  /** Each region's angle on the ring (radians, SVG orientation: −π/2 is the top). */
  angle: Float64Array;
  step: number;
  /** Whether every region's hemisphere says left or right (then L and R are marked). */
  sided: boolean;
}

function ringAngles(regions: readonly Region[]): RingAngles {
  const { order, blocks } = regionOrder([...regions]);
  const step = (2 * Math.PI) / Math.max(regions.length, 1);
  const hemispheres = new Set(regions.map((r) => r.hemisphere ?? ""));
  const sided = [...hemispheres].every((h) => LEFT.test(h) || RIGHT.test(h)) && [...hemispheres].some((h) => LEFT.test(h));
  const angle = new Float64Array(regions.length);
  let leftCount = 0;
  let rightCount = 0;
  for (const region of order) {
    if (sided && LEFT.test(regions[region].hemisphere ?? "")) angle[region] = -Math.PI / 2 - step * (leftCount++ + 0.5);
    else angle[region] = -Math.PI / 2 + step * (rightCount++ + 0.5);
  }
  return { order, blocks, angle, step, sided };
}

function ringView(regions: readonly Region[], ring: RingAngles, area: [number, number, number, number], font: number): AnatomyView {
  const { order, blocks, angle, step, sided } = ring;
  const diameter = Math.min(area[2], area[3]);
  const box: [number, number, number, number] = [area[0] + (area[2] - diameter) / 2, area[1], diameter, diameter];
  const centre: Point = [box[0] + diameter / 2, box[1] + diameter / 2];
  const radius = diameter / 2 - 8;
  const at = (a: number, r: number): Point => [centre[0] + r * Math.cos(a), centre[1] + r * Math.sin(a)];
  const place = (region: number): [number, number] => [...at(angle[region], radius)] as [number, number];
  const backdrop: string[] = [];
  backdrop.push(
    `<circle cx="${n(centre[0])}" cy="${n(centre[1])}" r="${n(radius + 5)}" fill="#f1f1ef" stroke="#a9a9a6" stroke-width="0.7" pointer-events="none"/>`,
  );
  // Each hemisphere-and-system group as an arc on the ring's edge, alternating in shade.
  const grouped = regions.some((r) => r.hemisphere !== undefined || r.system !== undefined);
  if (grouped && blocks.length > 1) {
    blocks.forEach((block, k) => {
      const members = order.slice(block.start, block.end).map((region) => angle[region]);
      const from = Math.min(...members) - 0.35 * step;
      const to = Math.max(...members) + 0.35 * step;
      const r = radius + 5;
      const [ax, ay] = at(from, r);
      const [bx, by] = at(to, r);
      backdrop.push(
        `<path d="M${n(ax)} ${n(ay)}A${n(r)} ${n(r)} 0 ${to - from > Math.PI ? 1 : 0} 1 ${n(bx)} ${n(by)}" fill="none" stroke="${k % 2 === 0 ? "#6f6f6f" : "#bdbdbd"}" stroke-width="2.4" pointer-events="none"/>`,
      );
    });
  }
  const { marks, texts } = viewTitle(box, "ring of regions", font, sided);
  backdrop.push(...marks);
  return {
    kind: "ring",
    box,
    place,
    depth: () => 0,
    // Chords bow toward the centre: long ones stay nearly straight, short ones curve gently inward.
    edgePath: (a, b) => {
      const p = place(a);
      const q = place(b);
      const mx = centre[0] + ((p[0] + q[0]) / 2 - centre[0]) * 0.6;
      const my = centre[1] + ((p[1] + q[1]) / 2 - centre[1]) * 0.6;
      return `M${n(p[0])} ${n(p[1])}Q${n(mx)} ${n(my)} ${n(q[0])} ${n(q[1])}`;
    },
    backdrop,
    texts,
  };
}
