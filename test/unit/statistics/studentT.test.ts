// Student's t distribution (src/statistics/studentT.ts) against three outside references:
//   1. R's pt / qt (test/fixtures/r/t_tails.json, made by test/fixtures/r/runner.R, R 4.2.2);
//   2. the NIST/SEMATECH e-Handbook table of t critical values, section 1.3.6.7.2
//      (test/fixtures/published/t_critical_values.json);
//   3. the npm packages @stdlib/stats-base-dists-t-cdf and -t-quantile 0.2.3 (dev dependencies)
//      on a seeded random grid.
// Tolerances (measured worst case when written in brackets):
//   tails vs R:               relative 1e-12              [1.05e-13, df 1000, t = -40]
//   deep tails vs R, normal:  relative 1e-10, log abs 1e-9 [2.2e-11, df 1e6, t = 37]
//   deep tails, R subnormal
//   or 0:                     0 <= ours <= 1e-300
//   quantiles vs R:           relative 1e-12              [9.8e-14, df 1000, p = 0.95]
//   NIST table:               absolute 0.0005 (the table's rounding) except the two entries the
//                             fixture flags beyond_rounding, which are checked against R instead
//   stdlib cdf, random grid:  relative 1e-11              [2.1e-12, df ≈ 4500, t ≈ -1.66;
//                             R agrees with stdlib there, so the 2e-12 is ours]
//   stdlib quantile:          relative 1e-11 + absolute 1e-15 [3e-12 near p = 0.5]
import seedrandom from "seedrandom";
import tCdf from "@stdlib/stats-base-dists-t-cdf";
import tQuantile from "@stdlib/stats-base-dists-t-quantile";
import { describe, expect, it } from "vitest";
import { studentTCdf, studentTDensity, studentTQuantile, studentTUpperTail } from "../../../src/statistics/studentT.js";
import { EPS, expectClose } from "../../helpers/close.js";
import { loadFixture, toNumber, type TCriticalValuesFixture, type TTailsFixture } from "../../helpers/fixtures.js";

const tails = loadFixture<TTailsFixture>("r/t_tails.json");
const table = loadFixture<TCriticalValuesFixture>("published/t_critical_values.json");

/** Smallest positive normal binary64, 2^-1022. */
const MIN_NORMAL = 2.2250738585072014e-308;

describe("studentTUpperTail and studentTCdf vs R pt (t_tails.json)", () => {
  it("every upper and lower tail within 1e-12 relative (source: R pt, t_tails.json 'tails')", () => {
    for (const row of tails.tails) {
      const inputs = { t: row.t, df: row.df };
      expectClose(studentTUpperTail(row.t, row.df), row.upper, {
        rel: 1e-12,
        label: "P(T > t) vs R pt(t, df, lower.tail = FALSE)",
        inputs,
      });
      expectClose(studentTCdf(row.t, row.df), row.lower, {
        rel: 1e-12,
        label: "P(T <= t) vs R pt(t, df)",
        inputs,
      });
    }
  });

  it("the natural logs of the tails within 1e-12 relative of R's log.p = TRUE (source: R pt, t_tails.json)", () => {
    for (const row of tails.tails) {
      const inputs = { t: row.t, df: row.df };
      // log1p/expm1 precision is not needed: the tails themselves are accurate to 1e-12 relative,
      // so their logs are accurate to 1e-12 absolute; stated as abs 1e-12 + rel 1e-12.
      expectClose(Math.log(studentTUpperTail(row.t, row.df)), row.log_upper, {
        rel: 1e-12,
        abs: 1e-12,
        label: "log P(T > t) vs R pt(..., log.p = TRUE)",
        inputs,
      });
      expectClose(Math.log(studentTCdf(row.t, row.df)), row.log_lower, {
        rel: 1e-12,
        abs: 1e-12,
        label: "log P(T <= t) vs R pt(..., log.p = TRUE)",
        inputs,
      });
    }
  });

  it("t = 40 keeps its upper tail: P(T_1000 > 40) = 5.2394260775864375e-210 (source: R pt, t_tails.json), where 1 - CDF gives 0", () => {
    const row = tails.tails.find((r) => r.df === 1000 && r.t === 40)!;
    expect(row.upper).toBe(5.2394260775864375e-210);
    const upper = studentTUpperTail(40, 1000);
    expectClose(upper, row.upper, { rel: 1e-12, label: "P(T_1000 > 40) vs R", inputs: { t: 40, df: 1000 } });
    // The naive complement loses everything: this is why tails are computed directly.
    expect(1 - studentTCdf(40, 1000)).toBe(0);
    // And the lower tail at -40 is the same number by symmetry.
    expect(studentTCdf(-40, 1000)).toBe(upper);
  });

  it("deep tails (df 1e4..1e6, t 37..40): normal doubles within 1e-10 relative, subnormal or zero ones <= 1e-300 (source: R pt, t_tails.json 'deep_tail')", () => {
    for (const row of tails.deep_tail) {
      const inputs = { t: row.t, df: row.df, r_upper: row.upper, r_log_upper: row.log_upper };
      const upper = studentTUpperTail(row.t, row.df);
      expect(upper, JSON.stringify(inputs)).toBeGreaterThanOrEqual(0);
      if (row.upper >= MIN_NORMAL) {
        expectClose(upper, row.upper, { rel: 1e-10, label: "deep upper tail vs R (normal double)", inputs });
        expectClose(Math.log(upper), row.log_upper, { abs: 1e-9, label: "log of deep upper tail vs R log.p", inputs });
      } else {
        // R itself is subnormal (loses digits) or underflows to 0: require ours to be as small.
        expect(upper, `upper tail must be <= 1e-300 where R gives ${row.upper}; ${JSON.stringify(inputs)}`).toBeLessThanOrEqual(1e-300);
      }
      // The lower tail is 1 to double precision (R prints 1).
      expectClose(studentTCdf(row.t, row.df), row.lower, { abs: EPS, label: "deep lower tail vs R", inputs });
    }
  });
});

