// False discovery rate adjustment (src/inference/fdr.ts: Benjamini & Hochberg 1995, JRSS B
// 57:289-300; Benjamini & Yekutieli 2001, Ann. Stat. 29:1165-1188) against:
//   1. R's p.adjust(p, "BH") and p.adjust(p, "BY") (test/fixtures/r/padjust.json, made by
//      test/fixtures/r/runner.R, R 4.2.2), NA entries included;
//   2. the worked example of Benjamini & Hochberg (1995) (test/fixtures/published/bh1995.json):
//      15 p-values, 4 rejected at q = 0.05;
//   3. @stdlib/stats-padjust 0.2.1 (dev dependency) on seeded random vectors.
// Tolerance: relative 4 EPS (≈ 8.9e-16) everywhere; the adjustment is a product, a division and
// running minima, so both sides round the same few operations (measured: 2.9e-16 vs stdlib).
import fc from "fast-check";
import padjust from "@stdlib/stats-padjust";
import seedrandom from "seedrandom";
import { describe, expect, it } from "vitest";
import { adjustFdr, type FdrVariant } from "../../../src/inference/fdr.js";
import { EPS, expectAllClose } from "../../helpers/close.js";
import { loadFixture, toNumbers, type Bh1995Fixture, type PAdjustFixture } from "../../helpers/fixtures.js";

const REL = 4 * EPS;
const padjustFixture = loadFixture<PAdjustFixture>("r/padjust.json");
const bh1995 = loadFixture<Bh1995Fixture>("published/bh1995.json");

/** stdlib's padjust on the finite entries only, NaN elsewhere (the contract of adjustFdr). */
function stdlibAdjust(p: ArrayLike<number>, variant: FdrVariant): Float64Array {
  const finite: number[] = [];
  const where: number[] = [];
  for (let i = 0; i < p.length; i++) {
    if (Number.isFinite(p[i])) {
      finite.push(p[i]);
      where.push(i);
    }
  }
  const out = new Float64Array(p.length).fill(NaN);
  if (finite.length === 0) return out;
  const adjusted = padjust(finite, variant);
  where.forEach((i, k) => (out[i] = adjusted[k]));
  return out;
}

describe("adjustFdr vs R p.adjust (padjust.json)", () => {
  for (const testCase of padjustFixture.cases) {
    it(`${testCase.name} (n = ${testCase.n}, ${testCase.n_finite} finite): BH and BY within 4 EPS relative, NA → NaN (source: R p.adjust)`, () => {
      const p = toNumbers(testCase.p);
      const inputs = { case: testCase.name, p: testCase.p };
      expectAllClose(adjustFdr(p, "bh"), toNumbers(testCase.bh), { rel: REL, label: "BH vs R p.adjust(p, 'BH')", inputs });
      expectAllClose(adjustFdr(p, "by"), toNumbers(testCase.by), { rel: REL, label: "BY vs R p.adjust(p, 'BY')", inputs });
    });
  }

  it("BH is the default variant", () => {
    const p = toNumbers(padjustFixture.cases[0].p);
    expect(Array.from(adjustFdr(p))).toEqual(Array.from(adjustFdr(p, "bh")));
  });
});

describe("the Benjamini & Hochberg (1995) worked example (bh1995.json)", () => {
  it(`rejects ${bh1995.rejected_at_q} of 15 hypotheses at q = ${bh1995.q} (source: Benjamini & Hochberg 1995, JRSS B 57:289-300)`, () => {
    const q = adjustFdr(Float64Array.from(bh1995.p), "bh");
    const rejected = Array.from(q).filter((v) => v <= bh1995.q).length;
    expect(rejected).toBe(bh1995.rejected_at_q);
    // The four smallest p-values are the ones rejected (the list is ascending).
    expect(Array.from(q).map((v) => v <= bh1995.q)).toEqual(bh1995.p.map((_, i) => i < bh1995.rejected_at_q));
  });

  it("step-up rule written out: the largest i with p_(i) <= i q / m is 4 (source: Benjamini & Hochberg 1995, the procedure as published)", () => {
    const m = bh1995.p.length;
    let largest = 0;
    bh1995.p.forEach((p, k) => {
      if (p <= ((k + 1) * bh1995.q) / m) largest = k + 1;
    });
    expect(largest).toBe(bh1995.rejected_at_q);
  });

  it("adjusted values within 4 EPS relative of R's p.adjust(p, 'BH') (source: bh1995.json r_p_adjust_bh)", () => {
    expectAllClose(adjustFdr(Float64Array.from(bh1995.p), "bh"), bh1995.r_p_adjust_bh, {
      rel: REL,
      label: "BH on the 1995 example vs R",
      inputs: bh1995.p,
    });
  });
});

