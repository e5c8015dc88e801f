// Connected components of supra-threshold edges (src/network/components.ts:
// labelComponents and observedComponents): the component step of the network-based statistic (Zalesky,
// Fornito & Bullmore 2010, NeuroImage 53:1197) — extent = edges, mass = Σ(statistic −
// threshold), nodes = regions touched. Checked against
//   1. small graphs drawn by hand below (expected components worked out by hand), and
//   2. an independent breadth-first search written in this file (Moore 1959, "The shortest
//      path through a maze"; the textbook graph search) on random graphs (fast-check).
// Masses are compared exactly (tolerance 0): both sides add the same numbers in ascending edge
// order. The ordering rule under test (largest first by the size measure, then by extent,
// then by the lowest edge index) is the one stated in the source.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { edgeIndexOf, edgePairs, type EdgePairs } from "../../../src/edges/edgeIndex.js";
import type { Tail } from "../../../src/common/inferenceOptions.js";
import {
  isSupraThreshold,
  labelComponents,
  largestComponent,
  UnionFind,
  type ComponentLabels,
  type ComponentSummary,
  observedComponents,
  signsOfTail,
} from "../../../src/network/components.js";

type Size = "extent" | "mass";

/** Statistic per edge of an N-region graph: 0 everywhere except the listed (i, j, value). */
function graph(regionCount: number, edges: Array<[number, number, number]>): { pairs: EdgePairs; statistic: Float64Array } {
  const pairs = edgePairs(regionCount);
  const statistic = new Float64Array(pairs.edgeCount);
  for (const [i, j, value] of edges) statistic[edgeIndexOf(regionCount, i, j)] = value;
  return { pairs, statistic };
}

function label(statistic: Float64Array, pairs: EdgePairs, threshold: number, sign: 1 | -1, size: Size): ComponentLabels {
  return labelComponents(statistic, pairs.regionA, pairs.regionB, pairs.regionCount, threshold, sign, size);
}

function observe(statistic: Float64Array, pairs: EdgePairs, threshold: number, tail: Tail, size: Size): ComponentLabels {
  return observedComponents(statistic, pairs.regionA, pairs.regionB, pairs.regionCount, threshold, tail, size);
}

/** Labels as a map edge → id, for readable expectations; edges written as "i-j". */
function labelMap(result: ComponentLabels, pairs: EdgePairs): Record<string, number> {
  const out: Record<string, number> = {};
  result.labels.forEach((id, e) => {
    if (id > 0) out[`${pairs.regionA[e]}-${pairs.regionB[e]}`] = id;
  });
  return out;
}

