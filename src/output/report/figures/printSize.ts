import { escapeHtml } from "../escapeHtml.js";
import { n } from "./svgElements.js";

/**
 * Print sizes shared by every figure. A figure is drawn for one journal column
 * (85 mm) or two (180 mm); its SVG user unit is one typographic point
 * (1/72 inch), so a font size in the drawing is its size in print, and no
 * text may be smaller than MIN_FONT_PT. The width and height attributes carry
 * millimetres, so a browser, a word processor and the rasteriser all place the
 * figure at its print size.
 */
export type PrintWidth = "single" | "double";

export const PRINT_WIDTHS: readonly PrintWidth[] = ["double", "single"];

export const WIDTH_MM: Record<PrintWidth, number> = { single: 85, double: 180 };

export const PT_PER_MM = 72 / 25.4;

/** The smallest text a figure may hold, in points at print size. */
export const MIN_FONT_PT = 7;

/** The figure's font sizes in points: tick and region labels, axis titles and keys, panel titles, the figure's title. */
export const FONT_PT = { small: 7, label: 8, heading: 9, title: 10 } as const;

/** The fonts a figure asks for; the PNG rasteriser supplies DejaVu Sans for all of them (see rasterise.ts). */
export const PRINT_FONT = "Helvetica, Arial, 'DejaVu Sans', sans-serif";

/** The drawing width of a figure in points. */
export function widthPt(width: PrintWidth): number {
  return WIDTH_MM[width] * PT_PER_MM;
}

/** The suffix of a figure's files at this width: `-85mm`, `-180mm`. */
export function widthSuffix(width: PrintWidth): string {
  return `-${WIDTH_MM[width]}mm`;
}

/**
 * A whole SVG document of `width` (a print width) by `heightPt` points, white
 * background, default text at FONT_PT.label. `title` becomes the accessible
 * <title>.
 */
export function printSvgDocument(width: PrintWidth, heightPt: number, title: string, body: string[]): string {
  const w = widthPt(width);
  const heightMm = heightPt / PT_PER_MM;
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${n(w)} ${n(heightPt)}" width="${WIDTH_MM[width]}mm" height="${n(heightMm)}mm" font-family="${PRINT_FONT}" font-size="${FONT_PT.label}" role="img">`,
    `<title>${escapeHtml(title)}</title>`,
    `<rect x="0" y="0" width="${n(w)}" height="${n(heightPt)}" fill="#ffffff"/>`,
    ...body,
    "</svg>",
    "",
  ].join("\n");
}
