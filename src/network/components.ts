import type { InferenceSpec, Tail } from "../common/inferenceOptions.js";

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

/** The signs a tail looks at: upper → +, lower → −, both → each separately. */
export function signsOfTail(tail: Tail): (1 | -1)[] {
  return tail === "both" ? [1, -1] : tail === "lower" ? [-1] : [1];
}

/**
 * Observed supra-threshold components for a tail, components of each sign
 * labelled separately (never mixing positive and negative edges) and then
 * numbered together: largest first by the size measure, ties by extent, then
 * by the lowest edge index.
 */
export function observedComponents(
  statistic: ArrayLike<number>,
  regionA: Uint32Array,
  regionB: Uint32Array,
  regionCount: number,
  threshold: number,
  tail: Tail,
  size: "extent" | "mass",
): { labels: Int32Array; components: ComponentSummary[] } {
  const perSign = signsOfTail(tail).map((sign) =>
    labelComponents(statistic, regionA, regionB, regionCount, threshold, sign, size),
  );
  const all = perSign.flatMap((result, which) => result.components.map((c) => ({ which, c })));
  all.sort(({ c: a }, { c: b }) => {
    const bySize = size === "mass" ? b.mass - a.mass : b.extent - a.extent;
    return bySize || b.extent - a.extent || a.firstEdge - b.firstEdge;
  });
  const renumber = perSign.map(() => new Map<number, number>());
  const components = all.map(({ which, c }, k) => {
    renumber[which].set(c.id, k + 1);
    return { ...c, id: k + 1 };
  });
  const labels = new Int32Array(statistic.length);
  perSign.forEach((result, which) => {
    for (let e = 0; e < labels.length; e++) {
      const id = result.labels[e];
      if (id > 0) labels[e] = renumber[which].get(id)!;
    }
  });
  return { labels, components };
}

/** The observed components at the design's primary threshold and size measure (its first threshold). */
export function primaryComponents(
  statistic: ArrayLike<number>,
  pairs: { regionA: Uint32Array; regionB: Uint32Array; regionCount: number },
  inference: Pick<InferenceSpec, "thresholds" | "size">,
  tail: Tail,
): { labels: Int32Array; components: ComponentSummary[] } {
  return observedComponents(statistic, pairs.regionA, pairs.regionB, pairs.regionCount, inference.thresholds[0], tail, inference.size);
}
