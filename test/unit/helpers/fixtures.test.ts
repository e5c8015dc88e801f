// Integrity checks of the committed reference fixtures (shapes and internal consistency only;
// the fixtures' values are checked against their sources by test/fixtures/nist/crosscheck.R
// and test/fixtures/r/crosscheck_scipy.py).
import { describe, expect, it } from "vitest";
import {
  type Bh1995Fixture,
  type LmContrastsFixture,
  type PAdjustFixture,
  type TCriticalValuesFixture,
  type TTailsFixture,
  loadFixture,
  loadNist,
  toNumber,
  toNumbers,
} from "../../helpers/fixtures.js";

describe("toNumber(value)", () => {
  it("reads JSON numbers, printed numbers, non-finite text and null", () => {
    expect(toNumber(0.5)).toBe(0.5);
    expect(toNumber("0.429796848199937E-03")).toBe(0.000429796848199937);
    expect(toNumber("Infinity")).toBe(Infinity);
    expect(toNumber("-Infinity")).toBe(-Infinity);
    expect(toNumber("NaN")).toBeNaN();
    expect(toNumber(null)).toBeNaN();
    expect(Array.from(toNumbers([1, null, "2"]))).toEqual([1, NaN, 2]);
  });
});

describe("NIST StRD fixtures", () => {
  it.each(["norris", "longley", "pontius"] as const)("%s has n rows, one certified value per coefficient", (name) => {
    const d = loadNist(name);
    expect(d.x).toHaveLength(d.n);
    expect(d.y).toHaveLength(d.n);
    for (const row of d.x) expect(row).toHaveLength(d.columns.length);
    expect(d.certified.coefficients).toHaveLength(d.columns.length + 1);
    expect(d.certified.standard_errors).toHaveLength(d.columns.length + 1);
    expect(d.certified.residual_df).toBe(d.n - d.columns.length - 1);
    for (const s of [...d.certified.coefficients, ...d.certified.standard_errors]) {
      expect(Number.isFinite(toNumber(s))).toBe(true);
    }
  });
});

describe("R fixtures", () => {
  it("t_tails.json covers the full df x t grid and df x p quantile grid", () => {
    const f = loadFixture<TTailsFixture>("r/t_tails.json");
    expect(f.tails).toHaveLength(f.degrees_of_freedom.length * f.t_values.length);
    expect(f.quantiles).toHaveLength(f.degrees_of_freedom.length * f.probabilities.length);
    expect(f.deep_tail.some((r) => r.upper === 0)).toBe(true);
  });

  it("padjust.json gives adjusted vectors as long as their inputs", () => {
    const f = loadFixture<PAdjustFixture>("r/padjust.json");
    for (const c of f.cases) {
      expect(c.p).toHaveLength(c.n);
      expect(c.bh).toHaveLength(c.n);
      expect(c.by).toHaveLength(c.n);
    }
  });

  it("lm_contrasts.json has one coefficient per model-matrix column and contrasts of that length", () => {
    const f = loadFixture<LmContrastsFixture>("r/lm_contrasts.json");
    for (const m of f.models) {
      expect(m.model_matrix.rows).toHaveLength(f.data.y1.length);
      for (const fit of m.fits) {
        expect(fit.coefficients).toHaveLength(m.model_matrix.columns.length);
        for (const c of fit.contrasts) expect(c.c).toHaveLength(m.model_matrix.columns.length);
      }
    }
  });
});

describe("published fixtures", () => {
  it("bh1995.json: R's BH adjustment rejects as many as the published example states", () => {
    const f = loadFixture<Bh1995Fixture>("published/bh1995.json");
    expect(f.p).toHaveLength(15);
    expect(f.r_rejected_at_q).toBe(f.rejected_at_q);
  });

  it("t_critical_values.json: six tail probabilities per row", () => {
    const f = loadFixture<TCriticalValuesFixture>("published/t_critical_values.json");
    for (const row of f.rows) {
      expect(row.table).toHaveLength(f.upper_tail.length);
      expect(row.r_qt).toHaveLength(f.upper_tail.length);
    }
  });
});
