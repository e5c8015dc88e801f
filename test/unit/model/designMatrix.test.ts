// Design matrices, edge-wise fits and t-contrasts against R (test/fixtures/r/lm_contrasts.json,
// made by test/fixtures/r/runner.R with R 4.2.2): model.matrix() with R's default treatment
// coding (contr.treatment), lm() coefficients and standard errors, and for each contrast c
// estimate = c'b, se = sqrt(c' vcov c), t, p_upper = P(T > t), p_two_sided and
// partial r = t / sqrt(t² + df).
//
// The three responses y1, y2, y3 are fitted together as three edges (E = 3).
// Tolerances: model-matrix entries exact (0/1 codes and whole-number ages); everything from
// the fit within 1e-12 relative (+ 1e-15 absolute for values near 0). Measured worst case when
// written: 1.8e-14 relative (a two-sided p-value); the fixture's SciPy cross-check agreed with
// R to 2.4e-12 (test/fixtures/r/README.md).
import { describe, expect, it } from "vitest";
import { contrastStatistics } from "../../../src/edges/contrastStatistics.js";
import { fitEdges, unscaledCovariance } from "../../../src/edges/fitEdges.js";
import { tailPValues } from "../../../src/edges/tailPValues.js";
import { InputError } from "../../../src/errors.js";
import { parseContrast } from "../../../src/model/contrast.js";
import { buildDesignMatrix, columnName, type DesignMatrix } from "../../../src/model/designMatrix.js";
import { formulaVariables, parseFormula, type Formula } from "../../../src/model/formula.js";
import { codeVariable, type Variable } from "../../../src/model/variables.js";
import { expectAllClose, expectClose } from "../../helpers/close.js";
import { loadFixture, type LmContrastsFixture, type LmModel } from "../../helpers/fixtures.js";
import { expectInputError } from "../io/inputErrorAssertions.js";

const lm = loadFixture<LmContrastsFixture>("r/lm_contrasts.json");
const FIT = { rel: 1e-12, abs: 1e-15 };
const MODEL_KEY = { file: "study.yaml", key: "model", line: 3 };
const RESPONSES = ["y1", "y2", "y3"] as const;

/** R formula → the plexus formulas that mean the same model (a plexus model has no response). */
const PLEXUS_FORMULAS: Record<string, string[]> = {
  "y ~ group + age + sex": ["group + age + sex"],
  "y ~ group * age": ["group * age", "group + age + group:age"],
  "y ~ 0 + group": ["0 + group", "group - 1"],
  "y ~ 1": ["1"],
  "y ~ site + age": ["site + age"],
};

/** R model.matrix column name → plexus design column name (treatment coding in both). */
const COLUMN_NAMES: Record<string, string> = {
  "(Intercept)": "intercept",
  grouppatient: "group[patient]",
  groupcontrol: "group[control]",
  age: "age",
  sexM: "sex[M]",
  sitecentral: "site[central]",
  sitesouth: "site[south]",
  "grouppatient:age": "group[patient]:age",
};

/** Each fixture contrast (named in runner.R) written as a plexus expression over the same model. */
const CONTRAST_EXPRESSIONS: Record<string, Record<string, string>> = {
  "y ~ group + age + sex": {
    patient_gt_control: "group[patient] - group[control]",
    control_gt_patient: "group[control] - group[patient]",
    age: "age",
    male_gt_female: "sex[M] - sex[F]",
  },
  "y ~ group * age": {
    interaction: "group[patient]:age",
    age_slope_in_patients: "age + age:group[patient]",
    patient_gt_control_at_age_0: "group[patient] - group[control]",
  },
  "y ~ 0 + group": {
    patient_gt_control: "group[patient] - group[control]",
    control_mean: "group[control]",
  },
  "y ~ 1": { mean: "intercept" },
  "y ~ site + age": {
    central_gt_north: "site[central] - site[north]",
    south_gt_north: "site[south] - site[north]",
    south_gt_central: "site[south] - site[central]",
    age: "age",
  },
};

const subjects = lm.data.participant_id.length;

