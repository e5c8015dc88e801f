// Family-wise error-corrected p-values from a null distribution of maxima
// (src/inference/familywiseP.ts) against:
//   1. the definitions, re-implemented here independently by plain counting:
//      b = #{null values ≥ observed} (Westfall & Young 1993, Resampling-Based Multiple Testing,
//      Wiley, the single-step maxT adjustment); exact enumeration of all M relabelings, the
//      identity among them: p = b / M; Monte Carlo with K random relabelings, the identity not
//      among them: p = (1 + b) / (1 + K) (Phipson & Smyth 2010, Stat. Appl. Genet. Mol. Biol.
//      9(1):39, eq. 2 and §3: "permutation p-values should never be zero");
//   2. R's binom.test(b, n, conf.level)$conf.int for the Clopper–Pearson (1934, Biometrika
//      26:404) interval, in test/fixtures/r/clopper_pearson.json, made by the committed script
//      test/fixtures/r/clopper_pearson.R (R 4.2.2).
import fc from "fast-check";
import seedrandom from "seedrandom";
import { describe, expect, it } from "vitest";
import { clopperPearson, criticalValue, exceedanceCounts, familywiseP } from "../../../src/inference/familywiseP.js";
import { expectClose } from "../../helpers/close.js";
import { loadFixture } from "../../helpers/fixtures.js";

/** b by the definition: how many null values are ≥ the query (NaN is ≥ nothing). */
function countAtLeast(nullValues: ArrayLike<number>, query: number): number {
  let b = 0;
  for (let i = 0; i < nullValues.length; i++) if (nullValues[i] >= query) b++;
  return b;
}

/** Null values with many ties, as extents are (small integers), or continuous, as masses are. */
function drawNull(random: () => number, n: number, kind: "extent" | "mass"): Float64Array {
  return Float64Array.from({ length: n }, () => (kind === "extent" ? Math.floor(random() * 6) : random() * 10));
}

describe("exceedanceCounts(null, queries) counts null values ≥ each query", () => {
  it("matches plain counting on seeded draws with ties, and at, below and above every null value", () => {
    const random = seedrandom("familywise-exceedance");
    for (const kind of ["extent", "mass"] as const) {
      for (const n of [1, 2, 7, 199, 252]) {
        const nullValues = drawNull(random, n, kind);
        const queries = [...nullValues, ...Array.from(nullValues, (v) => v + 0.5), -1, 0, 1e9, -Infinity, Infinity];
        const counts = exceedanceCounts(nullValues, queries);
        // Reference: the definition by a plain loop (exact integers).
        expect(Array.from(counts)).toEqual(queries.map((q) => countAtLeast(nullValues, q)));
      }
    }
  });

  it("gives −1 for a NaN query (an edge without a statistic has no p-value)", () => {
    expect(Array.from(exceedanceCounts([1, 2, 3], [NaN, 2]))).toEqual([-1, 2]);
  });

  it("never counts a NaN null value as an exceedance (NaN ≥ q is false)", () => {
    // A relabeling in which every edge lacks a statistic has max_statistic NaN (nullMaxima.ts).
    const nullValues = [1, NaN, 3, 2];
    const queries = [0, 1.5, 2.5, 3, 4];
    // Reference: the definition (countAtLeast), which the doc comment of exceedanceCounts states.
    expect(Array.from(exceedanceCounts(nullValues, queries))).toEqual(queries.map((q) => countAtLeast(nullValues, q)));
  });

  it("treats −0 and +0 as equal (a zero extent must count as reaching a zero query)", () => {
    expect(Array.from(exceedanceCounts([-0, 0, 0], [0, -0]))).toEqual([3, 3]);
  });
});

