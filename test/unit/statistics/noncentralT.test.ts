// The noncentral t CDF and the noncentrality interval against R 4.2.2:
// pt(q, df, ncp) over a grid and uniroot on pt for the interval
// (test/fixtures/r/effect_sizes.R wrote test/fixtures/r/effect_sizes.json).
import { describe, expect, it } from "vitest";
import { noncentralTCdf, noncentralTCdfAndSlope, noncentralityInterval, normalQuantile, normalUpperTail } from "../../../src/statistics/noncentralT.js";
import { studentTCdf } from "../../../src/statistics/studentT.js";
import { expectClose } from "../../helpers/close.js";
import { loadFixture } from "../../helpers/fixtures.js";

interface EffectSizesGrid {
  r_version: string;
  pt_grid: [number, number, number, number, number][];
  intervals: [number, number, number, number][];
}

const fixture = loadFixture<EffectSizesGrid>("r/effect_sizes.json");

describe("noncentral t CDF (R pt(q, df, ncp), test/fixtures/r/effect_sizes.json)", () => {
  it(`matches R's pt over ${fixture.pt_grid.length} points (${fixture.r_version})`, () => {
    for (const [q, df, ncp, expected, warned] of fixture.pt_grid) {
      // R's pnt aims at an absolute error of 1e-12 (its errmax); where it warned that full precision was not
      // achieved it printed 1 for a value within about 1e-12 of 1.
      expectClose(noncentralTCdf(q, df, ncp), expected, { abs: warned ? 1e-9 : 1e-12, rel: 1e-10, label: "pt(q, df, ncp)", inputs: { q, df, ncp } });
    }
  });

  it("matches 40-digit quadrature where R's pt is off by more than 1e-13", () => {
    // mpmath 1.2.1 (Debian), mp.dps = 40: quad of Φ(q·√(v/df) − ncp) against the chi-square(df) density of v.
    // R 4.2.2 gives 3.887708392e-05 and 7.413882969e-06 here; SciPy 1.10 (Boost) agrees with mpmath to 1e-15.
    expectClose(noncentralTCdf(4, 3, 12), 3.887708457546243459e-5, { abs: 1e-17, rel: 1e-11, label: "q = 4, df = 3, ncp = 12" });
    expectClose(noncentralTCdf(-10, 3, 2), 7.413882800487004164e-6, { abs: 1e-15, rel: 1e-9, label: "q = −10, df = 3, ncp = 2" });
  });

  it("is the central t at ncp = 0 and the normal as df grows (A&S 26.7.1)", () => {
    for (const t of [-4, -1, 0.3, 2.2]) {
      expectClose(noncentralTCdf(t, 9, 0), studentTCdf(t, 9), { abs: 1e-15, rel: 1e-13, label: "central t" });
      expectClose(noncentralTCdf(t, 1e9, 1.5), 1 - normalUpperTail(t - 1.5), { abs: 1e-8, label: "normal limit" });
    }
  });

  it("gives NaN outside its domain and the limits at ±∞", () => {
    expect(noncentralTCdf(NaN, 5, 1)).toBeNaN();
    expect(noncentralTCdf(1, 0, 1)).toBeNaN();
    expect(noncentralTCdf(Infinity, 5, 1)).toBe(1);
    expect(noncentralTCdf(-Infinity, 5, 1)).toBe(0);
  });

  it("normal quantile inverts the normal tail (1.959963984540054 from memory, A&S table 26.5)", () => {
    expectClose(normalQuantile(0.975), 1.959963984540054, { abs: 1e-14, label: "z_0.975" });
    expectClose(normalQuantile(0.025), -1.959963984540054, { abs: 1e-14, label: "z_0.025" });
  });
});

describe("noncentrality interval (R uniroot on pt, tol 1e-14)", () => {
  it(`matches R for ${fixture.intervals.length} (t, df)`, () => {
    for (const [t, df, low, high] of fixture.intervals) {
      const [lo, hi] = noncentralityInterval(t, df, 0.95);
      expectClose(lo, low, { abs: 1e-9, rel: 1e-9, label: "ncp low", inputs: { t, df } });
      expectClose(hi, high, { abs: 1e-9, rel: 1e-9, label: "ncp high", inputs: { t, df } });
    }
  });

  it("is antisymmetric in t and NaN for a non-finite t", () => {
    const [a, b] = noncentralityInterval(3.1, 17, 0.95);
    const [c, d] = noncentralityInterval(-3.1, 17, 0.95);
    expectClose(c, -b, { abs: 1e-10, label: "low(−t) = −high(t)" });
    expectClose(d, -a, { abs: 1e-10, label: "high(−t) = −low(t)" });
    expect(noncentralityInterval(NaN, 17, 0.95).every(Number.isNaN)).toBe(true);
  });
});

describe("the CDF's δ-derivative (summed with the CDF)", () => {
  it("matches a central difference of the CDF", () => {
    const slope = new Float64Array(1);
    for (const [t, df, delta] of [[2.5, 26, 1.1], [-1.3, 8, 0.4], [7, 196, 6.2], [0.8, 40, 0], [-4, 12, -3.5], [0, 30, 2]]) {
      noncentralTCdfAndSlope(t, df, delta, slope);
      const h = 1e-5;
      const difference = (noncentralTCdf(t, df, delta + h) - noncentralTCdf(t, df, delta - h)) / (2 * h);
      expectClose(slope[0], difference, { abs: 1e-8, rel: 1e-6, label: "∂P/∂δ vs central difference", inputs: { t, df, delta } });
    }
  });
});