describe("Student t symmetry (common practice: exact identities of the t distribution)", () => {
  const grid: Array<[number, number]> = [];
  for (const df of [0.5, 1, 2.5, 3, 10, 29, 100, 1e4]) for (const t of [0, 1e-8, 0.3, 1, 2.5, 7, 40, 1e3]) grid.push([t, df]);

  it("upper(t) = lower(-t) exactly, for t and -t", () => {
    for (const [t, df] of grid) {
      expect(studentTUpperTail(t, df)).toBe(studentTCdf(-t, df));
      expect(studentTUpperTail(-t, df)).toBe(studentTCdf(t, df));
    }
  });

  it("upper(t) + upper(-t) = 1 within 2 EPS absolute", () => {
    for (const [t, df] of grid) {
      expectClose(studentTUpperTail(t, df) + studentTUpperTail(-t, df), 1, {
        abs: 2 * EPS,
        label: "P(T > t) + P(T > -t)",
        inputs: { t, df },
      });
    }
  });

  it("P(T > 0) = 1/2 exactly and the infinities give 0 and 1", () => {
    for (const df of [1, 7, 1e5]) {
      expect(studentTUpperTail(0, df)).toBe(0.5);
      expect(studentTUpperTail(Infinity, df)).toBe(0);
      expect(studentTUpperTail(-Infinity, df)).toBe(1);
    }
  });

  it("kernels never throw: NaN t, df <= 0 and NaN df give NaN", () => {
    expect(studentTUpperTail(NaN, 5)).toBeNaN();
    expect(studentTUpperTail(1, 0)).toBeNaN();
    expect(studentTUpperTail(1, -3)).toBeNaN();
    expect(studentTUpperTail(1, NaN)).toBeNaN();
    expect(studentTQuantile(NaN, 5)).toBeNaN();
    expect(studentTQuantile(1.5, 5)).toBeNaN();
    expect(studentTQuantile(0.5, 0)).toBeNaN();
  });
});

