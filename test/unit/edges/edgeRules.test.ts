// The edge rules on data small enough to count by hand (the expected counts are written out
// below, edge by edge): missing edges, the prevalence fraction compared despite rounding
// (0.07 × 100 = 7.000000000000001 in binary64 must keep an edge present in 7 of 100), and the
// scaling to each participant's total (sums written out by hand).
import { describe, expect, it } from "vitest";
import { edgePairs } from "../../../src/edges/edgeIndex.js";
import { applyEdgeRules, compactEdges, EDGE_KEPT, EDGE_MISSING, EDGE_RARE, keptPairs, regionsWithoutKeptEdge, scaleToTotal } from "../../../src/edges/edgeRules.js";

describe("applyEdgeRules", () => {
  it("counts NaN and non-zero values per edge; missing first, then prevalence", () => {
    // 3 edges × 4 participants, edge-major.
    const data = Float64Array.from([
      1, 2, NaN, 4, // edge 0: one missing, three present
      0, 0, 3, 5, // edge 1: present in 2 of 4
      1, 1, 1, 0, // edge 2: present in 3 of 4
    ]);
    const rules = applyEdgeRules(data, 4, 3, { dropMissing: true, presentIn: 0.75 });
    expect([...rules.missing]).toEqual([1, 0, 0]);
    expect([...rules.present]).toEqual([3, 2, 3]);
    expect([...rules.reason]).toEqual([EDGE_MISSING, EDGE_RARE, EDGE_KEPT]);
    expect([...rules.kept]).toEqual([2]);
    expect([...applyEdgeRules(data, 4, 3, { dropMissing: true }).kept]).toEqual([1, 2]);
  });

  it("present_in 0.07 keeps an edge present in 7 of 100 participants (0.07 × 100 rounds above 7), and leaves out one present in 6", () => {
    expect(0.07 * 100).toBeGreaterThan(7); // why the comparison allows for rounding
    const edge = (present: number) => Array.from({ length: 100 }, (_, s) => (s < present ? 1 : 0));
    const rules = applyEdgeRules(Float64Array.from([...edge(7), ...edge(6)]), 100, 2, { dropMissing: false, presentIn: 0.07 });
    expect([...rules.kept]).toEqual([0]);
  });

  it("compacts to the kept edges with their real regions, and names the regions left without an edge", () => {
    const pairs = edgePairs(4); // edges (0,1) (0,2) (0,3) (1,2) (1,3) (2,3)
    const kept = Uint32Array.from([0, 3]); // (0,1), (1,2): region 3 has no kept edge
    const compact = keptPairs(pairs, kept);
    expect([...compact.regionA]).toEqual([0, 1]);
    expect([...compact.regionB]).toEqual([1, 2]);
    expect(regionsWithoutKeptEdge(pairs, kept)).toEqual([3]);
    const data = Float64Array.from({ length: 12 }, (_, k) => k); // 6 edges × 2 participants
    expect([...compactEdges(data, 2, kept, new Float64Array(4))]).toEqual([0, 1, 6, 7]);
  });
});

describe("scaleToTotal", () => {
  it("divides each participant's edges by their sum", () => {
    // 2 edges × 2 participants: participant 0 has 1 and 3 (sum 4), participant 1 has 2 and 6 (sum 8).
    const data = Float64Array.from([1, 2, 3, 6]);
    expect([...scaleToTotal(data, 2, 2)]).toEqual([4, 8]);
    expect([...data]).toEqual([0.25, 0.25, 0.75, 0.75]);
  });
});
