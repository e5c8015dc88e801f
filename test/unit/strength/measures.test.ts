// Strength measures (src/strength/measures.ts) against their definitions computed here by another
// route: nodal strength as the row sum of the full symmetric matrix without its diagonal,
// s_i = Σ_{j≠i} w_ij, and s_i⁺ = Σ_{j≠i} max(w_ij, 0) (Rubinov & Sporns 2010, NeuroImage 52:1059,
// Table A1); global strength as the mean of all off-diagonal cells (each edge counted twice);
// subnetwork strength as the mean of the chosen cells. The kernels instead accumulate over the
// upper-triangle edge list. A 3-region example is worked by hand from the definition.
// Tolerance: relative 1e-12 plus absolute 1e-14 (different summation orders of a few dozen
// terms; common practice, no source).
import seedrandom from "seedrandom";
import { describe, expect, it } from "vitest";
import { edgePairs } from "../../../src/edges/edgeIndex.js";
import type { Region } from "../../../src/io/regions.js";
import { edgesBetweenSystems, edgesWithinSystem, systemNames } from "../../../src/strength/edgeSets.js";
import { edgeSetMean, globalStrength, nodalStrength } from "../../../src/strength/measures.js";
import { expectAllClose, expectClose } from "../../helpers/close.js";

const TOLERANCE = { rel: 1e-12, abs: 1e-14 };

/** Random symmetric N × N matrices (values in −0.5 … 1, diagonal 1), one per subject. */
function randomMatrices(seed: string, subjects: number, regions: number): number[][][] {
  const random = seedrandom(seed);
  return Array.from({ length: subjects }, () => {
    const m = Array.from({ length: regions }, () => new Array<number>(regions).fill(1));
    for (let i = 0; i < regions; i++) {
      for (let j = i + 1; j < regions; j++) {
        const w = Math.round((random() * 1.5 - 0.5) * 1e6) / 1e6;
        m[i][j] = w;
        m[j][i] = w;
      }
    }
    return m;
  });
}

/** Edge-major data[e·S + s] in the i < j row-major order, the layout of the loaded connectomes. */
function edgeMajor(matrices: number[][][]): Float64Array {
  const S = matrices.length;
  const N = matrices[0].length;
  const out: number[] = [];
  for (let i = 0; i < N; i++) for (let j = i + 1; j < N; j++) for (let s = 0; s < S; s++) out.push(matrices[s][i][j]);
  return Float64Array.from(out);
}

/** Row sums without the diagonal, region-major [i·S + s]. */
function rowSums(matrices: number[][][], transform: (w: number) => number): Float64Array {
  const S = matrices.length;
  const N = matrices[0].length;
  const out = new Float64Array(N * S);
  for (let s = 0; s < S; s++) {
    for (let i = 0; i < N; i++) {
      let sum = 0;
      for (let j = 0; j < N; j++) if (j !== i) sum += transform(matrices[s][i][j]);
      out[i * S + s] = sum;
    }
  }
  return out;
}