/** Codes every variable the formula uses from the fixture's data. */
function codeVariables(formula: Formula): Map<string, Variable> {
  const variables = new Map<string, Variable>();
  const lines = lm.data.participant_id.map((_, i) => i + 2);
  for (const name of formulaVariables(formula)) {
    const column = (lm.data as unknown as Record<string, (string | number)[]>)[name];
    // R's site levels were set explicitly (north, central, south); group and sex use the default
    // order, which must agree with R's sorted levels (checked below).
    const levels = name === "site" ? lm.levels.site : undefined;
    variables.set(
      name,
      codeVariable(
        name,
        { values: column.map(String), lines, file: "participants.tsv" },
        { levels, center: false, levelsKey: { key: "levels" }, centerKey: { key: "center" } },
      ),
    );
  }
  return variables;
}

function buildFor(formulaText: string): DesignMatrix {
  const formula = parseFormula(formulaText, MODEL_KEY);
  return buildDesignMatrix(formula, codeVariables(formula), subjects, MODEL_KEY);
}

/** y1, y2, y3 as three edges, edge-major (fitEdges' layout: data[e·S + s]). */
function responseData(): Float64Array {
  const data = new Float64Array(subjects * RESPONSES.length);
  RESPONSES.forEach((r, e) => data.set(lm.data[r], e * subjects));
  return data;
}

function modelLabel(model: LmModel): string {
  return `R ${model.formula}`;
}

describe("factor coding matches R's default levels", () => {
  it("group and sex levels sort as R sorted them (control, patient; F, M) (source: lm_contrasts.json levels)", () => {
    const variables = codeVariables(parseFormula("group + sex"));
    const group = variables.get("group")!;
    const sex = variables.get("sex")!;
    expect(group.kind === "factor" && group.levels).toEqual(lm.levels.group);
    expect(sex.kind === "factor" && sex.levels).toEqual(lm.levels.sex);
  });
});

describe("buildDesignMatrix vs R model.matrix (lm_contrasts.json)", () => {
  for (const model of lm.models) {
    for (const plexusFormula of PLEXUS_FORMULAS[model.formula]) {
      it(`'${plexusFormula}' gives R's columns and rows for ${model.formula} (source: R model.matrix; exact)`, () => {
        const design = buildFor(plexusFormula);
        expect(design.columns.map((c) => c.name)).toEqual(model.model_matrix.columns.map((c) => COLUMN_NAMES[c]));
        expect(design.rows).toBe(subjects);
        expect(design.cols).toBe(model.model_matrix.columns.length);
        expectAllClose(design.values, model.model_matrix.rows.flat(), {
          abs: 0,
          label: `model matrix of ${plexusFormula} vs R model.matrix(${model.formula})`,
        });
        // R's assign: 0 = intercept, k = k-th term label; plexus: term -1 = intercept, k = formula term k (0-based).
        expect(design.columns.map((c) => c.term + 1)).toEqual(model.model_matrix.assign);
        expect(design.formula.terms.map((t) => t.join(":"))).toEqual(model.model_matrix.term_labels);
        for (const column of design.columns) {
          if (column.term >= 0) expect(columnName(column.parts)).toBe(column.name);
        }
      });
    }
  }

  it("the R formula's right-hand side (its `y ~` response removed: plexus refuses a '~') parses to the same design", () => {
    for (const model of lm.models) {
      const fromR = buildFor(model.formula.slice(model.formula.indexOf("~") + 1));
      const fromPlexus = buildFor(PLEXUS_FORMULAS[model.formula][0]);
      expect(fromR.columns).toEqual(fromPlexus.columns);
      expect(Array.from(fromR.values)).toEqual(Array.from(fromPlexus.values));
    }
  });
});

