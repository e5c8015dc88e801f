// Which t contrasts compare two levels of a factor (src/model/levelComparison.ts), and the design
// rows of the two levels' model means. The expected readings follow from treatment coding (R's
// contr.treatment, R documentation ?contrasts: the reference level has no column); the means are
// checked against the same quantity computed another way: the average over participants of the
// fitted value with each participant's factor set to the level, which is what R's
// mean(predict(fit, newdata)) gives (test/cli/effectSizes.test.ts compares with R itself).
import { describe, expect, it } from "vitest";
import { parseContrast } from "../../../src/model/contrast.js";
import { buildDesignMatrix, type DesignMatrix } from "../../../src/model/designMatrix.js";
import { formulaVariables, parseFormula } from "../../../src/model/formula.js";
import { levelComparison } from "../../../src/model/levelComparison.js";
import { codeVariable, type Variable } from "../../../src/model/variables.js";
import { expectAllClose } from "../../helpers/close.js";

const DATA: Record<string, string[]> = {
  group: ["control", "patient", "control", "patient", "control", "patient", "control", "patient", "patient"],
  age: ["20", "31", "45", "52", "60", "38", "27", "49", "33"],
  site: ["north", "south", "central", "north", "south", "central", "north", "south", "central"],
};

function design(formulaText: string): DesignMatrix {
  const formula = parseFormula(formulaText);
  const variables = new Map<string, Variable>();
  for (const name of formulaVariables(formula)) {
    variables.set(
      name,
      codeVariable(
        name,
        { values: DATA[name], lines: DATA[name].map((_, i) => i + 2), file: "participants.tsv" },
        { levels: name === "site" ? ["north", "central", "south"] : undefined, center: false, levelsKey: { key: "levels" }, centerKey: { key: "center" } },
      ),
    );
  }
  return buildDesignMatrix(formula, variables, DATA.group.length, { key: "model" });
}

function read(formula: string, expression: string | number[]) {
  const X = design(formula);
  return levelComparison(parseContrast("c", expression, X, { key: "contrasts.c" }), X);
}

describe("levelComparison: contrasts between two levels of a factor", () => {
  it("a level against the reference, either sign", () => {
    expect(read("group + age", "group[patient] - group[control]")).toMatchObject({ variable: "group", first: "patient", second: "control" });
    expect(read("group + age", "group[control] - group[patient]")).toMatchObject({ variable: "group", first: "control", second: "patient" });
    expect(read("group + age + site", "site[south]")).toMatchObject({ variable: "site", first: "south", second: "north" });
  });

  it("two non-reference levels, and every level coded when the model has no intercept", () => {
    expect(read("group + age + site", "site[central] - site[south]")).toMatchObject({ variable: "site", first: "central", second: "south" });
    expect(read("group + age - 1", "group[patient] - group[control]")).toMatchObject({ variable: "group", first: "patient", second: "control" });
  });

  it("not a comparison of two levels: slopes, scaled or averaged weights, several factors, F contrasts, interactions", () => {
    expect(read("group + age", "age")).toBeUndefined();
    expect(read("group + age", "2*group[patient]")).toBeUndefined();
    expect(read("group + age + site", "0.5*site[central] + 0.5*site[south]")).toBeUndefined();
    expect(read("group + age + site", "group[patient] - site[south]")).toBeUndefined();
    expect(read("group + age + site", "site")).toBeUndefined();
    expect(read("group * age", "group[patient] - group[control]")).toBeUndefined();
    expect(read("group + age - 1", "group[patient]")).toBeUndefined();
  });

  it("the levels' rows give the average fitted value with every participant set to the level; their difference is the contrast", () => {
    const X = design("group + age + site");
    const c = parseContrast("c", "site[central] - site[south]", X, { key: "contrasts.c" });
    const comparison = levelComparison(c, X)!;
    const beta = [0.3, -0.2, 0.01, 0.5, -0.4]; // intercept, group[patient], age, site[central], site[south]
    const expected = (level: string): number => {
      let sum = 0;
      DATA.group.forEach((g, i) => {
        sum += beta[0] + (g === "patient" ? beta[1] : 0) + beta[2] * Number(DATA.age[i]) + (level === "central" ? beta[3] : level === "south" ? beta[4] : 0);
      });
      return sum / DATA.group.length;
    };
    const at = (row: Float64Array): number => row.reduce((s, v, k) => s + v * beta[k], 0);
    expectAllClose([at(comparison.firstRow), at(comparison.secondRow)], [expected("central"), expected("south")], { rel: 1e-14, label: "level means" });
    expectAllClose(comparison.firstRow.map((v, k) => v - comparison.secondRow[k]), c.vector, { abs: 1e-15, label: "first − second row = c" });
  });
});
