import { interpolateCividis } from "d3-scale-chromatic";

/**
 * The colour scale of every figure that shows a t-statistic: cividis (Nuñez,
 * Anderton & Renslow 2018, PLoS ONE 13:e0199239), a blue-to-yellow scale made
 * to look alike to readers with and without red-green colour-vision
 * deficiency, whose lightness rises monotonically (CIELAB L* ≈ 13 to 92), so
 * it also reads in grayscale. The function is d3-scale-chromatic's
 * `interpolateCividis`. A t-statistic is mapped linearly from [−limit, +limit]
 * onto [0, 1]: dark blue is the most negative t, mid grey zero, yellow the
 * most positive. An F-statistic (never negative) is mapped from [0, limit].
 */
export const COLOUR_SCALE_NAME = "cividis (Nuñez, Anderton & Renslow 2018, PLoS ONE 13:e0199239)";

/** Colour of `value` on a scale from −limit (0 when not `signed`) to +limit, as #rrggbb. */
export function statisticColour(value: number, limit: number, signed = true): string {
  return scaleColour(scalePosition(value, limit, signed));
}

/** Where `value` falls on the scale, in [0, 1]. */
export function scalePosition(value: number, limit: number, signed = true): number {
  const low = signed ? -limit : 0;
  const position = limit > 0 ? (value - low) / (limit - low) : 0.5;
  return Math.max(0, Math.min(1, position));
}

/** Colour at a position in [0, 1] of the scale, as #rrggbb. */
export function scaleColour(position: number): string {
  return toHex(interpolateCividis(position));
}

/** A colour from d3-scale-chromatic ("rgb(r, g, b)" or "#rrggbb") as #rrggbb. */
export function toHex(colour: string): string {
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
