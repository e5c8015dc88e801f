// Exact enumeration of relabelings (src/permute/relabelings.ts, multisetPermutations.ts)
// against brute force written here from the definitions of Winkler, Ridgway, Webster, Smith &
// Nichols (2014, NeuroImage 92:381, §2.3–2.6): a relabeling permutes the design rows (within
// exchangeability blocks, or whole blocks as units) or flips signs (per subject or per block);
// two relabelings are the same when they give the same sequence of design rows (identical rows
// are interchangeable), so the distinct ones are the distinct arrangements of the row types;
// and lexicographic order of multiset arrangements as defined by Knuth (TAOCP vol. 4A, 2011,
// §7.2.1.2). All comparisons are exact (integers and integer sequences).
import { describe, expect, it } from "vitest";
import { multinomialCount, rankArrangement, unrankArrangement } from "../../../src/permute/multisetPermutations.js";
import { countDistinct, designRowTypes, planRelabelings, Relabeler } from "../../../src/permute/relabelings.js";
import { allPermutations } from "./cohortFiles.js";

/** Distinct row-type sequences over all permutations of subjects that keep each one in its block. */
function bruteWithinBlocks(rowTypes: number[], blocks: number[]): Set<string> {
  const out = new Set<string>();
  for (const p of allPermutations(rowTypes.length)) {
    if (p.some((source, s) => blocks[source] !== blocks[s])) continue;
    out.add(p.map((source) => rowTypes[source]).join(","));
  }
  return out;
}

/** Distinct row-type sequences over all orders of whole blocks (order inside a block kept). */
function bruteWholeBlocks(rowTypes: number[], blocks: number[]): Set<string> {
  const members: number[][] = [];
  blocks.forEach((b, s) => (members[b] ??= []).push(s));
  const out = new Set<string>();
  for (const order of allPermutations(members.length)) {
    const sequence = new Array<number>(rowTypes.length);
    members.forEach((positions, b) => positions.forEach((s, i) => (sequence[s] = rowTypes[members[order[b]][i]])));
    out.add(sequence.join(","));
  }
  return out;
}

/** Enumerates a plan with the Relabeler: the row-type sequence of each k, in order. */
function enumerate(rowTypes: number[], blocks: number[] | undefined, wholeBlocks: boolean, requested: number): string[] {
  const plan = planRelabelings({ kind: "permute", rowTypes, blocks, wholeBlocks, seed: 1, requested });
  expect(plan.exact).toBe(true);
  const relabeler = new Relabeler(plan);
  const out = new Int32Array(rowTypes.length);
  const sequences: string[] = [];
  for (let k = 1; k <= plan.count; k++) {
    relabeler.permutation(k, out);
    // A relabeling must be a permutation of the subjects.
    expect([...out].sort((a, b) => a - b)).toEqual(rowTypes.map((_, s) => s));
    sequences.push(Array.from(out, (source) => rowTypes[source]).join(","));
  }
  return sequences;
}

const cases: { name: string; rowTypes: number[]; blocks?: number[]; whole?: boolean }[] = [
  { name: "two groups 4 + 4 (model `group`)", rowTypes: [0, 1, 1, 0, 1, 0, 0, 1] },
  { name: "unequal groups 2 + 6", rowTypes: [1, 0, 0, 0, 0, 1, 0, 0] },
  // group × sex cells of sizes 3, 2, 2, 1: a two-level covariate makes four row types.
  { name: "group + sex (four row types, cells 3, 2, 2, 1)", rowTypes: [0, 1, 2, 0, 3, 2, 1, 0] },
  { name: "within 2 blocks", rowTypes: [0, 1, 1, 0, 1, 0, 0, 1], blocks: [0, 0, 0, 0, 1, 1, 1, 1] },
  { name: "within 3 blocks of unequal size", rowTypes: [0, 1, 1, 0, 1, 0, 0, 1], blocks: [0, 1, 0, 2, 1, 2, 1, 0] },
  { name: "whole blocks, 4 of 2, two alike", rowTypes: [0, 1, 1, 0, 0, 1, 1, 1], blocks: [0, 0, 1, 1, 2, 2, 3, 3], whole: true },
  { name: "whole blocks, 4 of 2, all different", rowTypes: [0, 1, 1, 0, 0, 0, 1, 1], blocks: [0, 0, 1, 1, 2, 2, 3, 3], whole: true },
];

