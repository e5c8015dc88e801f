import { interpolateCividis } from "d3-scale-chromatic";

/**
 * The colour scale of every figure that shows a t-statistic: cividis (Nuñez,
 * Anderton & Renslow 2018, PLoS ONE 13:e0199239), a blue-to-yellow scale made
 * to look alike to readers with and without red-green colour-vision
 * deficiency, whose lightness rises monotonically (CIELAB L* ≈ 13 to 92), so
 * it also reads in grayscale. The function is d3-scale-chromatic's
 * `interpolateCividis`. The statistic is mapped linearly from [−limit, +limit]
 * onto [0, 1]: dark blue is the most negative t, mid grey zero, yellow the
 * most positive.
 */
export const COLOUR_SCALE_NAME = "cividis (Nuñez, Anderton & Renslow 2018, PLoS ONE 13:e0199239)";

/** Colour of `value` on a scale from −limit to +limit, as #rrggbb. */
export function statisticColour(value: number, limit: number): string {
  const position = limit > 0 ? (value + limit) / (2 * limit) : 0.5;
  return scaleColour(Math.max(0, Math.min(1, position)));
}

/** Colour at a position in [0, 1] of the scale, as #rrggbb. */
export function scaleColour(position: number): string {
  return toHex(interpolateCividis(position));
}

function toHex(colour: string): string {
  if (colour.startsWith("#")) return colour;
  const parts = colour.match(/\d+/g) ?? ["0", "0", "0"];
  return `#${parts
    .slice(0, 3)
    .map((p) => Number(p).toString(16).padStart(2, "0"))
    .join("")}`;
}

/** The largest |t| among finite statistics (1 when there is none), the shared limit of a contrast's figures. */
export function statisticLimit(statistic: ArrayLike<number>): number {
  let limit = 0;
  for (let e = 0; e < statistic.length; e++) {
    const v = Math.abs(statistic[e]);
    if (Number.isFinite(v) && v > limit) limit = v;
  }
  return limit > 0 ? limit : 1;
}