describe("studentTQuantile vs R qt (t_tails.json)", () => {
  it("every quantile within 1e-12 relative (source: R qt, t_tails.json 'quantiles')", () => {
    for (const row of tails.quantiles) {
      const inputs = { p: row.p, df: row.df };
      expectClose(studentTQuantile(row.p, row.df), row.q, { rel: 1e-12, label: "t quantile vs R qt(p, df)", inputs });
    }
  });

  it("lower quantiles: quantile(1 - p) = -qt(p) within 1e-12 relative, for the fixture's p (source: R qt by symmetry)", () => {
    for (const row of tails.quantiles) {
      // 1 - p is exact in binary64 for p in [0.5, 1] (Sterbenz), so this is the lower-tail quantile of the same mass.
      const lower = 1 - row.p;
      expectClose(studentTQuantile(lower, row.df), -row.q, {
        rel: 1e-12,
        label: "lower-tail t quantile vs -R qt(p, df)",
        inputs: { p: lower, df: row.df },
      });
    }
  });

  it("round trip: cdf(quantile(p)) = p within 1e-13 relative (common practice)", () => {
    for (const row of tails.quantiles) {
      for (const p of [row.p, 1 - row.p]) {
        expectClose(studentTCdf(studentTQuantile(p, row.df), row.df), p, {
          rel: 1e-13,
          label: "cdf(quantile(p))",
          inputs: { p, df: row.df },
        });
      }
    }
  });

  it("p = 0, 1/2 and 1 give -Infinity, 0 and Infinity", () => {
    expect(studentTQuantile(0, 4)).toBe(-Infinity);
    expect(studentTQuantile(0.5, 4)).toBe(0);
    expect(studentTQuantile(1, 4)).toBe(Infinity);
  });
});

describe("studentTQuantile vs the NIST/SEMATECH e-Handbook table of t critical values (section 1.3.6.7.2)", () => {
  it("finite-df rows within 0.0005 (the table's rounding), except the entries flagged beyond_rounding, which must match R's qt within 1e-12 relative", () => {
    let checkedAgainstTable = 0;
    let checkedAgainstR = 0;
    for (const row of table.rows) {
      if (row.df === "Infinity") continue; // the normal limit: see the next test
      const df = row.df;
      table.lower_tail.forEach((p, k) => {
        const inputs = { df, upper_tail: table.upper_tail[k], p };
        const ours = studentTQuantile(p, df);
        if (row.beyond_rounding[k]) {
          expectClose(ours, row.r_qt[k], { rel: 1e-12, label: "flagged table entry: ours vs R qt", inputs });
          // The table is off by more than its rounding here; ours should be too (it follows R).
          expect(Math.abs(ours - row.table[k])).toBeGreaterThan(0.0005);
          checkedAgainstR++;
        } else {
          expectClose(ours, row.table[k], { abs: 0.0005, label: `NIST table entry ${row.table_printed[k]}`, inputs });
          checkedAgainstTable++;
        }
      });
    }
    expect(checkedAgainstR).toBe(table.entries_beyond_rounding);
    expect(checkedAgainstTable).toBe(6 * 6 - table.entries_beyond_rounding);
  });

  it("the df = ∞ row (normal limit) is matched at df = 1e6 within 0.0005 (t quantiles differ from the limit by about (z³ + z)/(4 df) < 1e-5 there)", () => {
    const row = table.rows.find((r) => r.df === "Infinity")!;
    table.lower_tail.forEach((p, k) => {
      expectClose(studentTQuantile(p, 1e6), row.table[k], {
        abs: 0.0005,
        label: `NIST table df = ∞ entry ${row.table_printed[k]} at df = 1e6`,
        inputs: { df: 1e6, p },
      });
    });
  });
});

describe("studentTCdf and studentTQuantile vs @stdlib on a seeded random grid", () => {
  /** df log-uniform on [0.5, 5000] or a whole number 1..200; t up to ±40. */
  function grid(seed: string, count: number): Array<{ t: number; df: number; p: number }> {
    const random = seedrandom(seed);
    const out: Array<{ t: number; df: number; p: number }> = [];
    for (let k = 0; k < count; k++) {
      const df = random() < 0.5 ? 1 + Math.floor(random() * 200) : 0.5 * Math.exp(random() * Math.log(1e4));
      const t = (2 * random() - 1) * (random() < 0.5 ? 5 : 40);
      const u = random();
      const p = u < 0.2 ? 10 ** (-3 - 7 * random()) : u < 0.4 ? 1 - 10 ** (-3 - 7 * random()) : random();
      out.push({ t, df, p });
    }
    return out;
  }

  it("lower tail within 1e-11 relative of @stdlib/stats-base-dists-t-cdf (2000 points)", () => {
    for (const { t, df } of grid("plexus-studentT-cdf", 2000)) {
      const reference = tCdf(t, df);
      expectClose(studentTCdf(t, df), reference, { rel: 1e-11, label: "P(T <= t) vs @stdlib t-cdf", inputs: { t, df } });
      // Upper tail against stdlib's lower tail at -t (stdlib's own 1 - cdf would lose digits).
      expectClose(studentTUpperTail(t, df), tCdf(-t, df), {
        rel: 1e-11,
        label: "P(T > t) vs @stdlib t-cdf(-t)",
        inputs: { t, df },
      });
    }
  });

  it("quantile within 1e-11 relative + 1e-15 absolute of @stdlib/stats-base-dists-t-quantile (2000 points)", () => {
    for (const { p, df } of grid("plexus-studentT-quantile", 2000)) {
      expectClose(studentTQuantile(p, df), tQuantile(p, df), {
        rel: 1e-11,
        abs: 1e-15,
        label: "t quantile vs @stdlib t-quantile",
        inputs: { p, df },
      });
    }
  });
});