describe("the number of distinct relabelings equals a brute-force count over all S! permutations", () => {
  for (const c of cases) {
    it(c.name, () => {
      const blocks = c.blocks ?? c.rowTypes.map(() => 0);
      const brute = c.whole ? bruteWholeBlocks(c.rowTypes, blocks) : bruteWithinBlocks(c.rowTypes, blocks);
      expect(countDistinct("permute", c.rowTypes, blocks, c.whole ?? false)).toBe(brute.size);
    });
  }

  it("group + sex with cells 3, 2, 2, 3 (S = 10): 10!/(3!·2!·2!·3!) = 25200 (multinomial coefficient)", () => {
    const rowTypes = [0, 0, 0, 1, 1, 2, 2, 3, 3, 3];
    // Reference: the multinomial coefficient computed here with exact BigInt factorials.
    const factorial = (n: number): bigint => (n <= 1 ? 1n : BigInt(n) * factorial(n - 1));
    const expected = factorial(10) / (factorial(3) * factorial(2) * factorial(2) * factorial(3));
    expect(expected).toBe(25200n);
    expect(countDistinct("permute", rowTypes, new Array(10).fill(0), false)).toBe(Number(expected));
    expect(multinomialCount([3, 2, 2, 3])).toBe(25200);
  });

  it("sign flips: 2^S per subject, 2^B for whole blocks", () => {
    expect(countDistinct("sign-flip", new Array(8).fill(0), new Array(8).fill(0), false)).toBe(256);
    expect(countDistinct("sign-flip", new Array(8).fill(0), [0, 0, 1, 1, 2, 2, 3, 3], true)).toBe(16);
  });

  it("designRowTypes codes identical design rows alike (intercept, group, sex)", () => {
    const rows = [
      [1, 0, 0],
      [1, 1, 0],
      [1, 0, 1],
      [1, 0, 0],
      [1, 1, 1],
      [1, 1, 0],
    ];
    expect(designRowTypes(Float64Array.from(rows.flat()), 6, 3)).toEqual([0, 1, 2, 0, 3, 1]);
  });
});