describe("hand-drawn graph A (6 regions, threshold 2)", () => {
  // Regions 0..5. Positive: triangle 0-1 (5), 0-2 (2.5), 1-2 (3); single edge 3-4 (10);
  // 4-5 is exactly 2 (not above the threshold). Negative: 2-3 (-6), 3-5 (-2.5).
  // 0-5 is NaN (an edge without a statistic); 1-4 is 1.5 and 0-3 is -1.9 (below threshold).
  const { pairs, statistic } = graph(6, [
    [0, 1, 5],
    [0, 2, 2.5],
    [1, 2, 3],
    [3, 4, 10],
    [4, 5, 2],
    [2, 3, -6],
    [3, 5, -2.5],
    [0, 5, NaN],
    [1, 4, 1.5],
    [0, 3, -1.9],
  ]);
  // Edge indices (row-major i<j, N = 6): 0-1 → 0, 0-2 → 1, 1-2 → 5, 2-3 → 9, 3-4 → 12, 3-5 → 13.
  const triangle = { extent: 3, nodes: 3, mass: 3 + 0.5 + 1, firstEdge: 0, sign: 1 as const };
  const single = { extent: 1, nodes: 2, mass: 8, firstEdge: 12, sign: 1 as const };
  const negative = { extent: 2, nodes: 3, mass: 4 + 0.5, firstEdge: 9, sign: -1 as const };

  it("the edge indices used above are the row-major upper-triangle ones", () => {
    expect([edgeIndexOf(6, 0, 1), edgeIndexOf(6, 0, 2), edgeIndexOf(6, 1, 2), edgeIndexOf(6, 2, 3), edgeIndexOf(6, 3, 4), edgeIndexOf(6, 3, 5)]).toEqual([
      0, 1, 5, 9, 12, 13,
    ]);
  });

  it("upper tail by extent: the triangle (3 edges) first, then 3-4; 4-5 at exactly the threshold and the NaN edge are left out", () => {
    const result = label(statistic, pairs, 2, 1, "extent");
    expect(result.components).toEqual([
      { id: 1, ...triangle },
      { id: 2, ...single },
    ]);
    expect(labelMap(result, pairs)).toEqual({ "0-1": 1, "0-2": 1, "1-2": 1, "3-4": 2 });
    expect(observe(statistic, pairs, 2, "upper", "extent")).toEqual(result);
  });

  it("upper tail by mass: 3-4 (mass 8) before the triangle (mass 4.5)", () => {
    const result = label(statistic, pairs, 2, 1, "mass");
    expect(result.components).toEqual([
      { id: 1, ...single },
      { id: 2, ...triangle },
    ]);
    expect(labelMap(result, pairs)).toEqual({ "3-4": 1, "0-1": 2, "0-2": 2, "1-2": 2 });
  });

  it("lower tail: only the negative component 2-3, 3-5 (mass 4 + 0.5 on −statistic)", () => {
    const result = observe(statistic, pairs, 2, "lower", "extent");
    expect(result.components).toEqual([{ id: 1, ...negative }]);
    expect(labelMap(result, pairs)).toEqual({ "2-3": 1, "3-5": 1 });
    expect(label(statistic, pairs, 2, -1, "extent")).toEqual(result);
  });

  it("both tails by extent: signs never mix (2-3 touches the triangle's region 2) and are numbered together: triangle, negative, 3-4", () => {
    const result = observe(statistic, pairs, 2, "both", "extent");
    expect(result.components).toEqual([
      { id: 1, ...triangle },
      { id: 2, ...negative },
      { id: 3, ...single },
    ]);
    expect(labelMap(result, pairs)).toEqual({ "0-1": 1, "0-2": 1, "1-2": 1, "2-3": 2, "3-5": 2, "3-4": 3 });
  });

  it("both tails by mass: 3-4 (8) first; triangle and negative tie at 4.5 and the larger extent (triangle) wins", () => {
    const result = observe(statistic, pairs, 2, "both", "mass");
    expect(result.components).toEqual([
      { id: 1, ...single },
      { id: 2, ...triangle },
      { id: 3, ...negative },
    ]);
    expect(labelMap(result, pairs)).toEqual({ "3-4": 1, "0-1": 2, "0-2": 2, "1-2": 2, "2-3": 3, "3-5": 3 });
  });

  it("largestComponent: extent 3 and mass 8 (each maximised on its own) for the upper tail; 2 and 4.5 for the lower", () => {
    const sets = new UnionFind(6);
    const edges = new Int32Array(6);
    const mass = new Float64Array(6);
    expect(largestComponent(statistic, pairs.regionA, pairs.regionB, 2, 1, sets, edges, mass)).toEqual({ maxExtent: 3, maxMass: 8 });
    expect(largestComponent(statistic, pairs.regionA, pairs.regionB, 2, -1, sets, edges, mass)).toEqual({ maxExtent: 2, maxMass: 4.5 });
    // The scratch space is reset on each call: the same call again gives the same answer.
    expect(largestComponent(statistic, pairs.regionA, pairs.regionB, 2, 1, sets, edges, mass)).toEqual({ maxExtent: 3, maxMass: 8 });
  });

  it("a threshold above every statistic gives no component and zeros", () => {
    expect(observe(statistic, pairs, 100, "both", "extent")).toEqual({ labels: new Int32Array(15), components: [] });
    expect(
      largestComponent(statistic, pairs.regionA, pairs.regionB, 100, 1, new UnionFind(6), new Int32Array(6), new Float64Array(6)),
    ).toEqual({ maxExtent: 0, maxMass: 0 });
  });
});

