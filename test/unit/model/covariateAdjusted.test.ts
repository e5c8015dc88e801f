// Covariate-adjusted values (src/model/covariateAdjusted.ts) and which columns are adjusted away
// (src/model/dataViewColumns.ts), against R 4.2.2: lm(), model.matrix() with the nuisance columns
// set to their means, vcov() and qt() (test/fixtures/r/subnetwork_values.R wrote
// test/fixtures/r/subnetwork_values.json; R's partial residuals, residuals(fit, type = "partial"),
// plus mean(y) agree with the adjusted values there to 1e-12).
import { describe, expect, it } from "vitest";
import { covariateAdjusted } from "../../../src/model/covariateAdjusted.js";
import { dataViewColumns } from "../../../src/model/dataViewColumns.js";
import { parseContrast } from "../../../src/model/contrast.js";
import { buildDesignMatrix } from "../../../src/model/designMatrix.js";
import { formulaVariables, parseFormula } from "../../../src/model/formula.js";
import { codeVariable, type Variable } from "../../../src/model/variables.js";
import { expectAllClose } from "../../helpers/close.js";
import { loadFixture } from "../../helpers/fixtures.js";

interface Case {
  formula: string;
  columns: string[];
  nuisance: boolean[];
  x: number[][];
  y: number[];
  df: number;
  adjusted: number[];
  fitted: number[];
  lower: number[];
  upper: number[];
}

const fixture = loadFixture<{ writer: string; cases: Record<string, Case> }>("r/subnetwork_values.json");
const TOLERANCE = { rel: 1e-10, abs: 1e-12 };

describe(`covariate-adjusted values against R (${fixture.writer})`, () => {
  for (const [name, c] of Object.entries(fixture.cases)) {
    it(`${name}: ${c.formula}, adjusting for the columns R's case marks as nuisance (1e-10)`, () => {
      const rows = c.x.length;
      const cols = c.columns.length;
      const result = covariateAdjusted(Float64Array.from(c.x.flat()), rows, cols, c.nuisance, Float64Array.from(c.y), 0.95);
      expect(result.df).toBe(c.df);
      // R: X0 %*% coef(fit) + residuals(fit); X0 %*% coef(fit); and ∓ qt(0.975, df) · sqrt(diag(X0 vcov X0')).
      expectAllClose(result.adjusted, c.adjusted, { ...TOLERANCE, label: `${name} adjusted (R fitted + residuals)` });
      expectAllClose(result.fitted, c.fitted, { ...TOLERANCE, label: `${name} fitted (R X0 %*% coef)` });
      expectAllClose(result.lower, c.lower, { ...TOLERANCE, label: `${name} lower (R qt, vcov)` });
      expectAllClose(result.upper, c.upper, { ...TOLERANCE, label: `${name} upper (R qt, vcov)` });
    });
  }

  it("plexus's own design and contrast choose R's nuisance columns (group comparison, covariate slope, mean)", () => {
    // The participants as R coded them (treatment coding, first level the reference).
    const groups = fixture.cases.groups;
    const column = (c: Case, name: string) => c.x.map((row) => row[c.columns.indexOf(name)]);
    const [patient, relative, age, male] = ["grouppatient", "grouprelative", "age", "sexM"].map((n) => column(groups, n));
    const score = column(fixture.cases.covariate, "score");
    const data: Record<string, string[]> = {
      group: patient.map((p, i) => (p === 1 ? "patient" : relative[i] === 1 ? "relative" : "control")),
      sex: male.map((m) => (m === 1 ? "M" : "F")),
      age: age.map(String),
      score: score.map(String),
    };
    const levels: Record<string, string[]> = { group: ["control", "patient", "relative"], sex: ["F", "M"] };
    const view = (formulaText: string, expression: string | number[]) => {
      const formula = parseFormula(formulaText);
      const variables = new Map<string, Variable>();
      for (const name of formulaVariables(formula)) {
        const values = data[name];
        variables.set(name, codeVariable(name, { values, lines: values.map((_, i) => i + 2), file: "participants.tsv" }, { levels: levels[name], center: false, levelsKey: { key: "levels" }, centerKey: { key: "center" } }));
      }
      const X = buildDesignMatrix(formula, variables, data.group.length, { key: "model" });
      return { X, view: dataViewColumns(parseContrast("c", expression, X, { key: "contrasts.c" }), X)! };
    };
    const g = view("group + age + sex", "group[patient] - group[control]");
    expect(g.view.plot).toBe("groups");
    expect(g.view.nuisance).toEqual(fixture.cases.groups.nuisance);
    expect(g.view.adjustedFor).toEqual(["age", "sex"]);
    // The design matrix is R's model matrix, so the whole computation from plexus's design matches R.
    expectAllClose(g.X.values, groups.x.flat(), { abs: 0, label: "design matrix vs R model.matrix" });
    const s = view("score + age + sex", "-score");
    expect(s.view).toMatchObject({ plot: "covariate", variable: "score", nuisance: fixture.cases.covariate.nuisance, adjustedFor: ["age", "sex"] });
    const m = view("1 + age", [1, 0]);
    expect(m.view).toMatchObject({ plot: "mean", variable: null, nuisance: fixture.cases.mean.nuisance, adjustedFor: ["age"] });
    // No view for an F contrast or a sum of two variables.
    expect(view("score + age + sex", "score + age").view).toBeUndefined();
  });
});