describe("fitEdges + contrastStatistics vs R lm (lm_contrasts.json; y1, y2, y3 as three edges)", () => {
  for (const model of lm.models) {
    const plexusFormula = PLEXUS_FORMULAS[model.formula][0];

    it(`${model.formula}: coefficients, standard errors, residual SD, RSS and df within 1e-12 relative (source: R lm / summary.lm)`, () => {
      const design = buildFor(plexusFormula);
      const fit = fitEdges(design.values, design.rows, design.cols, responseData(), RESPONSES.length);
      const covariance = unscaledCovariance(fit.qr);
      const p = design.cols;
      model.fits.forEach((reference, e) => {
        expect(reference.response).toBe(RESPONSES[e]);
        const inputs = { formula: model.formula, response: reference.response };
        expect(fit.df).toBe(reference.residual_df);
        const coefficients = Array.from({ length: p }, (_, k) => fit.coefficients[k * RESPONSES.length + e]);
        const s2 = fit.sse[e] / fit.df;
        const standardErrors = Array.from({ length: p }, (_, k) => Math.sqrt(s2 * covariance[k * p + k]));
        expectAllClose(coefficients, reference.coefficients, { ...FIT, label: `${modelLabel(model)} coefficients`, inputs });
        expectAllClose(standardErrors, reference.standard_errors, { ...FIT, label: `${modelLabel(model)} standard errors`, inputs });
        expectClose(Math.sqrt(s2), reference.residual_sd, { ...FIT, label: `${modelLabel(model)} residual SD`, inputs });
        expectClose(fit.sse[e], reference.rss, { ...FIT, label: `${modelLabel(model)} RSS`, inputs });
      });
    });

    for (const contrastName of model.fits[0].contrasts.map((c) => c.name)) {
      const expression = CONTRAST_EXPRESSIONS[model.formula][contrastName];

      it(`${model.formula}, contrast ${contrastName} ('${expression}' and its vector): estimate, se, t, p_upper, p_two_sided, partial r within 1e-12 relative (source: R lm + vcov)`, () => {
        const design = buildFor(plexusFormula);
        const fit = fitEdges(design.values, design.rows, design.cols, responseData(), RESPONSES.length);
        const vector = model.fits[0].contrasts.find((c) => c.name === contrastName)!.c;
        const where = { file: "study.yaml", key: `contrasts.${contrastName}`, line: 9 };

        const fromVector = parseContrast(contrastName, vector, design, where);
        const fromExpression = parseContrast(contrastName, expression, design, where);
        expect(Array.from(fromVector.vector)).toEqual(vector);
        expect(Array.from(fromExpression.vector)).toEqual(vector);

        const statistics = contrastStatistics(fit, fromExpression.vector);
        expect(statistics.df).toBe(fit.df);
        expect(statistics.degenerate).toBe(0);
        const twoSided = tailPValues(statistics.statistic, statistics.df, "both");
        const upper = tailPValues(statistics.statistic, statistics.df, "upper");
        model.fits.forEach((reference, e) => {
          const r = reference.contrasts.find((c) => c.name === contrastName)!;
          const inputs = { formula: model.formula, response: reference.response, contrast: contrastName, c: vector };
          expect(r.df).toBe(statistics.df);
          expectClose(statistics.estimate[e], r.estimate, { ...FIT, label: "estimate c'b vs R", inputs });
          expectClose(statistics.standardError[e], r.se, { ...FIT, label: "se sqrt(c'Vc) vs R", inputs });
          expectClose(statistics.statistic[e], r.t, { ...FIT, label: "t vs R", inputs });
          expectClose(statistics.pUncorrected[e], r.p_upper, { ...FIT, label: "p_upper P(T > t) vs R pt", inputs });
          expectClose(upper[e], r.p_upper, { ...FIT, label: "tailPValues upper vs R", inputs });
          expectClose(twoSided[e], r.p_two_sided, { ...FIT, label: "tailPValues both vs R 2P(T > |t|)", inputs });
          expectClose(statistics.partialR[e], r.partial_r, { ...FIT, label: "partial r vs R", inputs });
        });
      });
    }
  }

  it("the lower tail of patient_gt_control is the upper tail of control_gt_patient (source: R p_upper of both contrasts)", () => {
    const model = lm.models.find((m) => m.formula === "y ~ group + age + sex")!;
    const design = buildFor(PLEXUS_FORMULAS[model.formula][0]);
    const fit = fitEdges(design.values, design.rows, design.cols, responseData(), RESPONSES.length);
    const statistics = contrastStatistics(fit, parseContrast("c", "group[patient] - group[control]", design, {}).vector);
    const lower = tailPValues(statistics.statistic, statistics.df, "lower");
    model.fits.forEach((reference, e) => {
      const opposite = reference.contrasts.find((c) => c.name === "control_gt_patient")!;
      expectClose(lower[e], opposite.p_upper, { ...FIT, label: "lower tail vs R p_upper of the negated contrast", inputs: reference.response });
    });
  });
});