describe("hand-drawn graph B: tie-breaks", () => {
  it("equal extent and mass: the component with the lowest edge index comes first (0-5 → edge 4, 1-2 → 5, 3-4 → 12)", () => {
    // Listed in reverse so that neither input order nor union order decides.
    const { pairs, statistic } = graph(6, [
      [3, 4, 4],
      [1, 2, 4],
      [0, 5, 4],
    ]);
    for (const size of ["extent", "mass"] as const) {
      const result = label(statistic, pairs, 3, 1, size);
      expect(result.components.map((c) => c.firstEdge)).toEqual([4, 5, 12]);
      expect(result.components.map((c) => c.id)).toEqual([1, 2, 3]);
      expect(labelMap(result, pairs)).toEqual({ "0-5": 1, "1-2": 2, "3-4": 3 });
    }
  });

  it("by mass, a heavier single edge beats a lighter path of three edges; by extent the path wins", () => {
    // Path 0-1-2-3 with statistics 3.5 each (mass 3 × 0.5 = 1.5); edge 4-5 at 9 (mass 6).
    const { pairs, statistic } = graph(6, [
      [0, 1, 3.5],
      [1, 2, 3.5],
      [2, 3, 3.5],
      [4, 5, 9],
    ]);
    expect(label(statistic, pairs, 3, 1, "mass").components.map((c) => [c.extent, c.mass])).toEqual([
      [1, 6],
      [3, 1.5],
    ]);
    expect(label(statistic, pairs, 3, 1, "extent").components.map((c) => [c.extent, c.mass])).toEqual([
      [3, 1.5],
      [1, 6],
    ]);
  });
});

describe("hand-drawn graph C: nodes count regions, not edges", () => {
  it("a star of 4 edges touches 5 regions; a triangle of 3 edges touches 3", () => {
    const star = graph(5, [
      [0, 1, 3],
      [0, 2, 3],
      [0, 3, 3],
      [0, 4, 3],
    ]);
    expect(label(star.statistic, star.pairs, 2, 1, "extent").components).toEqual([
      { id: 1, extent: 4, nodes: 5, mass: 4, firstEdge: 0, sign: 1 },
    ]);
    const triangle = graph(5, [
      [1, 2, 3],
      [2, 4, 3],
      [1, 4, 3],
    ]);
    const result = label(triangle.statistic, triangle.pairs, 2, 1, "extent");
    expect(result.components.map((c) => [c.extent, c.nodes])).toEqual([[3, 3]]);
  });
});

describe("isSupraThreshold and signsOfTail", () => {
  it("is strict and sign-aware; NaN is never above the threshold", () => {
    expect(isSupraThreshold(3, 3, 1)).toBe(false);
    expect(isSupraThreshold(3.0000001, 3, 1)).toBe(true);
    expect(isSupraThreshold(-4, 3, -1)).toBe(true);
    expect(isSupraThreshold(4, 3, -1)).toBe(false);
    expect(isSupraThreshold(NaN, 3, 1)).toBe(false);
    expect(isSupraThreshold(NaN, 3, -1)).toBe(false);
  });

  it("upper → [+1], lower → [−1], both → [+1, −1]", () => {
    expect(signsOfTail("upper")).toEqual([1]);
    expect(signsOfTail("lower")).toEqual([-1]);
    expect(signsOfTail("both")).toEqual([1, -1]);
  });
});

// ---- Independent reference: breadth-first search over the supra-threshold edges ----

interface ReferenceComponent extends Omit<ComponentSummary, "id"> {
  edges: number[];
}

/** Components of one sign by BFS; masses summed over the component's edges in ascending order. */
function bfsComponents(statistic: ArrayLike<number>, pairs: EdgePairs, threshold: number, sign: 1 | -1): ReferenceComponent[] {
  const N = pairs.regionCount;
  const adjacency: Array<Array<{ to: number; edge: number }>> = Array.from({ length: N }, () => []);
  for (let e = 0; e < pairs.edgeCount; e++) {
    const value = sign * statistic[e];
    if (value > threshold) {
      adjacency[pairs.regionA[e]].push({ to: pairs.regionB[e], edge: e });
      adjacency[pairs.regionB[e]].push({ to: pairs.regionA[e], edge: e });
    }
  }
  const visited = new Uint8Array(N);
  const out: ReferenceComponent[] = [];
  for (let start = 0; start < N; start++) {
    if (visited[start] || adjacency[start].length === 0) continue;
    const queue = [start];
    visited[start] = 1;
    const nodes = new Set<number>([start]);
    const edges = new Set<number>();
    while (queue.length > 0) {
      const node = queue.shift()!;
      for (const { to, edge } of adjacency[node]) {
        edges.add(edge);
        if (!visited[to]) {
          visited[to] = 1;
          nodes.add(to);
          queue.push(to);
        }
      }
    }
    const sorted = [...edges].sort((a, b) => a - b);
    let mass = 0;
    for (const e of sorted) mass += sign * statistic[e] - threshold;
    out.push({ extent: sorted.length, nodes: nodes.size, mass, firstEdge: sorted[0], sign, edges: sorted });
  }
  return out;
}

