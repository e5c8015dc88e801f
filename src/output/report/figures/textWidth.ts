import { DEJAVU_SANS, DEJAVU_SANS_BOLD } from "./fontMetrics.generated.js";

/**
 * The width a text takes at a font size, for laying out labels without a
 * browser: the sum of the characters' advance widths in DejaVu Sans (or
 * DejaVu Sans Bold), read from the font files by scripts/font-metrics.mjs.
 * DejaVu Sans is the font the PNG rasteriser uses and the widest of those a
 * figure asks for (Helvetica and Arial are narrower), and kerning only ever
 * narrows a text, so a layout that fits by this measure fits in each of them.
 * A character outside the table counts as one em (wider than any in it).
 * Widths are in the same unit as `size` (points, in the print figures).
 */
const FALLBACK_EM = 1;

function advanceTable([characters, widths]: readonly [string, readonly number[]]): Map<string, number> {
  const table = new Map<string, number>();
  [...characters].forEach((c, k) => table.set(c, widths[k] / 1000));
  return table;
}

const REGULAR = advanceTable(DEJAVU_SANS);
const BOLD = advanceTable(DEJAVU_SANS_BOLD);

export function textWidth(content: string, size: number, bold = false): number {
  const table = bold ? BOLD : REGULAR;
  let em = 0;
  for (const char of content) em += table.get(char) ?? FALLBACK_EM;
  return em * size;
}

/** DejaVu Sans' ascent and descent as fractions of the font size (its hhea table: 1901 and 483 of 2048 units). */
export const ASCENT_EM = 0.93;
export const DESCENT_EM = 0.24;

/** The height a line of text takes (ascender to descender) at a font size: the height of its box in a browser. */
export function textHeight(size: number): number {
  return size * (ASCENT_EM + DESCENT_EM);
}
