// The edge-wise least-squares fit checked against the NIST StRD linear-regression
// certified values (test/fixtures/nist/, see its README): Norris (lower difficulty),
// Pontius (lower) and Longley (higher; Longley 1967, JASA 62:819-841). A NIST dataset is
// fitted as a single edge (E = 1): the design is an intercept column plus the x columns,
// the response is the one-edge data array.
//
// Tolerance: relative 1e-11 on every certified coefficient, standard error, residual SD,
// R², residual sum of squares and F statistic, i.e. at least 11 significant digits
// (the brief asked for >= 10 on Longley). Measured when this test was written: the
// smallest log relative error (LRE, digits) is 12.2 (Norris b0), 12.0 (Pontius b0) and
// 12.3 (Longley b1) for the coefficients; >= 12.9 for the standard errors and the
// residual SD; >= 15.3 for R². NIST prints 15 significant digits, so the certified values
// themselves are exact to about 5e-15 relative.
import { describe, expect, it } from "vitest";
import { fitEdges, unscaledCovariance, type EdgeFit } from "../../../src/edges/fitEdges.js";
import { expectAllClose, expectClose } from "../../helpers/close.js";
import { loadNist, toNumber, type NistDataset } from "../../helpers/fixtures.js";

const NIST_REL = 1e-11;
const DATASETS = ["norris", "pontius", "longley"] as const;

/** Intercept column followed by the NIST x columns, row-major n × (k + 1). */
function designOf(dataset: NistDataset): { values: Float64Array; rows: number; cols: number } {
  const rows = dataset.n;
  const cols = dataset.columns.length + 1;
  const values = new Float64Array(rows * cols);
  for (let i = 0; i < rows; i++) {
    values[i * cols] = 1;
    for (let j = 1; j < cols; j++) values[i * cols + j] = dataset.x[i][j - 1];
  }
  return { values, rows, cols };
}

/** Edge-major edge data (fitEdges' layout): data[e·S + s] = scale[e] · y[s]. */
function scaledCopies(y: number[], scales: number[]): Float64Array {
  const S = y.length;
  const data = new Float64Array(S * scales.length);
  scales.forEach((scale, e) => {
    for (let s = 0; s < S; s++) data[e * S + s] = scale * y[s];
  });
  return data;
}

interface EdgeSummary {
  coefficients: number[];
  standardErrors: number[];
  residualSd: number;
  rSquared: number;
  residualSumOfSquares: number;
  fStatistic: number;
}

/** The usual regression summaries of edge e, with SE = sqrt(SSE/df · diag((X'X)⁻¹)). */
function summarize(fit: EdgeFit, e: number, y: Float64Array): EdgeSummary {
  const p = fit.columns;
  const E = fit.edges;
  const covariance = unscaledCovariance(fit.qr);
  const sse = fit.sse[e];
  const variance = sse / fit.df;
  const coefficients = Array.from({ length: p }, (_, k) => fit.coefficients[k * E + e]);
  const standardErrors = Array.from({ length: p }, (_, k) => Math.sqrt(variance * covariance[k * p + k]));
  let mean = 0;
  for (const v of y) mean += v;
  mean /= y.length;
  let total = 0;
  for (const v of y) total += (v - mean) ** 2;
  const regressionDf = p - 1;
  return {
    coefficients,
    standardErrors,
    residualSd: Math.sqrt(variance),
    rSquared: 1 - sse / total,
    residualSumOfSquares: sse,
    fStatistic: (total - sse) / regressionDf / variance,
  };
}