describe("contrastStatistics on degenerate edges (common practice: zero residual variance has no t)", () => {
  it("an edge that the model fits exactly (here: constant) gets NaN t, p and r, and is counted", () => {
    const design = buildFor("group + age + sex");
    const S = subjects;
    const data = new Float64Array(S * 2); // edge-major: edge 0 then edge 1
    data.fill(0.25, 0, S); // edge 0 constant: residual 0
    data.set(lm.data.y1, S); // edge 1 = y1
    const fit = fitEdges(design.values, design.rows, design.cols, data, 2);
    const statistics = contrastStatistics(fit, [0, 1, 0, 0]);
    expect(statistics.degenerate).toBe(1);
    expect(statistics.statistic[0]).toBeNaN();
    expect(statistics.pUncorrected[0]).toBeNaN();
    expect(statistics.partialR[0]).toBeNaN();
    expect(Number.isFinite(statistics.statistic[1])).toBe(true);
    expect(tailPValues(statistics.statistic, statistics.df, "both")[0]).toBeNaN();
  });

  it("an all-zero edge (absent in every subject) gets NaN, not an exception", () => {
    const design = buildFor("1");
    const fit = fitEdges(design.values, design.rows, design.cols, new Float64Array(subjects), 1);
    const statistics = contrastStatistics(fit, [1]);
    expect(statistics.statistic[0]).toBeNaN();
    expect(statistics.degenerate).toBe(1);
  });
});

