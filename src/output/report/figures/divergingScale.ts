import { interpolateRdBu } from "d3-scale-chromatic";
import { toHex } from "./colourScale.js";

/**
 * The diverging colour scale of the nodal figure, for a signed statistic per
 * region: ColorBrewer's red–blue scheme (Harrower & Brewer 2003, ColorBrewer.org:
 * an online tool for selecting colour schemes for maps, The Cartographic
 * Journal 40:27–37), listed there as safe for readers with colour-vision
 * deficiency; d3-scale-chromatic's `interpolateRdBu`. Dark blue is the most
 * negative value, near-white zero, dark red the most positive; lightness falls
 * symmetrically away from zero, so the size of a value also reads in grayscale.
 */
export const DIVERGING_SCALE_NAME = "red–blue (ColorBrewer; Harrower & Brewer 2003)";

/** Colour at a position in [0, 1] of the scale (0: most negative, blue; 1: most positive, red), as #rrggbb. */
export function divergingAt(position: number): string {
  return toHex(interpolateRdBu(1 - Math.max(0, Math.min(1, position))));
}

/** Colour of `value` on a scale from −limit to +limit, as #rrggbb. */
export function divergingColour(value: number, limit: number): string {
  return divergingAt(limit > 0 ? (value + limit) / (2 * limit) : 0.5);
}