/** Orders and numbers reference components: size measure descending, then extent, then lowest edge. */
function referenceLabels(components: ReferenceComponent[], edgeCount: number, size: Size): ComponentLabels {
  const ordered = [...components].sort((a, b) => {
    const bySize = size === "mass" ? b.mass - a.mass : b.extent - a.extent;
    return bySize || b.extent - a.extent || a.firstEdge - b.firstEdge;
  });
  const labels = new Int32Array(edgeCount);
  const summaries = ordered.map((c, k) => {
    for (const e of c.edges) labels[e] = k + 1;
    return { id: k + 1, extent: c.extent, nodes: c.nodes, mass: c.mass, firstEdge: c.firstEdge, sign: c.sign };
  });
  return { labels, components: summaries };
}

describe("union–find components equal an independent BFS on random graphs (fast-check)", () => {
  const value = fc.oneof(
    { weight: 3, arbitrary: fc.integer({ min: -4, max: 4 }) }, // many exact ties in extent and mass
    { weight: 3, arbitrary: fc.double({ min: -6, max: 6, noNaN: true }) },
    { weight: 1, arbitrary: fc.constant(NaN) },
  );
  const randomGraph = fc.integer({ min: 2, max: 11 }).chain((regionCount) =>
    fc.record({
      regionCount: fc.constant(regionCount),
      statistic: fc.array(value, { minLength: (regionCount * (regionCount - 1)) / 2, maxLength: (regionCount * (regionCount - 1)) / 2 }),
      threshold: fc.constantFrom(0.5, 1, 2, 2.5, 3),
      size: fc.constantFrom<Size>("extent", "mass"),
    }),
  );

  it("labelComponents (each sign) = BFS: same labels, extents, nodes, masses (exact), order and ids", () => {
    fc.assert(
      fc.property(randomGraph, ({ regionCount, statistic, threshold, size }) => {
        const pairs = edgePairs(regionCount);
        const values = Float64Array.from(statistic);
        for (const sign of [1, -1] as const) {
          const expected = referenceLabels(bfsComponents(values, pairs, threshold, sign), pairs.edgeCount, size);
          expect(label(values, pairs, threshold, sign, size)).toEqual(expected);
        }
      }),
      { seed: 101, numRuns: 600 },
    );
  });

  it("observedComponents for tail both = BFS of each sign, numbered together", () => {
    fc.assert(
      fc.property(randomGraph, ({ regionCount, statistic, threshold, size }) => {
        const pairs = edgePairs(regionCount);
        const values = Float64Array.from(statistic);
        const all = [...bfsComponents(values, pairs, threshold, 1), ...bfsComponents(values, pairs, threshold, -1)];
        expect(observe(values, pairs, threshold, "both", size)).toEqual(referenceLabels(all, pairs.edgeCount, size));
      }),
      { seed: 102, numRuns: 600 },
    );
  });

  it("largestComponent = the largest extent and the largest mass over labelComponents (0 when none), with reused scratch", () => {
    const sets = new UnionFind(11);
    const edges = new Int32Array(11);
    const mass = new Float64Array(11);
    fc.assert(
      fc.property(randomGraph, ({ regionCount, statistic, threshold, size }) => {
        const pairs = edgePairs(regionCount);
        const values = Float64Array.from(statistic);
        // Scratch must have regionCount elements: use fresh ones of the right size, plus the shared
        // ones when they fit exactly (regionCount = 11) to check that reuse leaves nothing behind.
        const scratch =
          regionCount === 11
            ? { sets, edges, mass }
            : { sets: new UnionFind(regionCount), edges: new Int32Array(regionCount), mass: new Float64Array(regionCount) };
        for (const sign of [1, -1] as const) {
          const components = label(values, pairs, threshold, sign, size).components;
          const expected = {
            maxExtent: Math.max(0, ...components.map((c) => c.extent)),
            maxMass: Math.max(0, ...components.map((c) => c.mass)),
          };
          expect(largestComponent(values, pairs.regionA, pairs.regionB, threshold, sign, scratch.sets, scratch.edges, scratch.mass)).toEqual(expected);
        }
      }),
      { seed: 103, numRuns: 600 },
    );
  });
});
