import type { EdgeColumns } from "../edgeColumns.js";

/**
 * Hub regions of a set of edges: each region's degree (number of the edges it
 * touches) and strength (sum of |statistic| over them), grouped by component
 * (0 for edges outside any component), highest degree first, then highest
 * strength, then region index.
 */
export interface HubRegion {
  component: number;
  region: number;
  degree: number;
  strength: number;
}

export function hubRegions(edges: EdgeColumns, selected: number[], byComponent: boolean): HubRegion[] {
  const hubs = new Map<string, HubRegion>();
  const order: number[] = [];
  for (const e of selected) {
    const component = byComponent ? edges.component[e] : 0;
    if (!order.includes(component)) order.push(component);
    for (const region of [edges.regionA[e], edges.regionB[e]]) {
      const key = `${component}:${region}`;
      const hub = hubs.get(key) ?? { component, region, degree: 0, strength: 0 };
      hub.degree += 1;
      hub.strength += Math.abs(edges.statistic[e]);
      hubs.set(key, hub);
    }
  }
  return [...hubs.values()].sort(
    (a, b) => order.indexOf(a.component) - order.indexOf(b.component) || b.degree - a.degree || b.strength - a.strength || a.region - b.region,
  );
}
