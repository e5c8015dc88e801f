import { n, text } from "./svgElements.js";
import { textWidth } from "./textWidth.js";

/**
 * Region names set in a column beside a view, each joined to its region by a
 * thin leader line. Names keep the vertical order of their regions and sit as
 * close to their region's height as the column allows; they never overlap,
 * since each takes a slot of at least one line's height. When more names want
 * a column than it has slots, the most important (lowest `rank`) are kept and
 * the rest reported as left out.
 */
export interface MarginLabel {
  /** The name to set (shortened with an ellipsis when wider than the column). */
  label: string;
  /** Where the leader ends: the region's position in the view. */
  at: readonly [number, number];
  /** Lower is kept first when the column is full. */
  rank: number;
}

export interface MarginColumn {
  side: "left" | "right";
  /** The column's edge next to the view: names end here (left column) or start here (right column). */
  edge: number;
  /** The widest a name may be. */
  width: number;
  /** The vertical range the names' centres may take. */
  top: number;
  bottom: number;
  size: number;
}

export interface PlacedLabels {
  /** Leader lines first (to be drawn under the regions), then the names. */
  leaders: string[];
  names: string[];
  /** Boxes of the names set, [x, y, width, height], for tests and collision checks. */
  boxes: [number, number, number, number][];
  /** Labels that found no slot. */
  leftOut: MarginLabel[];
}

/** The line pitch of names in a column at a font size. */
export function labelPitch(size: number): number {
  return size * 1.22;
}

/**
 * Shortens `label` with an ellipsis in the middle until it is at most `width`
 * wide at `size`, keeping its start and its end (labels often differ only in
 * a final number: "L-upper-ridge-03" becomes "L-upp…ge-03", not "L-upper-r…").
 */
export function fitLabel(label: string, width: number, size: number): string {
  if (textWidth(label, size) <= width) return label;
  const characters = [...label];
  for (let keep = characters.length - 1; keep >= 1; keep--) {
    const end = Math.floor(keep / 2);
    const candidate = `${characters.slice(0, keep - end).join("")}…${characters.slice(characters.length - end).join("")}`;
    if (textWidth(candidate, size) <= width) return candidate;
  }
  return "…";
}

/**
 * Slot centres for wanted positions (sorted ascending): as close to each as
 * possible in the least-squares sense, at least `pitch` apart, inside
 * [low, high]. Overlapping runs are merged into clusters centred on their
 * members' mean wish, then shifted inside the bounds.
 */
export function spreadPositions(wanted: readonly number[], pitch: number, low: number, high: number): number[] {
  interface Cluster {
    first: number;
    count: number;
    start: number;
  }
  const clusters: Cluster[] = [];
  const clamp = (c: Cluster) => {
    c.start = Math.min(Math.max(c.start, low), high - (c.count - 1) * pitch);
  };
  wanted.forEach((want, k) => {
    const cluster: Cluster = { first: k, count: 1, start: want };
    clamp(cluster);
    clusters.push(cluster);
    while (clusters.length >= 2) {
      const last = clusters[clusters.length - 1];
      const before = clusters[clusters.length - 2];
      if (before.start + before.count * pitch <= last.start + 1e-9) break;
      clusters.pop();
      const count = before.count + last.count;
      let sum = 0;
      for (let j = 0; j < count; j++) sum += wanted[before.first + j] - j * pitch;
      before.count = count;
      before.start = sum / count;
      clamp(before);
    }
  });
  const out: number[] = [];
  for (const c of clusters) for (let j = 0; j < c.count; j++) out.push(c.start + j * pitch);
  return out;
}

export function placeMarginLabels(labels: readonly MarginLabel[], column: MarginColumn): PlacedLabels {
  const pitch = labelPitch(column.size);
  const slots = Math.max(0, Math.floor((column.bottom - column.top) / pitch + 1e-9) + 1);
  const byRank = [...labels].sort((a, b) => a.rank - b.rank);
  const kept = byRank.slice(0, slots).sort((a, b) => a.at[1] - b.at[1] || a.rank - b.rank);
  const leftOut = byRank.slice(slots);
  const centres = spreadPositions(
    kept.map((l) => l.at[1]),
    pitch,
    column.top,
    column.bottom,
  );
  const leaders: string[] = [];
  const names: string[] = [];
  const boxes: PlacedLabels["boxes"] = [];
  const left = column.side === "left";
  const elbowAt = left ? column.edge + 4.5 : column.edge - 4.5;
  // Neighbours whose leaders cross trade slots (a region far from the column can sit on the far side
  // of a near one); each trade removes that crossing, and the passes stop when none is left.
  for (let pass = 0; pass < kept.length; pass++) {
    let traded = false;
    for (let k = 0; k + 1 < kept.length; k++) {
      if (segmentsCross([elbowAt, centres[k]], kept[k].at, [elbowAt, centres[k + 1]], kept[k + 1].at)) {
        [kept[k], kept[k + 1]] = [kept[k + 1], kept[k]];
        traded = true;
      }
    }
    if (!traded) break;
  }
  kept.forEach((label, k) => {
    const y = centres[k];
    const name = fitLabel(label.label, column.width, column.size);
    const width = textWidth(name, column.size);
    const x = left ? column.edge - width : column.edge;
    boxes.push([x, y - column.size * 0.6, width, column.size * 1.2]);
    names.push(text(left ? column.edge : column.edge, y + column.size * 0.35, name, { anchor: left ? "end" : "start", size: column.size, fill: "#1a1a1a" }));
    const start = left ? column.edge + 1.5 : column.edge - 1.5;
    const elbow = left ? start + 3 : start - 3;
    leaders.push(
      `<polyline points="${n(start)},${n(y)} ${n(elbow)},${n(y)} ${n(label.at[0])},${n(label.at[1])}" fill="none" stroke="#8a8a8a" stroke-width="0.45" pointer-events="none"/>`,
    );
  });
  return { leaders, names, boxes, leftOut };
}

/** Whether segments p1–p2 and q1–q2 cross at a point inside both. */
function segmentsCross(p1: readonly [number, number], p2: readonly [number, number], q1: readonly [number, number], q2: readonly [number, number]): boolean {
  const side = (a: readonly [number, number], b: readonly [number, number], c: readonly [number, number]) => (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]);
  const d1 = side(q1, q2, p1);
  const d2 = side(q1, q2, p2);
  const d3 = side(p1, p2, q1);
  const d4 = side(p1, p2, q2);
  return d1 * d2 < 0 && d3 * d4 < 0;
}
