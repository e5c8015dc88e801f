import { describe, expect, it } from "vitest";
import seedrandom from "seedrandom";
import { expectAllClose } from "../../helpers/close.js";
import { edgePairs } from "../../../src/edges/edgeIndex.js";
import { ThresholdFreeEnhancer } from "../../../src/network/thresholdFree.js";

// References: the definition of threshold-free enhancement (Smith & Nichols
// 2009, NeuroImage 44:83, eq. 1; on graph components as in Baggio et al. 2018,
// Human Brain Mapping 39:2289), evaluated (a) by hand on small graphs, written
// out below, and (b) by an independent implementation in this test that, for
// every threshold level, relabels the components from scratch by breadth-first search.

function bruteForce(statistic: number[], n: number, E: number, H: number, dh: number): number[] {
  const pairs = edgePairs(n);
  const out = new Array<number>(statistic.length).fill(0);
  for (const sign of [1, -1]) {
    const top = Math.max(0, ...statistic.map((t) => Math.floor((sign * t) / dh + 1e-9)));
    for (let level = 1; level <= top; level++) {
      const h = level * dh;
      const kept = statistic.map((t) => Math.floor((sign * t) / dh + 1e-9) >= level);
      // Components of the kept edges by breadth-first search over regions.
      const adjacency: number[][] = Array.from({ length: n }, () => []);
      kept.forEach((k, e) => {
        if (!k) return;
        adjacency[pairs.regionA[e]].push(e);
        adjacency[pairs.regionB[e]].push(e);
      });
      const componentOfEdge = new Array<number>(statistic.length).fill(-1);
      const sizes: number[] = [];
      kept.forEach((k, start) => {
        if (!k || componentOfEdge[start] >= 0) return;
        const id = sizes.length;
        let size = 0;
        const queue = [start];
        componentOfEdge[start] = id;
        while (queue.length) {
          const e = queue.pop()!;
          size++;
          for (const r of [pairs.regionA[e], pairs.regionB[e]]) {
            for (const f of adjacency[r]) {
              if (componentOfEdge[f] < 0) {
                componentOfEdge[f] = id;
                queue.push(f);
              }
            }
          }
        }
        sizes.push(size);
      });
      kept.forEach((k, e) => {
        if (k) out[e] += sign * sizes[componentOfEdge[e]] ** E * h ** H * dh;
      });
    }
  }
  return out;
}

describe("threshold-free enhancement on networks", () => {
  it("a 3-region path, E = H = 1, dh = 0.1, worked by hand", () => {
    // Edges of 3 regions in order (1,2), (1,3), (2,3); statistics 0.3, 0, 0.2.
    // h = 0.3: {(1,2)} alone, size 1 → (1,2) gets 1·0.3·0.1 = 0.03.
    // h = 0.2 and 0.1: (1,2) and (2,3) share region 2, size 2 → each gets 2·0.2·0.1 + 2·0.1·0.1 = 0.06.
    const pairs = edgePairs(3);
    const enhancer = new ThresholdFreeEnhancer(pairs.regionA, pairs.regionB, 3, { extentExponent: 1, heightExponent: 1, step: 0.1 });
    const out = enhancer.enhanceTail([0.3, 0, 0.2], [1], new Float64Array(3));
    expectAllClose(out, [0.09, 0, 0.06], { rel: 1e-12, label: "path graph" });
  });

  it("two separate components and a negative edge, E = 0.5, H = 2, dh = 0.5, worked by hand", () => {
    // 4 regions; edges (1,2)=0, (1,3)=1, (1,4)=2, (2,3)=3, (2,4)=4, (3,4)=5.
    // Statistics: (1,2) = 1.0, (3,4) = 1.0, (1,3) = −1.0, others 0.
    // Positive side: levels h = 0.5 and 1.0; (1,2) and (3,4) are separate (no shared region), size 1 each:
    //   each gets 1^0.5 · (0.5² + 1.0²) · 0.5 = 0.625.
    // Negative side: (1,3) alone: −0.625.
    const pairs = edgePairs(4);
    const enhancer = new ThresholdFreeEnhancer(pairs.regionA, pairs.regionB, 4, { extentExponent: 0.5, heightExponent: 2, step: 0.5 });
    const out = enhancer.enhanceTail([1, -1, 0, 0, 0, 1], [1, -1], new Float64Array(6));
    expectAllClose(out, [0.625, -0.625, 0, 0, 0, 0.625], { rel: 1e-12, label: "two components" });
  });

  it("equals an independent breadth-first implementation on random networks", () => {
    const random = seedrandom("tfe");
    for (let trial = 0; trial < 30; trial++) {
      const n = 3 + Math.floor(random() * 9);
      const pairs = edgePairs(n);
      const statistic = Array.from({ length: pairs.edgeCount }, () => (random() - 0.4) * 8);
      const parameters = { extentExponent: 0.4 + random(), heightExponent: 1 + 2 * random(), step: [0.05, 0.1, 0.25][trial % 3] };
      const enhancer = new ThresholdFreeEnhancer(pairs.regionA, pairs.regionB, n, parameters);
      const out = enhancer.enhanceTail(statistic, [1, -1], new Float64Array(pairs.edgeCount));
      const expected = bruteForce(statistic, n, parameters.extentExponent, parameters.heightExponent, parameters.step);
      // Tolerance 1e-10 relative: the same terms summed in a different order.
      expectAllClose(out, expected, { rel: 1e-10, abs: 1e-12, label: `random network ${trial}`, inputs: { n, parameters } });
    }
  });

  it("edges below the first step get nothing, and NaN edges are ignored", () => {
    const pairs = edgePairs(3);
    const enhancer = new ThresholdFreeEnhancer(pairs.regionA, pairs.regionB, 3, { extentExponent: 0.5, heightExponent: 2, step: 0.1 });
    const out = enhancer.enhanceTail([0.05, NaN, 2], [1], new Float64Array(3));
    expect(out[0]).toBe(0);
    expect(out[1]).toBe(0);
    expect(out[2]).toBeGreaterThan(0);
  });
});
