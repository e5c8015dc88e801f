import { line, rect, text, type TextOptions } from "./svgElements.js";
import { textHeight, textWidth } from "./textWidth.js";

/**
 * Placing labels of the print figures so that no two texts overlap, from the
 * font metrics of textWidth.ts: shortening a text to a width, spreading labels
 * along an axis, and a legend that wraps onto further rows.
 */

/** The gap kept between two texts, in points. */
export const TEXT_GAP = 1.5;

/** `content` shortened with an ellipsis until it is at most `maxWidth` wide at `size`. */
export function clipToWidth(content: string, maxWidth: number, size: number, bold = false): string {
  if (textWidth(content, size, bold) <= maxWidth) return content;
  const characters = [...content];
  for (let keep = characters.length - 1; keep >= 1; keep--) {
    const clipped = `${characters.slice(0, keep).join("").trimEnd()}…`;
    if (textWidth(clipped, size, bold) <= maxWidth) return clipped;
  }
  return "…";
}

/** `content` broken at spaces (not at no-break spaces) into lines at most `maxWidth` wide at `size` (a word too long alone is shortened). */
export function wrapText(content: string, maxWidth: number, size: number, bold = false): string[] {
  const lines: string[] = [];
  let current = "";
  for (const word of content.split(/[ \t\n]+/).filter((w) => w !== "")) {
    const joined = current === "" ? word : `${current} ${word}`;
    if (textWidth(joined, size, bold) <= maxWidth) current = joined;
    else {
      if (current !== "") lines.push(current);
      current = clipToWidth(word, maxWidth, size, bold);
    }
  }
  if (current !== "") lines.push(current);
  return lines;
}

/**
 * Positions for labels wanted at `desired` (in order along one axis), each
 * `pitch` from the next at least, all within [low, high]: every label as near
 * its wish as the others allow. Null when they cannot all fit.
 */
export function spreadLabels(desired: number[], pitch: number, low: number, high: number): number[] | null {
  const count = desired.length;
  if (count === 0) return [];
  if ((count - 1) * pitch > high - low + 1e-9) return null;
  // Clusters of labels that push each other, each centred on the mean of its wishes
  // (the least-squares placement of a run at equal spacing), merged until none overlap.
  type Cluster = { first: number; size: number; start: number };
  const clusters: Cluster[] = [];
  const clampStart = (start: number, size: number) => Math.min(Math.max(start, low), high - (size - 1) * pitch);
  for (let k = 0; k < count; k++) {
    let cluster: Cluster = { first: k, size: 1, start: clampStart(desired[k], 1) };
    for (;;) {
      const previous = clusters[clusters.length - 1];
      if (!previous || previous.start + previous.size * pitch <= cluster.start + 1e-9) break;
      clusters.pop();
      const size = previous.size + cluster.size;
      let sum = 0;
      for (let j = 0; j < size; j++) sum += desired[previous.first + j] - j * pitch;
      cluster = { first: previous.first, size, start: clampStart(sum / size, size) };
    }
    clusters.push(cluster);
  }
  const placed: number[] = [];
  for (const cluster of clusters) for (let j = 0; j < cluster.size; j++) placed.push(cluster.start + j * pitch);
  return placed;
}

/** One legend entry: a key drawn in a `keyWidth` × size box at (x, middle), then its text. */
export interface LegendItem {
  key: (x: number, middle: number) => string[];
  label: string;
  keyWidth?: number;
}

/**
 * A legend from `x` across at most `maxWidth`, its first row's baseline at `y`,
 * wrapping onto further rows; returns the elements and the baseline of the
 * last row.
 */
export function flowLegend(items: LegendItem[], x: number, y: number, maxWidth: number, size: number, options: TextOptions = {}): { elements: string[]; lastBaseline: number } {
  const elements: string[] = [];
  const rowPitch = textHeight(size) + TEXT_GAP;
  let cursor = x;
  let baseline = y;
  for (const item of items) {
    const keyWidth = item.keyWidth ?? 12;
    const room = maxWidth - keyWidth - 4;
    const label = clipToWidth(item.label, room, size);
    const width = keyWidth + 4 + textWidth(label, size);
    if (cursor > x && cursor + width > x + maxWidth) {
      cursor = x;
      baseline += rowPitch;
    }
    elements.push(...item.key(cursor, baseline - size * 0.33));
    elements.push(text(cursor + keyWidth + 4, baseline, label, { size, ...options }));
    cursor += width + 3 * size * 0.6 + 2;
  }
  return { elements, lastBaseline: baseline };
}

/** Legend keys: a filled box, and a line (optionally dashed). */
export function boxKey(fill: string, size: number): LegendItem["key"] {
  return (x, middle) => [rect(x, middle - size * 0.4, 12, size * 0.8, fill)];
}

export function lineKey(stroke: string, width: number, dash = ""): LegendItem["key"] {
  return (x, middle) => [line(x, middle, x + 12, middle, stroke, width, dash ? `stroke-dasharray="${dash}"` : "")];
}

/** The distance from one baseline to the next for text at `size`: its box height and the gap. */
export function linePitch(size: number): number {
  return textHeight(size) + TEXT_GAP;
}

/**
 * `content` wrapped to `maxWidth` and drawn from the baseline `y` down; returns
 * the elements and the last line's baseline.
 */
export function paragraph(x: number, y: number, content: string, maxWidth: number, size: number, options: TextOptions = {}): { elements: string[]; lastBaseline: number } {
  const lines = wrapText(content, maxWidth, size, options.weight === "bold");
  const elements = lines.map((l, k) => text(x, y + k * linePitch(size), l, { size, ...options }));
  return { elements, lastBaseline: y + Math.max(0, lines.length - 1) * linePitch(size) };
}
