import { line, n, rect, text } from "./svgElements.js";
import { textHeight, textWidth } from "./textWidth.js";

/**
 * The header and legend pieces of the anatomical figures (network, nodal):
 * a title and wrapped lines of explanation, a colour bar for any colour
 * function, and a row of marker keys. Each piece is laid out in points and
 * reports the height it took, so the figure stacks them without overlap.
 */
export interface Piece {
  elements: string[];
  height: number;
}

/** Greedy word wrap of `content` into lines at most `width` wide at `size`. */
export function wrapText(content: string, size: number, width: number, bold = false): string[] {
  const words = content.split(/\s+/).filter((w) => w.length > 0);
  const lines: string[] = [];
  let current = "";
  for (const word of words) {
    const candidate = current ? `${current} ${word}` : word;
    if (current && textWidth(candidate, size, bold) > width) {
      lines.push(current);
      current = word;
    } else current = candidate;
  }
  if (current) lines.push(current);
  return lines;
}

/** A bold title and lines of smaller grey text under it, all wrapped to `width`, starting at (x, y) (the top). */
export function header(x: number, y: number, width: number, title: string, titleSize: number, notes: string[], noteSize: number): Piece {
  const elements: string[] = [];
  let top = y;
  for (const row of title ? wrapText(title, titleSize, width, true) : []) {
    elements.push(text(x, top + titleSize * 0.95, row, { size: titleSize, weight: "bold", fill: "#1a1a1a" }));
    top += textHeight(titleSize) + 1;
  }
  for (const note of notes) {
    for (const row of wrapText(note, noteSize, width)) {
      elements.push(text(x, top + noteSize * 0.95, row, { size: noteSize, fill: "#444444" }));
      top += textHeight(noteSize) + 0.5;
    }
  }
  return { elements, height: top - y };
}

/**
 * A horizontal colour bar at (x, y) (the top of its label): the label, the
 * bar from position 0 to 1 of `colourAt`, and tick labels under it at the
 * given positions (the first left-aligned, the last right-aligned, so none
 * leaves the bar's span).
 */
export function colourBar(x: number, y: number, width: number, colourAt: (position: number) => string, ticks: [number, string][], label: string, size: number): Piece {
  const elements: string[] = [];
  elements.push(text(x, y + size, label, { size, fill: "#1a1a1a" }));
  const barTop = y + size + 3;
  const barHeight = size * 0.8;
  const steps = 48;
  for (let k = 0; k < steps; k++) {
    elements.push(rect(x + (k * width) / steps, barTop, width / steps + 0.25, barHeight, colourAt((k + 0.5) / steps)));
  }
  elements.push(`<rect x="${n(x)}" y="${n(barTop)}" width="${n(width)}" height="${n(barHeight)}" fill="none" stroke="#4d4d4d" stroke-width="0.5"/>`);
  ticks.forEach(([position, value], k) => {
    const tx = x + position * width;
    elements.push(line(tx, barTop + barHeight, tx, barTop + barHeight + 2, "#4d4d4d", 0.5));
    const anchor = k === 0 && position === 0 ? "start" : k === ticks.length - 1 && position === 1 ? "end" : "middle";
    elements.push(text(tx, barTop + barHeight + 2.5 + size, value, { anchor, size, fill: "#1a1a1a" }));
  });
  return { elements, height: size + 3 + barHeight + 2.5 + size * 1.25 };
}

/** Marker keys (a drawn marker, then its text) flowed left to right, wrapping to a new row when `width` is used up. */
export function markerKeys(x: number, y: number, width: number, keys: { marker: (cx: number, cy: number) => string; text: string }[], size: number): Piece {
  const elements: string[] = [];
  const row = textHeight(size) + 2;
  const markerWidth = size * 1.2;
  let cx = x;
  let cy = y + size * 0.6;
  for (const key of keys) {
    const w = markerWidth + 3 + textWidth(key.text, size);
    if (cx > x && cx + w > x + width) {
      cx = x;
      cy += row;
    }
    elements.push(key.marker(cx + markerWidth / 2, cy));
    elements.push(text(cx + markerWidth + 3, cy + size * 0.35, key.text, { size, fill: "#1a1a1a" }));
    cx += w + size * 1.2;
  }
  return { elements, height: cy - y + size * 0.6 + 2 };
}