describe("adjustFdr vs @stdlib/stats-padjust on seeded random vectors", () => {
  /** Vectors with small p-values, ties (rounded to 2 decimals), zeros and ones. */
  function randomVectors(seed: string, count: number): number[][] {
    const random = seedrandom(seed);
    const out: number[][] = [];
    for (let k = 0; k < count; k++) {
      const n = 1 + Math.floor(random() * 300);
      const roundTo = random() < 0.3 ? 100 : 0;
      out.push(
        Array.from({ length: n }, () => {
          const u = random();
          if (u < 0.02) return 0;
          if (u < 0.04) return 1;
          if (u < 0.25) return random() * 1e-4;
          const v = random();
          return roundTo ? Math.round(v * roundTo) / roundTo : v;
        }),
      );
    }
    return out;
  }

  for (const variant of ["bh", "by"] as const) {
    it(`${variant}: 300 random vectors (n 1..300, ties, zeros, ones) within 4 EPS relative of @stdlib/stats-padjust`, () => {
      for (const p of randomVectors(`plexus-fdr-${variant}`, 300)) {
        expectAllClose(adjustFdr(p, variant), padjust(p, variant), {
          rel: REL,
          label: `${variant} vs @stdlib/stats-padjust`,
          inputs: p,
        });
      }
    });
  }

  it("non-finite p-values (NaN, ±Infinity) are skipped: NaN out, and the others equal stdlib's adjustment of the finite ones alone", () => {
    const random = seedrandom("plexus-fdr-nan");
    for (let k = 0; k < 100; k++) {
      const n = 1 + Math.floor(random() * 60);
      const p = Array.from({ length: n }, () => {
        const u = random();
        return u < 0.15 ? NaN : u < 0.18 ? Infinity : u < 0.2 ? -Infinity : random();
      });
      for (const variant of ["bh", "by"] as const) {
        expectAllClose(adjustFdr(p, variant), stdlibAdjust(p, variant), {
          rel: REL,
          label: `${variant} with non-finite entries vs stdlib on the finite subset`,
          inputs: p,
        });
      }
    }
  });
});

describe("adjustFdr properties (fast-check; common practice: properties of step-up adjusted p-values)", () => {
  const pValues = fc.array(
    fc.oneof(fc.double({ min: 0, max: 1, noNaN: true }), fc.constantFrom(0, 1, 0.05, NaN)),
    { maxLength: 80 },
  );

  it("keeps the input untouched and its order; q in [p, 1]; BY >= BH; monotone in p", () => {
    fc.assert(
      fc.property(pValues, (p) => {
        const copy = p.slice();
        const bh = adjustFdr(p, "bh");
        const by = adjustFdr(p, "by");
        expect(p).toEqual(copy);
        expect(bh.length).toBe(p.length);
        for (let i = 0; i < p.length; i++) {
          if (!Number.isFinite(p[i])) {
            expect(bh[i]).toBeNaN();
            expect(by[i]).toBeNaN();
            continue;
          }
          // q >= p up to rounding of m·p/rank (a rank-m p can come back an ulp low): 2 EPS relative.
          expect(bh[i]).toBeGreaterThanOrEqual(p[i] * (1 - 2 * EPS));
          expect(bh[i]).toBeLessThanOrEqual(1);
          expect(by[i]).toBeGreaterThanOrEqual(bh[i]);
          expect(by[i]).toBeLessThanOrEqual(1);
          for (let j = 0; j < p.length; j++) {
            if (Number.isFinite(p[j]) && p[i] <= p[j]) expect(bh[i]).toBeLessThanOrEqual(bh[j]);
          }
        }
      }),
      { seed: 20240611, numRuns: 300 },
    );
  });

  it("an empty input and an all-NaN input give all-NaN outputs of the same length", () => {
    expect(adjustFdr([], "bh").length).toBe(0);
    const q = adjustFdr([NaN, NaN], "by");
    expect(q.length).toBe(2);
    expect(Number.isNaN(q[0]) && Number.isNaN(q[1])).toBe(true);
  });
});
