/**
 * Connected components of the supra-threshold edges, by union–find with path
 * halving and union by size (Tarjan 1975, J. ACM 22:215). This is the
 * component step of the network-based statistic (Zalesky, Fornito &
 * Bullmore 2010, NeuroImage 53:1197): extent = number of edges, mass =
 * Σ (statistic − threshold) over them, nodes = regions touched.
 *
 * `sign` picks the direction: +1 keeps edges with statistic > threshold,
 * −1 keeps edges with −statistic > threshold (components never mix signs).
 */
export interface ComponentSummary {
  /** 1-based id after ordering (largest first). */
  id: number;
  extent: number;
  nodes: number;
  mass: number;
  /** Lowest edge index in the component (tie-break and stable identity). */
  firstEdge: number;
  sign: 1 | -1;
}

export interface ComponentLabels {
  /** Component id per edge (1-based, 0 = not supra-threshold). */
  labels: Int32Array;
  components: ComponentSummary[];
}

/** Reusable scratch space so that the permutation loop does not allocate. */
export class UnionFind {
  readonly parent: Int32Array;
  readonly size: Int32Array;
  constructor(readonly count: number) {
    this.parent = new Int32Array(count);
    this.size = new Int32Array(count);
  }
  reset(): void {
    for (let i = 0; i < this.count; i++) this.parent[i] = i;
    this.size.fill(1);
  }
  find(x: number): number {
    const parent = this.parent;
    while (parent[x] !== x) {
      parent[x] = parent[parent[x]];
      x = parent[x];
    }
    return x;
  }
  union(a: number, b: number): number {
    let ra = this.find(a);
    let rb = this.find(b);
    if (ra === rb) return ra;
    if (this.size[ra] < this.size[rb]) [ra, rb] = [rb, ra];
    this.parent[rb] = ra;
    this.size[ra] += this.size[rb];
    return ra;
  }
}

export function isSupraThreshold(statistic: number, threshold: number, sign: 1 | -1): boolean {
  return sign * statistic > threshold;
}

export function labelComponents(
  statistic: ArrayLike<number>,
  regionA: Uint32Array,
  regionB: Uint32Array,
  regionCount: number,
  threshold: number,
  sign: 1 | -1,
  size: "extent" | "mass",
): ComponentLabels {
  const E = statistic.length;
  const sets = new UnionFind(regionCount);
  sets.reset();
  for (let e = 0; e < E; e++) {
    if (isSupraThreshold(statistic[e], threshold, sign)) sets.union(regionA[e], regionB[e]);
  }
  const byRoot = new Map<number, { extent: number; mass: number; firstEdge: number; regions: Set<number> }>();
  for (let e = 0; e < E; e++) {
    if (!isSupraThreshold(statistic[e], threshold, sign)) continue;
    const root = sets.find(regionA[e]);
    let entry = byRoot.get(root);
    if (!entry) {
      entry = { extent: 0, mass: 0, firstEdge: e, regions: new Set() };
      byRoot.set(root, entry);
    }
    entry.extent++;
    entry.mass += sign * statistic[e] - threshold;
    entry.regions.add(regionA[e]);
    entry.regions.add(regionB[e]);
  }
  const ordered = [...byRoot.entries()].sort(([, a], [, b]) => {
    const bySize = size === "mass" ? b.mass - a.mass : b.extent - a.extent;
    return bySize || b.extent - a.extent || a.firstEdge - b.firstEdge;
  });
  const idOfRoot = new Map<number, number>();
  const components: ComponentSummary[] = ordered.map(([root, entry], k) => {
    idOfRoot.set(root, k + 1);
    return { id: k + 1, extent: entry.extent, nodes: entry.regions.size, mass: entry.mass, firstEdge: entry.firstEdge, sign };
  });
  const labels = new Int32Array(E);
  for (let e = 0; e < E; e++) {
    if (isSupraThreshold(statistic[e], threshold, sign)) labels[e] = idOfRoot.get(sets.find(regionA[e]))!;
  }
  return { labels, components };
}

/**
 * The largest component's extent and mass (each maximised on its own), for
 * one permutation; no allocation. `sets` must have regionCount elements and
 * `edgeMass` is scratch of the same length.
 */
export function largestComponent(
  statistic: ArrayLike<number>,
  regionA: Uint32Array,
  regionB: Uint32Array,
  threshold: number,
  sign: 1 | -1,
  sets: UnionFind,
  componentEdges: Int32Array,
  componentMass: Float64Array,
): { maxExtent: number; maxMass: number } {
  sets.reset();
  componentEdges.fill(0);
  componentMass.fill(0);
  const E = statistic.length;
  let any = false;
  for (let e = 0; e < E; e++) {
    if (sign * statistic[e] > threshold) {
      sets.union(regionA[e], regionB[e]);
      any = true;
    }
  }
  if (!any) return { maxExtent: 0, maxMass: 0 };
  let maxExtent = 0;
  let maxMass = 0;
  for (let e = 0; e < E; e++) {
    const value = sign * statistic[e];
    if (value > threshold) {
      const root = sets.find(regionA[e]);
      const extent = ++componentEdges[root];
      const mass = (componentMass[root] += value - threshold);
      if (extent > maxExtent) maxExtent = extent;
      if (mass > maxMass) maxMass = mass;
    }
  }
  return { maxExtent, maxMass };
}