describe("buildDesignMatrix refuses designs it cannot estimate, naming the columns", () => {
  const lines = lm.data.participant_id.map((_, i) => i + 2);
  const source = (values: string[]) => ({ values, lines, file: "participants.tsv" });
  const options = { center: false, levelsKey: { key: "levels" }, centerKey: { key: "center" } };
  const numeric = (name: string, values: number[]) => codeVariable(name, source(values.map(String)), options);
  const factor = (name: string, values: string[], levels?: string[]) => codeVariable(name, source(values), { ...options, levels });

  it("a duplicated numeric column (age2 = age): InputError on the model key naming age and age2", () => {
    const variables = new Map<string, Variable>([
      ["group", factor("group", lm.data.group)],
      ["age", numeric("age", lm.data.age)],
      ["age2", numeric("age2", lm.data.age)],
    ]);
    const error = expectInputError(() => buildDesignMatrix(parseFormula("group + age + age2"), variables, subjects, MODEL_KEY), {
      ...MODEL_KEY,
      message: [/rank-deficient/, /rank 3 of 4/, /age, age2/],
    });
    expect(error.hint).toBeDefined();
  });

  it("a value that is not finite (built by hand; the readers refuse it) is named by column, never a blank rank message", () => {
    const age = Float64Array.from(lm.data.age);
    age[1] = Infinity;
    const variables = new Map<string, Variable>([["age", { name: "age", kind: "numeric", values: age, center: 0 }]]);
    const error = expectInputError(() => buildDesignMatrix(parseFormula("age"), variables, subjects, MODEL_KEY), {
      ...MODEL_KEY,
      message: [/the design column 'age' has a value that is not a finite number/],
    });
    expect(error.message).not.toMatch(/column +is/);
  });

  it("a column whose sum of squares overflows is named as too large, never called rank-deficient", () => {
    const age = Float64Array.from(lm.data.age, (a) => a * 1e160);
    const variables = new Map<string, Variable>([["age", { name: "age", kind: "numeric", values: age, center: 0 }]]);
    const error = expectInputError(() => buildDesignMatrix(parseFormula("age"), variables, subjects, MODEL_KEY), {
      ...MODEL_KEY,
      message: [/the design column 'age' has values so large that their sum of squares is not a finite number/],
    });
    expect(error.message).not.toMatch(/rank/);
  });

  it("an interaction of two columns below the cell limit whose product overflows is named by its column", () => {
    // Each cell is below 1e150, but age:score reaches 1e280 and its square overflows.
    const big = (name: string) => numeric(name, lm.data.age.map((a) => a * 1e138));
    const variables = new Map<string, Variable>([
      ["age", big("age")],
      ["score", big("score")],
    ]);
    const error = expectInputError(() => buildDesignMatrix(parseFormula("age * score"), variables, subjects, MODEL_KEY), {
      ...MODEL_KEY,
      message: [/'age:score' has values so large/],
    });
    expect(error.message).not.toMatch(/rank/);
  });

  it("codeVariable refuses a numeric text that overflows, naming its line", () => {
    const values = lm.data.age.map(String);
    values[2] = "1e400";
    expectInputError(() => codeVariable("age", source(values), options), { file: "participants.tsv", line: 4, message: [/'1e400', which is not a finite number/] });
  });

  it("a column proportional to another (age in months): collinear columns named", () => {
    const variables = new Map<string, Variable>([
      ["age", numeric("age", lm.data.age)],
      ["months", numeric("months", lm.data.age.map((a) => 12 * a))],
    ]);
    expectInputError(() => buildDesignMatrix(parseFormula("age + months"), variables, subjects, MODEL_KEY), {
      ...MODEL_KEY,
      message: [/rank-deficient/, /age, months/],
    });
  });

  it("a factor that is another factor under a different name: their columns named", () => {
    const diagnosis = lm.data.group.map((g) => (g === "patient" ? "yes" : "no"));
    const variables = new Map<string, Variable>([
      ["group", factor("group", lm.data.group)],
      ["diagnosis", factor("diagnosis", diagnosis)],
    ]);
    expectInputError(() => buildDesignMatrix(parseFormula("group + diagnosis"), variables, subjects, MODEL_KEY), {
      ...MODEL_KEY,
      message: [/rank-deficient/, /group\[patient\]/, /diagnosis\[yes\]/],
    });
  });

  it("an interaction level with no subject (all patients at one site): the zero column is named", () => {
    // Patients only at 'north' and 'central' → group[patient]:site[south] is all zeros.
    const site = lm.data.group.map((g, i) => (g === "patient" ? (i % 2 === 0 ? "north" : "central") : ["north", "central", "south"][i % 3]));
    const variables = new Map<string, Variable>([
      ["group", factor("group", lm.data.group)],
      ["site", factor("site", site, ["north", "central", "south"])],
    ]);
    expectInputError(() => buildDesignMatrix(parseFormula("group * site"), variables, subjects, MODEL_KEY), {
      ...MODEL_KEY,
      message: [/rank-deficient/, /group\[patient\]:site\[south\]/],
    });
  });

  it("units do not decide the rank: age in seconds (~1e9) beside 0/1 columns is full rank (common practice: column scaling before the SVD)", () => {
    const variables = new Map<string, Variable>([
      ["group", factor("group", lm.data.group)],
      ["seconds", numeric("seconds", lm.data.age.map((a) => a * 31_557_600))],
      ["sex", factor("sex", lm.data.sex)],
    ]);
    const design = buildDesignMatrix(parseFormula("group + seconds + sex"), variables, subjects, MODEL_KEY);
    expect(design.columns.map((c) => c.name)).toEqual(["intercept", "group[patient]", "seconds", "sex[M]"]);
  });

  it("more columns than subjects: InputError on the model key", () => {
    const few = 3;
    const variables = new Map<string, Variable>([
      ["a", codeVariable("a", { values: ["1", "2", "3"], lines: [2, 3, 4], file: "p.tsv" }, options)],
      ["b", codeVariable("b", { values: ["1", "5", "2"], lines: [2, 3, 4], file: "p.tsv" }, options)],
      ["c", codeVariable("c", { values: ["7", "5", "2"], lines: [2, 3, 4], file: "p.tsv" }, options)],
    ]);
    expectInputError(() => buildDesignMatrix(parseFormula("a + b + c"), variables, few, MODEL_KEY), {
      ...MODEL_KEY,
      message: [/4 columns/, /3 subjects/],
    });
  });

  it("a variable the formula names but nobody coded: InputError on the model key", () => {
    expect(() => buildDesignMatrix(parseFormula("ghost"), new Map(), subjects, MODEL_KEY)).toThrow(InputError);
    expectInputError(() => buildDesignMatrix(parseFormula("ghost"), new Map(), subjects, MODEL_KEY), {
      ...MODEL_KEY,
      message: [/'ghost'/],
    });
  });
});

describe("design columns without an intercept", () => {
  it("only the first factor main effect gets every level; a second factor stays treatment-coded (R does the same)", () => {
    const design = buildFor("0 + group + site");
    expect(design.columns.map((c) => c.name)).toEqual(["group[control]", "group[patient]", "site[central]", "site[south]"]);
  });

  it("a numeric variable first and no intercept leaves the factor fully coded", () => {
    const design = buildFor("age + group - 1");
    expect(design.columns.map((c) => c.name)).toEqual(["age", "group[control]", "group[patient]"]);
  });
});
