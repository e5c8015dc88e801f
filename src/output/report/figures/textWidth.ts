/**
 * The width a text takes at a font size, for laying out labels without a
 * browser. Measured for the widest of the fonts a figure may be shown in
 * (DejaVu Sans, which the PNG rasteriser uses; Helvetica and Arial are
 * narrower), so a layout that fits by this measure fits in each of them.
 * Widths are in the same unit as `size` (points, in the print figures).
 */
const NARROW = new Set("iljtfrI.,:;'|!()[]{} ");
const WIDE = new Set("mwMWOQGD%@");

/** Advance width of one character as a fraction of the font size (upper estimates of DejaVu Sans). */
function advance(char: string, bold: boolean): number {
  let em: number;
  if (NARROW.has(char)) em = 0.36;
  else if (WIDE.has(char)) em = 0.98;
  else if (char >= "A" && char <= "Z") em = 0.76;
  else if (char >= "0" && char <= "9") em = 0.64;
  else em = 0.63;
  return bold ? em * 1.1 : em;
}

export function textWidth(content: string, size: number, bold = false): number {
  let em = 0;
  for (const char of content) em += advance(char, bold);
  return em * size;
}

/** The height a line of text takes (ascender to descender) at a font size. */
export function textHeight(size: number): number {
  return size * 1.17;
}