describe("familywiseP: exact p = b/M, Monte Carlo p = (1 + b)/(1 + K) (Phipson & Smyth 2010)", () => {
  it("exact mode: p is b/M, computed with the same division (compared exactly)", () => {
    const random = seedrandom("familywise-exact");
    const M = 252;
    const nullValues = drawNull(random, M, "extent");
    const observed = [0, 1, 2, 3, 4, 5, 6, 2.5, NaN];
    const result = familywiseP(nullValues, observed, true);
    observed.forEach((q, i) => {
      if (Number.isNaN(q)) {
        expect(result[i].p).toBeNaN();
        return;
      }
      const b = countAtLeast(nullValues, q);
      expect(result[i].exceedances).toBe(b);
      expect(result[i].p).toBe(b / M);
      // No interval is reported for an exact p.
      expect(result[i].low).toBeNaN();
      expect(result[i].high).toBeNaN();
    });
  });

  it("exact mode: the identity is one of the M rows, so the smallest p is 1/M, never 0", () => {
    const nullValues = [7, 1, 2, 3]; // row 1 is the observed value itself
    const [r] = familywiseP(nullValues, [7], true);
    expect(r.p).toBe(1 / 4);
  });

  it("Monte Carlo: p is (1 + b)/(1 + K), never 0, at least 1/(K + 1)", () => {
    const random = seedrandom("familywise-monte-carlo");
    for (const K of [1, 9, 199, 999]) {
      const nullValues = drawNull(random, K, "mass");
      const observed = [-1, 0, 2.5, 5, 9.999, 10, 1e6];
      const result = familywiseP(nullValues, observed, false);
      observed.forEach((q, i) => {
        const b = countAtLeast(nullValues, q);
        expect(result[i].exceedances).toBe(b);
        expect(result[i].p).toBe((1 + b) / (1 + K));
        expect(result[i].p).toBeGreaterThan(0);
        expect(result[i].p).toBeGreaterThanOrEqual(1 / (K + 1));
        expect(result[i].p).toBeLessThanOrEqual(1);
      });
    }
  });

  it("Monte Carlo: an observed value above every null value gets exactly 1/(K + 1), not 0", () => {
    const [r] = familywiseP([0, 0, 1, 2], [100], false);
    expect(r.p).toBe(1 / 5);
    expect(r.exceedances).toBe(0);
  });

  it("Monte Carlo: ties count as exceedances (≥, not >)", () => {
    const [r] = familywiseP([3, 3, 3, 1], [3], false);
    expect(r.exceedances).toBe(3);
    expect(r.p).toBe(4 / 5);
  });

  it("a property: p is non-increasing in the observed value, in both modes (fast-check)", () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 0, max: 20 }), { minLength: 1, maxLength: 60 }),
        fc.integer({ min: -1, max: 21 }),
        fc.integer({ min: -1, max: 21 }),
        (nullValues, a, b) => {
          const [low, high] = [Math.min(a, b), Math.max(a, b)];
          for (const exact of [true, false]) {
            const [pLow, pHigh] = familywiseP(nullValues, [low, high], exact);
            if (pHigh.p > pLow.p) return false;
          }
          return true;
        },
      ),
      { seed: 20240611, numRuns: 300 },
    );
  });
});

describe("criticalValue: observed values above it have p ≤ alpha, at it p > alpha", () => {
  /** p of a value by the definitions above. */
  const pOf = (nullValues: ArrayLike<number>, q: number, exact: boolean) => {
    const b = countAtLeast(nullValues, q);
    return exact ? b / nullValues.length : (1 + b) / (1 + nullValues.length);
  };

  it("on seeded null distributions (extents with ties, continuous masses), alpha 0.01 … 0.5, both modes", () => {
    const random = seedrandom("familywise-critical");
    for (const kind of ["extent", "mass"] as const) {
      for (const n of [19, 99, 199, 252, 999]) {
        const nullValues = drawNull(random, n, kind);
        for (const alpha of [0.01, 0.05, 0.1, 0.2, 0.5]) {
          for (const exact of [true, false]) {
            const critical = criticalValue(nullValues, alpha, exact);
            const where = `${kind}, n = ${n}, alpha = ${alpha}, ${exact ? "exact" : "Monte Carlo"}, critical = ${critical}`;
            if (critical === Infinity) {
              // Only when even b = 0 is not significant: Monte Carlo with 1/(1 + K) > alpha.
              expect(exact, where).toBe(false);
              expect(1 / (1 + n), where).toBeGreaterThan(alpha);
              continue;
            }
            // Just above the critical value (the next representable double, and every null value above it).
            const above = [critical + Math.max(1e-9, Math.abs(critical) * 1e-12), ...Array.from(nullValues).filter((v) => v > critical)];
            for (const q of above) expect(pOf(nullValues, q, exact), `${where}, observed ${q}`).toBeLessThanOrEqual(alpha);
            expect(pOf(nullValues, critical, exact), `${where}, observed = critical`).toBeGreaterThan(alpha);
          }
        }
      }
    }
  });

  it("treats a NaN null value as exceeding nothing (like −∞), so it cannot become the critical value", () => {
    // Definition: b(q) = #{null ≥ q}; NaN ≥ q is false. With null {1, NaN, 3, 2}, exact, alpha 0.25:
    // p(q) = b/4 ≤ 0.25 needs b ≤ 1, true for q in (2, 3] and false at 2, so the critical value is 2.
    expect(criticalValue([1, NaN, 3, 2], 0.25, true)).toBe(2);
    // alpha 0.2: b ≤ 0 needed, true above 3 only; the critical value is 3 (was NaN with NaN sorted last).
    expect(criticalValue([1, NaN, 3, 2], 0.2, true)).toBe(3);
  });

  it("is Infinity when no p can reach alpha: Monte Carlo with K = 10 at alpha 0.05 (smallest p = 1/11)", () => {
    expect(criticalValue(Float64Array.from({ length: 10 }, (_, i) => i), 0.05, false)).toBe(Infinity);
  });

  it("lands on the right order statistic when alpha·(1 + K) is a whole number (K = 199, alpha = 0.05: b ≤ 9)", () => {
    // (1 + b)/200 ≤ 0.05 ⇔ b ≤ 9; the critical value is the 10th largest null value.
    const nullValues = Float64Array.from({ length: 199 }, (_, i) => i + 1); // 1 … 199
    expect(criticalValue(nullValues, 0.05, false)).toBe(190);
    // Exact with M = 200 and alpha = 0.05: b/200 ≤ 0.05 ⇔ b ≤ 10; the 11th largest of 1 … 200.
    expect(criticalValue(Float64Array.from({ length: 200 }, (_, i) => i + 1), 0.05, true)).toBe(190);
  });
});