function expectCertified(summary: EdgeSummary, dataset: NistDataset, scale: number, label: string): void {
  const c = dataset.certified;
  const inputs = { dataset: dataset.source, scale };
  // Coefficients, SEs, residual SD scale with the response; R² and F do not; SSE with its square.
  expectAllClose(
    summary.coefficients,
    c.coefficients.map((v) => scale * toNumber(v)),
    { rel: NIST_REL, label: `${label}: coefficients vs NIST certified values`, inputs },
  );
  expectAllClose(
    summary.standardErrors,
    c.standard_errors.map((v) => Math.abs(scale) * toNumber(v)),
    { rel: NIST_REL, label: `${label}: standard errors vs NIST certified values`, inputs },
  );
  expectClose(summary.residualSd, Math.abs(scale) * toNumber(c.residual_sd), {
    rel: NIST_REL,
    label: `${label}: residual SD vs NIST certified value`,
    inputs,
  });
  expectClose(summary.rSquared, toNumber(c.r_squared), {
    rel: NIST_REL,
    label: `${label}: R² vs NIST certified value`,
    inputs,
  });
  expectClose(summary.residualSumOfSquares, scale * scale * toNumber(c.anova.residual.sum_of_squares), {
    rel: NIST_REL,
    label: `${label}: residual sum of squares vs NIST certified ANOVA table`,
    inputs,
  });
  expectClose(summary.fStatistic, toNumber(c.anova.regression.f_statistic), {
    rel: NIST_REL,
    label: `${label}: F statistic vs NIST certified ANOVA table`,
    inputs,
  });
}

describe("fitEdges reproduces the NIST StRD certified regression results (one edge)", () => {
  for (const name of DATASETS) {
    it(`${name}: coefficients, standard errors, residual SD, R², SSE and F within 1e-11 relative (source: NIST StRD ${name})`, () => {
      const dataset = loadNist(name);
      const design = designOf(dataset);
      const y = Float64Array.from(dataset.y);
      const fit = fitEdges(design.values, design.rows, design.cols, y, 1);
      // Residual degrees of freedom n − (k + 1), as certified.
      expect(fit.df).toBe(dataset.certified.residual_df);
      expect(fit.edges).toBe(1);
      expectCertified(summarize(fit, 0, y), dataset, 1, name);
    });
  }

  it("longley: every coefficient carries at least 11 significant digits (LRE >= 11; source: NIST StRD Longley)", () => {
    const dataset = loadNist("longley");
    const design = designOf(dataset);
    const y = Float64Array.from(dataset.y);
    const fit = fitEdges(design.values, design.rows, design.cols, y, 1);
    const digits = dataset.certified.coefficients.map((text, k) => {
      const certified = toNumber(text);
      const error = Math.abs(fit.coefficients[k] - certified) / Math.abs(certified);
      return error === 0 ? Infinity : -Math.log10(error);
    });
    // Tolerance: 11 digits (12.3 measured when written); the brief's target was 10.
    expect(Math.min(...digits), `LRE per coefficient: ${digits.map((d) => d.toFixed(2)).join(", ")}`).toBeGreaterThanOrEqual(11);
  });
});

describe("fitEdges fits several edges at once with the same per-edge results", () => {
  // Edge 0 is the response itself, edge 1 the response times 2^10 (an exact scaling, so every
  // intermediate is scaled exactly and the results must match bit for bit), edge 2 the
  // response times −1/1000 (inexact), which must still match NIST within 1e-11 relative.
  const SCALES = [1, 1024, -0.001];

  for (const name of DATASETS) {
    it(`${name}: E = 3 scaled copies give the single-edge fit per edge (source: NIST StRD ${name})`, () => {
      const dataset = loadNist(name);
      const design = designOf(dataset);
      const single = fitEdges(design.values, design.rows, design.cols, Float64Array.from(dataset.y), 1);
      const data = scaledCopies(dataset.y, SCALES);
      const fit = fitEdges(design.values, design.rows, design.cols, data, SCALES.length);
      const p = design.cols;
      const E = SCALES.length;
      expect(fit.df).toBe(single.df);

      // Edge 0 of the three-edge fit is the one-edge fit, bit for bit (tolerance 0).
      for (let k = 0; k < p; k++) expect(fit.coefficients[k * E]).toBe(single.coefficients[k]);
      expect(fit.sse[0]).toBe(single.sse[0]);

      // Edge 1 = 2^10 × edge 0 exactly (tolerance 0): a power-of-two scaling is exact in binary64.
      for (let k = 0; k < p; k++) expect(fit.coefficients[k * E + 1]).toBe(1024 * single.coefficients[k]);
      expect(fit.sse[1]).toBe(1024 * 1024 * single.sse[0]);

      // Every edge, unscaled, matches NIST within 1e-11 relative.
      SCALES.forEach((scale, e) => {
        const y = Float64Array.from(dataset.y, (v) => scale * v);
        expectCertified(summarize(fit, e, y), dataset, scale, `${name} edge ${e} (scale ${scale})`);
      });
    });
  }
});
