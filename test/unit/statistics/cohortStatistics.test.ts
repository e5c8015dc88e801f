import ttest2 from "@stdlib/stats-ttest2";
import { describe as group, expect, it } from "vitest";
import { chiSquareIndependence } from "../../../src/statistics/chiSquareIndependence.js";
import { describe } from "../../../src/statistics/describe.js";
import { fisherExact2x2 } from "../../../src/statistics/fisherExact2x2.js";
import { upperIncompleteGamma } from "../../../src/statistics/upperIncompleteGamma.js";
import { welchAnova } from "../../../src/statistics/welchAnova.js";
import { welchTTest } from "../../../src/statistics/welchTTest.js";
import { EPS, expectClose } from "../../helpers/close.js";
import { loadFixture } from "../../helpers/fixtures.js";

// Reference: test/fixtures/r/report_cohort.json, written by test/fixtures/r/report_cohort.R
// (base R's t.test, oneway.test, chisq.test, fisher.test, quantile; see that script's header).
interface CohortFixture {
  r_version: string;
  welch_t: { name: string; x: number[]; y: number[]; statistic: number; df: number; p_value: number }[];
  welch_anova: { name: string; groups: number[][]; statistic: number; df1: number; df2: number; p_value: number }[];
  chi_square: { name: string; counts: number[][]; statistic: number; df: number; p_value: number; min_expected: number }[];
  fisher: { name: string; counts: number[][]; p_value: number }[];
  describe: { name: string; x: number[]; mean: number; sd: number; median: number; q1: number; q3: number }[];
}

const fixture = loadFixture<CohortFixture>("r/report_cohort.json");

// Tolerances: statistics and df are a few arithmetic operations on the data, so 1e3·EPS relative;
// p-values go through continued fractions (incomplete beta and gamma), so 1e-12 relative
// (R's own pt/pchisq are accurate to about that).
const ARITHMETIC = 1e3 * EPS;
const TAIL = 1e-12;

group(`cohort-table statistics vs R (${fixture.r_version})`, () => {
  for (const c of fixture.welch_t) {
    it(`welchTTest(${c.name}) matches R's t.test(var.equal = FALSE)`, () => {
      const result = welchTTest(c.x, c.y);
      expectClose(result.statistic, c.statistic, { rel: ARITHMETIC, label: `${c.name} t vs R t.test`, inputs: c });
      expectClose(result.df, c.df, { rel: ARITHMETIC, label: `${c.name} df vs R t.test`, inputs: c });
      expectClose(result.pValue, c.p_value, { rel: TAIL, label: `${c.name} p vs R t.test`, inputs: c });
    });
  }

  for (const c of fixture.welch_anova) {
    it(`welchAnova(${c.name}) matches R's oneway.test(var.equal = FALSE)`, () => {
      const result = welchAnova(c.groups);
      expectClose(result.statistic, c.statistic, { rel: ARITHMETIC, label: `${c.name} F vs R oneway.test`, inputs: c });
      expect(result.df1).toBe(c.df1);
      expectClose(result.df2, c.df2, { rel: ARITHMETIC, label: `${c.name} df2 vs R oneway.test`, inputs: c });
      expectClose(result.pValue, c.p_value, { rel: TAIL, label: `${c.name} p vs R oneway.test`, inputs: c });
    });
  }

  for (const c of fixture.chi_square) {
    it(`chiSquareIndependence(${c.name}) matches R's chisq.test(correct = FALSE)`, () => {
      const result = chiSquareIndependence(c.counts);
      expectClose(result.statistic, c.statistic, { rel: ARITHMETIC, label: `${c.name} X² vs R chisq.test`, inputs: c });
      expect(result.df).toBe(c.df);
      // The strong-association case has p ≈ 4.5e-58: the upper tail is computed directly, so it keeps its digits.
      expectClose(result.pValue, c.p_value, { rel: TAIL, label: `${c.name} p vs R chisq.test`, inputs: c });
      expectClose(result.minExpected, c.min_expected, { rel: ARITHMETIC, label: `${c.name} smallest expected count vs R`, inputs: c });
    });
  }

  for (const c of fixture.fisher) {
    it(`fisherExact2x2(${c.name}) matches R's fisher.test`, () => {
      const table = c.counts as [[number, number], [number, number]];
      expectClose(fisherExact2x2(table), c.p_value, { rel: 1e-12, label: `${c.name} p vs R fisher.test`, inputs: c });
    });
  }

  for (const c of fixture.describe) {
    it(`describe(${c.name}) matches R's mean, sd, median and quantile(type = 7)`, () => {
      const d = describe(c.x);
      for (const key of ["mean", "sd", "median", "q1", "q3"] as const) {
        expectClose(d[key], c[key], { rel: ARITHMETIC, abs: 1e-6 * ARITHMETIC, label: `${c.name} ${key} vs R`, inputs: c.x });
      }
    });
  }
});