interface ClopperPearsonFixture {
  generated_by: string;
  r_version: string;
  cases: { successes: number; trials: number; level: number; low: number; high: number }[];
}

describe("clopperPearson vs R binom.test()$conf.int (test/fixtures/r/clopper_pearson.json)", () => {
  const fixture = loadFixture<ClopperPearsonFixture>("r/clopper_pearson.json");

  it(`agrees on ${fixture.cases.length} (b, n, level) cases, n = 1 … 100000`, () => {
    expect(fixture.cases.length).toBeGreaterThan(100);
    for (const c of fixture.cases) {
      const { low, high } = clopperPearson(c.successes, c.trials, c.level);
      // Tolerance: 1e-8 relative plus 1e-14 absolute (for the limits at 0 and 1). clopperPearson
      // inverts the beta distribution with jStat.beta.inv, an iterative solver; measured against
      // this fixture: worst 1.9e-9 relative (b = 49, n = 10000). An interval reported beside a
      // Monte Carlo p needs far less.
      const options = { rel: 1e-8, abs: 1e-14, inputs: c };
      expectClose(low, c.low, { ...options, label: `lower limit, binom.test(${c.successes}, ${c.trials}, conf.level = ${c.level})` });
      expectClose(high, c.high, { ...options, label: `upper limit, binom.test(${c.successes}, ${c.trials}, conf.level = ${c.level})` });
    }
  });

  it("familywiseP reports the 95 % interval of b/K in Monte Carlo mode", () => {
    const nullValues = Float64Array.from({ length: 999 }, (_, i) => i % 100); // 49 values ≥ 95
    const [r] = familywiseP(nullValues, [95], false);
    const reference = fixture.cases.find((c) => c.trials === 999 && c.successes === r.exceedances && c.level === 0.95);
    expect(r.exceedances).toBe(countAtLeast(nullValues, 95));
    if (reference) {
      // Tolerance as above.
      expectClose(r.low, reference.low, { rel: 1e-8, abs: 1e-14, label: "p_fwe_low vs binom.test(49, 999)" });
      expectClose(r.high, reference.high, { rel: 1e-8, abs: 1e-14, label: "p_fwe_high vs binom.test(49, 999)" });
    } else {
      // b = 49 of 999 is in the fixture; keep the check honest if the data above change.
      throw new Error(`no fixture row for b = ${r.exceedances}, n = 999`);
    }
  });
});

describe("ties within rounding", () => {
  it("a null value an ulp below the observed one counts as reaching it (mirror-image relabelings; common practice)", () => {
    const observed = 2.5;
    const justBelow = 2.5 - 2 * Number.EPSILON * 2.5;
    expect(Array.from(exceedanceCounts([justBelow, 2.4, 2.6], [observed]))).toEqual([2]);
    // A real difference (1e-6 relative) is not a tie.
    expect(Array.from(exceedanceCounts([observed * (1 - 1e-6)], [observed]))).toEqual([0]);
  });
});