describe("studentTDensity", () => {
  it("integrates to the cdf: Simpson's rule over [-2, 1.5] matches cdf(1.5) - cdf(-2) within 1e-10 (common practice)", () => {
    for (const df of [1, 3, 12.5, 200]) {
      const a = -2;
      const b = 1.5;
      const n = 2000;
      const h = (b - a) / n;
      let sum = studentTDensity(a, df) + studentTDensity(b, df);
      for (let i = 1; i < n; i++) sum += (i % 2 === 1 ? 4 : 2) * studentTDensity(a + i * h, df);
      expectClose((sum * h) / 3, studentTCdf(b, df) - studentTCdf(a, df), {
        abs: 1e-10,
        label: "∫ density vs cdf difference",
        inputs: { df, a, b },
      });
    }
  });

  // Tolerance 1e-13 relative: the density goes through exp(log-gamma differences); 4.7e-15 measured
  // at ν = 1. It only steers the quantile's Newton steps, so this is ample.
  it("at 0 equals Γ((ν+1)/2)/(√(νπ) Γ(ν/2)): 1/π for ν = 1 and 1/(2√2) for ν = 2 within 1e-13 relative (closed forms, A&S 26.7.1)", () => {
    expectClose(studentTDensity(0, 1), 1 / Math.PI, { rel: 1e-13, label: "density(0, 1)" });
    expectClose(studentTDensity(0, 2), 1 / (2 * Math.SQRT2), { rel: 1e-13, label: "density(0, 2)" });
  });
});

describe("very large or infinite df (outside the range plexus produces: df = subjects − columns)", () => {
  // The df = ∞ row of the NIST table holds R's qnorm values (r_qt), the limit of the t tails.
  const normalRow = table.rows.find((r) => r.df === "Infinity")!;

  // Found while writing these tests: the relative error of the upper tail grows roughly like
  // df · 1e-16 (vs R pt: 2e-11 at df = 1e6, 5e-9 at 1e7, 1.5e-8 at 1e8, 5e-7 at 1e9, 3e-4 at
  // 1e12, 3.5 % at 1e15) and the tail turns negative at df = 1e17 (P(T > 2) = -5.3); at df = ∞
  // the tail is NaN but studentTQuantile(0.975, ∞) returns 8.9e-16. Harmless for plexus
  // (df = subjects − columns), but a kernel should not return a negative probability. Marked
  // Contract: beyond MAX_DEGREES_OF_FREEDOM (1e10) the tails are NaN.
  it("P(T > z_α) is NaN or within 1e-6 relative of α for df from 1e9 to ∞ (the true t tail is within 3e-8 of α at 1e9, R pt) (source: R qnorm in the NIST table fixture)", () => {
    for (const df of [1e9, 1e12, 1e15, 1e17, 1e20, Infinity]) {
      normalRow.r_qt.forEach((z, k) => {
        const upper = studentTUpperTail(z, df);
        if (Number.isNaN(upper)) return;
        expectClose(upper, table.upper_tail[k], { rel: 1e-6, label: "t tail at huge df vs normal limit", inputs: { z, df } });
      });
    }
  });

  it("studentTQuantile is NaN or within 1e-6 relative of the normal quantile for df = ∞ (source: R qnorm in the NIST table fixture)", () => {
    table.lower_tail.forEach((p, k) => {
      const q = studentTQuantile(p, Infinity);
      if (Number.isNaN(q)) return;
      expectClose(q, toNumber(normalRow.r_qt[k]), { rel: 1e-6, label: "t quantile at df = ∞ vs qnorm", inputs: { p } });
    });
  });
});
