import type { Region } from "../../../io/regions.js";

/**
 * The order regions are drawn in: grouped by hemisphere, then by system
 * within a hemisphere, when the regions table gives them; matrix order within
 * a group. Groups appear in the order of their first region, so the drawing
 * follows the user's own table. Regions without a hemisphere (or system) form
 * their own group.
 */
export interface RegionOrder {
  /** Region index at each drawing position. */
  order: number[];
  /** Drawing position of each region index. */
  position: Int32Array;
  /** Consecutive runs of one hemisphere and system, in drawing positions [start, end). */
  blocks: RegionBlock[];
}

export interface RegionBlock {
  hemisphere: string | undefined;
  system: string | undefined;
  start: number;
  end: number;
}

export function regionOrder(regions: Region[]): RegionOrder {
  const hemispheres: (string | undefined)[] = [];
  const systems: (string | undefined)[] = [];
  for (const r of regions) {
    if (!hemispheres.includes(r.hemisphere)) hemispheres.push(r.hemisphere);
    if (!systems.includes(r.system)) systems.push(r.system);
  }
  const order = regions
    .map((_, i) => i)
    .sort(
      (a, b) =>
        hemispheres.indexOf(regions[a].hemisphere) - hemispheres.indexOf(regions[b].hemisphere) ||
        systems.indexOf(regions[a].system) - systems.indexOf(regions[b].system) ||
        a - b,
    );
  const position = new Int32Array(regions.length);
  order.forEach((region, p) => (position[region] = p));
  const blocks: RegionBlock[] = [];
  order.forEach((region, p) => {
    const { hemisphere, system } = regions[region];
    const last = blocks[blocks.length - 1];
    if (last && last.hemisphere === hemisphere && last.system === system) last.end = p + 1;
    else blocks.push({ hemisphere, system, start: p, end: p + 1 });
  });
  return { order, position, blocks };
}
