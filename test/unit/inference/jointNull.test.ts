// The family null of error control across contrasts (src/inference/jointNull.ts) and the p-values
// from it, against the definition re-implemented here by plain loops: the joint null of the maxima
// (Winkler, Webster, Brooks, Tracey, Smith & Nichols 2016, Human Brain Mapping 37:1486, "Non-parametric
// combination and related permutation tests for neuroimaging"; citation from memory) takes, for
// relabeling k, the largest value over every contrast; a contrast's observed value v then has
// b = #{k : max over contrasts of null_c[k] ≥ v} and p_FWE = (1 + b)/(1 + K) for K Monte Carlo
// relabelings (Phipson & Smyth 2010) or b/M when all M are enumerated (Westfall & Young 1993).
// Values are drawn with ties and the odd NaN (a relabeling without any statistic) on purpose.
import seedrandom from "seedrandom";
import { describe, expect, it } from "vitest";
import { familywiseP } from "../../../src/inference/familywiseP.js";
import { jointNull } from "../../../src/inference/jointNull.js";
import type { NullChunk } from "../../../src/permute/nullRangeTypes.js";

function drawChunk(random: () => number, from: number, count: number, extraNames: string[]): NullChunk {
  const draw = (integer: boolean) =>
    Float64Array.from({ length: count }, () => (random() < 0.03 ? NaN : integer ? Math.floor(random() * 5) : random() * 6));
  return {
    from,
    to: from + count,
    maxExtent: draw(true),
    maxMass: draw(false),
    maxStatistic: draw(false),
    extraNames,
    extra: extraNames.map(() => draw(false)),
  };
}

/** max over contrasts of row k, skipping NaN (NaN when every contrast is NaN): the definition, by a plain loop. */
function bruteRowMax(columns: Float64Array[], k: number): number {
  let best = NaN;
  for (const column of columns) {
    const v = column[k];
    if (Number.isNaN(v)) continue;
    if (Number.isNaN(best) || v > best) best = v;
  }
  return best;
}

/** p_FWE of v by counting relabelings whose largest value over the contrasts reaches v. */
function bruteP(columns: Float64Array[], v: number, exact: boolean): number {
  const K = columns[0].length;
  let b = 0;
  for (let k = 0; k < K; k++) {
    let reaches = false;
    for (const column of columns) if (column[k] >= v) reaches = true;
    if (reaches) b++;
  }
  return exact ? b / K : (1 + b) / (1 + K);
}

describe("jointNull: the row-wise maxima over contrasts", () => {
  it("every column (extent, mass, statistic, extra columns) equals a plain row-by-row maximum, NaN passed over", () => {
    const random = seedrandom("joint-null-rows");
    for (const contrasts of [1, 2, 3, 5]) {
      const chunks = Array.from({ length: contrasts }, () => drawChunk(random, 1, 257, ["max_enhanced", "max_extent_t3.5"]));
      const joint = jointNull(chunks);
      expect([joint.from, joint.to, joint.extraNames]).toEqual([1, 258, ["max_enhanced", "max_extent_t3.5"]]);
      const pick: ((c: NullChunk) => Float64Array)[] = [(c) => c.maxExtent, (c) => c.maxMass, (c) => c.maxStatistic, (c) => c.extra[0], (c) => c.extra[1]];
      for (const column of pick) {
        const expected = Array.from({ length: 257 }, (_, k) => bruteRowMax(chunks.map(column), k));
        expect(Array.from(column(joint))).toEqual(expected);
      }
    }
  });

  it("p_FWE from the joint null equal the brute-force count over the per-contrast nulls (Monte Carlo and exact)", () => {
    const random = seedrandom("joint-null-p");
    for (const exact of [false, true]) {
      const chunks = Array.from({ length: 3 }, () => drawChunk(random, 1, 499, []));
      const joint = jointNull(chunks);
      for (const [name, column] of [
        ["extent", (c: NullChunk) => c.maxExtent],
        ["statistic", (c: NullChunk) => c.maxStatistic],
      ] as const) {
        // Observed values: every null value (ties), values between them, and the extremes.
        const observed = [0, 1, 2, 3, 4, 5, 0.5, 2.5, 5.999, 6.5, ...Array.from(chunks[1].maxStatistic).slice(0, 40).filter((v) => !Number.isNaN(v))];
        const p = familywiseP(column(joint), observed, exact).map((r) => r.p);
        const expected = observed.map((v) => bruteP(chunks.map(column), v, exact));
        p.forEach((value, i) => expect(value, `${name}, exact ${exact}, observed ${observed[i]}`).toBeCloseTo(expected[i], 15));
      }
    }
  });

  it("a contrast's p over the family is never below its p on its own null", () => {
    const random = seedrandom("joint-null-monotone");
    const chunks = Array.from({ length: 2 }, () => drawChunk(random, 1, 199, []));
    const joint = jointNull(chunks);
    const observed = Array.from({ length: 60 }, (_, i) => i / 10);
    const own = familywiseP(chunks[0].maxStatistic, observed, false);
    const family = familywiseP(joint.maxStatistic, observed, false);
    family.forEach((r, i) => expect(r.p).toBeGreaterThanOrEqual(own[i].p));
  });

  it("refuses nulls of different relabelings or columns (a programming error, not a user's)", () => {
    const random = seedrandom("joint-null-refuse");
    expect(() => jointNull([drawChunk(random, 1, 10, []), drawChunk(random, 2, 10, [])])).toThrow(RangeError);
    expect(() => jointNull([drawChunk(random, 1, 10, []), drawChunk(random, 1, 10, ["max_enhanced"])])).toThrow(RangeError);
    expect(() => jointNull([])).toThrow(RangeError);
  });
});