describe("exact enumeration: every distinct relabeling once, the identity first", () => {
  for (const c of cases) {
    it(c.name, () => {
      const blocks = c.blocks ?? c.rowTypes.map(() => 0);
      const brute = c.whole ? bruteWholeBlocks(c.rowTypes, blocks) : bruteWithinBlocks(c.rowTypes, blocks);
      const sequences = enumerate(c.rowTypes, c.blocks, c.whole ?? false, brute.size);
      expect(sequences.length).toBe(brute.size);
      expect(new Set(sequences).size).toBe(sequences.length); // all distinct
      expect(new Set(sequences)).toEqual(brute); // exactly the brute-force set
      const identity = c.rowTypes.join(",");
      expect(sequences[0]).toBe(identity);
      expect(sequences.indexOf(identity, 1)).toBe(-1); // the identity appears once
    });
  }

  it("without blocks, k = 2, 3, … run through the arrangements in lexicographic order, skipping the identity", () => {
    // Row types as designRowTypes codes them: in order of first appearance (subject 0 has type 0).
    for (const rowTypes of [
      [0, 1, 1, 0, 1, 0, 0, 1],
      [0, 1, 2, 2, 1, 0, 1],
      [0, 0, 1, 1, 1],
    ]) {
      // Reference: all distinct arrangements, sorted lexicographically (Knuth's definition).
      const all = [...bruteWithinBlocks(rowTypes, rowTypes.map(() => 0))]
        .map((s) => s.split(",").map(Number))
        .sort((a, b) => {
          for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return a[i] - b[i];
          return 0;
        })
        .map((s) => s.join(","));
      const identity = rowTypes.join(",");
      const sequences = enumerate(rowTypes, undefined, false, all.length);
      expect(sequences).toEqual([identity, ...all.filter((s) => s !== identity)]);
    }
  });

  it("asking for more permutations than exist enumerates them all (M, not the request)", () => {
    const plan = planRelabelings({ kind: "permute", rowTypes: [0, 0, 1, 1], wholeBlocks: false, seed: 3, requested: 1000 });
    expect(plan).toMatchObject({ exact: true, count: 6, distinct: 6 });
    const atLimit = planRelabelings({ kind: "permute", rowTypes: [0, 0, 1, 1], wholeBlocks: false, seed: 3, requested: 6 });
    expect(atLimit.exact).toBe(true);
    const below = planRelabelings({ kind: "permute", rowTypes: [0, 0, 1, 1], wholeBlocks: false, seed: 3, requested: 5 });
    expect(below).toMatchObject({ exact: false, count: 5 });
  });

  it("exact sign flips: k gives the binary digits of k − 1 (bit u flips subject u); all 2^S distinct", () => {
    const S = 6;
    const plan = planRelabelings({ kind: "sign-flip", rowTypes: new Array(S).fill(0), wholeBlocks: false, seed: 1, requested: 64 });
    expect(plan).toMatchObject({ exact: true, count: 64 });
    const relabeler = new Relabeler(plan);
    const signs = new Float64Array(S);
    const seen = new Set<string>();
    for (let k = 1; k <= 64; k++) {
      relabeler.signs(k, signs);
      const expected = Array.from({ length: S }, (_, u) => (((k - 1) >> u) & 1 ? -1 : 1));
      expect(Array.from(signs), `k = ${k}`).toEqual(expected);
      seen.add(signs.join(","));
    }
    expect(seen.size).toBe(64);
  });

  it("exact whole-block sign flips flip every member of a block together", () => {
    const blocks = [0, 0, 1, 1, 1, 2];
    const plan = planRelabelings({ kind: "sign-flip", rowTypes: new Array(6).fill(0), blocks, wholeBlocks: true, seed: 1, requested: 100 });
    expect(plan).toMatchObject({ exact: true, count: 8 });
    const relabeler = new Relabeler(plan);
    const signs = new Float64Array(6);
    for (let k = 1; k <= 8; k++) {
      relabeler.signs(k, signs);
      expect(Array.from(signs), `k = ${k}`).toEqual(blocks.map((b) => (((k - 1) >> b) & 1 ? -1 : 1)));
    }
  });
});

describe("multiset arrangements: rank and unrank in lexicographic order (Knuth 2011, §7.2.1.2)", () => {
  it("unrankArrangement(r) is the r-th arrangement of the sorted brute-force list, and rankArrangement inverts it", () => {
    for (const counts of [
      [2, 2],
      [3, 2, 1],
      [1, 1, 1, 1],
      [4, 0, 2],
      [2, 3, 2],
    ]) {
      const multiset = counts.flatMap((n, t) => new Array<number>(n).fill(t));
      const all = [...bruteWithinBlocks(multiset, multiset.map(() => 0))]
        .map((s) => s.split(",").map(Number))
        .sort((a, b) => {
          for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return a[i] - b[i];
          return 0;
        });
      expect(multinomialCount(counts)).toBe(all.length);
      const out = new Int32Array(multiset.length);
      all.forEach((sequence, r) => {
        unrankArrangement(r, counts, out);
        expect(Array.from(out), `counts ${counts}, rank ${r}`).toEqual(sequence);
        expect(rankArrangement(sequence, counts.length)).toBe(r);
      });
    }
  });

  it("multinomialCount stays exact to 2^53 and reports Infinity beyond (C(60,30) ≈ 1.18e17 is beyond)", () => {
    // C(50,25) = 126410606437752 (exact integer, below 2^53) — checked here with BigInt arithmetic.
    let binomial = 1n;
    for (let i = 1n; i <= 25n; i++) binomial = (binomial * (25n + i)) / i;
    expect(multinomialCount([25, 25])).toBe(Number(binomial));
    expect(multinomialCount([30, 30])).toBe(Infinity);
  });
});