describe("nodal strength", () => {
  it("nodalStrength of a 3-region matrix [[·,1,−2],[1,·,3],[−2,3,·]] is (−1, 4, 1), positive-only (1, 4, 3) (worked by hand)", () => {
    const data = Float64Array.from([1, -2, 3]); // one subject: edges (0,1), (0,2), (1,2)
    const pairs = edgePairs(3);
    expectAllClose(nodalStrength(data, 1, pairs, { positiveOnly: false, mean: false }), [-1, 4, 1], { abs: 0, rel: 0, label: "sum" });
    expectAllClose(nodalStrength(data, 1, pairs, { positiveOnly: true, mean: false }), [1, 4, 3], { abs: 0, rel: 0, label: "positive" });
    expectAllClose(nodalStrength(data, 1, pairs, { positiveOnly: false, mean: true }), [-0.5, 2, 0.5], { abs: 0, rel: 0, label: "mean" });
    expectClose(globalStrength(data, 1, 3, false)[0], 2 / 3, { rel: 1e-15, label: "global = (1 − 2 + 3)/3" });
    expectClose(globalStrength(data, 1, 3, true)[0], 4 / 3, { rel: 1e-15, label: "global positive = (1 + 0 + 3)/3" });
  });

  it("nodalStrength equals the row sums of the full matrices (sum, positive-only, mean)", () => {
    const matrices = randomMatrices("nodal", 7, 9);
    const data = edgeMajor(matrices);
    const pairs = edgePairs(9);
    const inputs = { matrices };
    expectAllClose(nodalStrength(data, 7, pairs, { positiveOnly: false, mean: false }), rowSums(matrices, (w) => w), { ...TOLERANCE, label: "sum", inputs });
    expectAllClose(nodalStrength(data, 7, pairs, { positiveOnly: true, mean: false }), rowSums(matrices, (w) => Math.max(w, 0)), {
      ...TOLERANCE,
      label: "positive-only",
      inputs,
    });
    expectAllClose(
      nodalStrength(data, 7, pairs, { positiveOnly: false, mean: true }),
      rowSums(matrices, (w) => w).map((v) => v / 8),
      { ...TOLERANCE, label: "mean over N − 1", inputs },
    );
  });

  it("nodalStrength does not change its input", () => {
    const data = edgeMajor(randomMatrices("unchanged", 3, 5));
    const before = Float64Array.from(data);
    nodalStrength(data, 3, edgePairs(5), { positiveOnly: true, mean: true });
    expect(data).toEqual(before);
  });
});

describe("global and subnetwork strength", () => {
  const matrices = randomMatrices("sets", 6, 8);
  const data = edgeMajor(matrices);
  const pairs = edgePairs(8);
  const systems = ["a", "a", "b", "b", "b", "c", "a", "c"];
  const regions: Region[] = systems.map((system, i) => ({ label: `r${i + 1}`, system }));

  /** Mean of the cells (i, j), i ≠ j, that `keep` selects, over the full matrix. */
  function cellMean(keep: (i: number, j: number) => boolean, transform: (w: number) => number = (w) => w): Float64Array {
    return Float64Array.from(matrices, (m) => {
      let sum = 0;
      let count = 0;
      for (let i = 0; i < 8; i++) {
        for (let j = 0; j < 8; j++) {
          if (i !== j && keep(i, j)) {
            sum += transform(m[i][j]);
            count++;
          }
        }
      }
      return sum / count;
    });
  }

  it("globalStrength is the mean of all off-diagonal cells", () => {
    expectAllClose(globalStrength(data, 6, pairs.edgeCount, false), cellMean(() => true), { ...TOLERANCE, label: "global" });
    expectAllClose(globalStrength(data, 6, pairs.edgeCount, true), cellMean(() => true, (w) => Math.max(w, 0)), {
      ...TOLERANCE,
      label: "global, positive-only",
    });
  });

  it("edges within a system and between two systems give the mean of exactly those cells", () => {
    expect(systemNames(regions)).toEqual(["a", "b", "c"]);
    const within = edgesWithinSystem(regions, pairs, "a");
    expect(within.length).toBe(3); // regions 1, 2, 7: three pairs
    expectAllClose(edgeSetMean(data, 6, within, false), cellMean((i, j) => systems[i] === "a" && systems[j] === "a"), {
      ...TOLERANCE,
      label: "within a",
    });
    const between = edgesBetweenSystems(regions, pairs, "b", "c");
    expect(between.length).toBe(6); // 3 regions of b × 2 of c
    expectAllClose(
      edgeSetMean(data, 6, between, true),
      cellMean((i, j) => (systems[i] === "b" && systems[j] === "c") || (systems[i] === "c" && systems[j] === "b"), (w) => Math.max(w, 0)),
      { ...TOLERANCE, label: "between b and c, positive-only" },
    );
  });

  it("edgeSetMean does not depend on the order the edges are listed in, and is NaN for an empty set", () => {
    const edges = [17, 3, 25, 0, 9];
    expect(edgeSetMean(data, 6, edges, false)).toEqual(edgeSetMean(data, 6, [...edges].sort((x, y) => x - y), false));
    expect(Array.from(edgeSetMean(data, 6, [], false)).every(Number.isNaN)).toBe(true);
  });
});