group("cohort-table statistics vs other references", () => {
  it("Welch's t-test agrees with @stdlib/stats-ttest2 (variance: 'unequal') on every R case", () => {
    for (const c of fixture.welch_t) {
      const reference = ttest2(c.x, c.y, { variance: "unequal" });
      const result = welchTTest(c.x, c.y);
      expectClose(result.statistic, reference.statistic, { rel: ARITHMETIC, label: `${c.name} t vs @stdlib/stats-ttest2`, inputs: c });
      expectClose(result.df, reference.df, { rel: ARITHMETIC, label: `${c.name} df vs @stdlib/stats-ttest2`, inputs: c });
      // stdlib's p for t ≈ −89 (far_apart, p ≈ 4.6e-17) is 2·CDF(−|t|): compare with an absolute floor.
      expectClose(result.pValue, reference.pValue, { rel: 1e-10, abs: 1e-15, label: `${c.name} p vs @stdlib/stats-ttest2`, inputs: c });
    }
  });

  it("Fisher's tea-tasting experiment (3 of 4 cups right each way) has two-sided p = 34/70 (Fisher 1935; from memory)", () => {
    // Hypergeometric: P(4 right) = 1/70, P(3) = 16/70, P(2) = 36/70; the two-sided p sums the tables
    // no more probable than the observed one: (1 + 16 + 16 + 1)/70.
    expectClose(fisherExact2x2([[3, 1], [1, 3]]), 34 / 70, { rel: 1e-13, label: "tea tasting, exact fraction" });
  });

  it("Q(a, x) at a = 1 is exp(−x) and Q(1/2, x) is erfc(√x) (closed forms, Abramowitz & Stegun 6.5.17, 6.5.18)", () => {
    for (const x of [0.01, 0.5, 1, 2, 7.5, 30, 200]) {
      expectClose(upperIncompleteGamma(1, x), Math.exp(-x), { rel: 1e-13, label: `Q(1, ${x}) = exp(-x)` });
    }
    // χ² with 2 df: P(X > q) = exp(−q/2) (closed form), down to ~1e-87.
    for (const q of [0.1, 3, 40, 400]) {
      expectClose(upperIncompleteGamma(1, q / 2), Math.exp(-q / 2), { rel: 1e-13, label: `chi-square df 2 upper tail at ${q}` });
    }
  });

  it("tests that cannot be computed give NaN, never throw (too few values, no variance, one level)", () => {
    expect(Number.isNaN(welchTTest([1], [2, 3]).pValue)).toBe(true);
    expect(Number.isNaN(welchTTest([2, 2], [2, 2]).pValue)).toBe(true);
    expect(Number.isNaN(welchAnova([[1, 2], [3, 3], [4, 6]]).pValue)).toBe(true);
    expect(Number.isNaN(chiSquareIndependence([[3, 4], [0, 0]]).pValue)).toBe(true);
    expect(Number.isNaN(fisherExact2x2([[0, 0], [0, 0]]))).toBe(true);
  });
});
