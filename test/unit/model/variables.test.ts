// Coding of model variables (src/model/variables.ts): numeric or factor, centring, level order
// and the input errors. Level order and treatment coding (first level = reference) follow
// R's factor()/contr.treatment convention (R documentation ?factor, ?contrasts); the level
// order R chose for the fixture cohort is checked in designMatrix.test.ts. Expected values
// below are worked by hand from the rule in the source's doc comment.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { codeVariable, compareLevels, isNumericText, type Variable } from "../../../src/model/variables.js";
import { EPS, expectAllClose, expectClose } from "../../helpers/close.js";
import { expectInputError } from "../io/inputErrorAssertions.js";

const FILE = "participants.tsv";
const LEVELS_KEY = { file: "study.yaml", key: "levels", line: 5 };
const CENTER_KEY = { file: "study.yaml", key: "center", line: 8 };

function code(name: string, values: string[], options: { levels?: string[]; center?: boolean } = {}): Variable {
  return codeVariable(
    name,
    { values, lines: values.map((_, i) => i + 2), file: FILE },
    { levels: options.levels, center: options.center ?? false, levelsKey: LEVELS_KEY, centerKey: CENTER_KEY },
  );
}

function asFactor(variable: Variable) {
  if (variable.kind !== "factor") throw new Error(`expected a factor, got ${variable.kind}`);
  return variable;
}

function asNumeric(variable: Variable) {
  if (variable.kind !== "numeric") throw new Error(`expected numeric, got ${variable.kind}`);
  return variable;
}

describe("isNumericText", () => {
  it("accepts decimal numbers with sign, fraction and exponent, and surrounding spaces", () => {
    for (const text of ["20", "-2.5", "+3", ".5", "5.", "1e3", "1E-3", " 7 ", "0"]) expect(isNumericText(text), text).toBe(true);
  });
  it("refuses words, hex, infinities and NaN", () => {
    for (const text of ["", "abc", "0x10", "Infinity", "NaN", "1,5", "1e", "--1", "1.2.3"]) expect(isNumericText(text), text).toBe(false);
  });
});

describe("codeVariable: numeric columns", () => {
  it("reads every value as a number, uncentred", () => {
    const v = asNumeric(code("age", ["20", "30", "1e1", "-2.5", ".5", "+3"]));
    expect(Array.from(v.values)).toEqual([20, 30, 10, -2.5, 0.5, 3]);
    expect(v.center).toBe(0);
  });

  it("centres on the mean when asked, and records the mean (mean of 20, 30, 40, 55 = 36.25, by hand)", () => {
    const v = asNumeric(code("age", ["20", "30", "40", "55"], { center: true }));
    expectClose(v.center, 36.25, { rel: EPS, label: "centre = mean" });
    expectAllClose(v.values, [-16.25, -6.25, 3.75, 18.75], { rel: EPS, label: "centred values" });
  });

  it("one value in every subject (however written) is an InputError naming the column and the model key", () => {
    expectInputError(() => code("age", ["20", "20", "20"]), { file: FILE, key: "model", message: [/'age' has one value/], hint: /remove it/ });
    expectInputError(() => code("age", ["20", "20.0", "2e1"]), { file: FILE, key: "model", message: [/one value/] });
  });
});

describe("codeVariable: factors", () => {
  it("a column with any non-number is a factor; levels sorted by code point (capitals first), codes per subject", () => {
    const v = asFactor(code("site", ["b", "a", "B", "c", "a"]));
    expect(v.levels).toEqual(["B", "a", "b", "c"]);
    expect(Array.from(v.codes)).toEqual([2, 1, 0, 3, 1]);
  });

  it("`levels:` sets the order (and so the reference level) and makes a numeric-coded column a factor", () => {
    const v = asFactor(code("site", ["1", "2", "1", "3"], { levels: ["2", "1", "3"] }));
    expect(v.levels).toEqual(["2", "1", "3"]);
    expect(Array.from(v.codes)).toEqual([1, 0, 1, 2]);
  });

  it("a value outside `levels:` is an InputError at its participants line", () => {
    expectInputError(() => code("site", ["a", "b", "z"], { levels: ["a", "b"] }), {
      file: FILE,
      line: 4,
      message: [/'site' has the value 'z'/, /\(a, b\)/],
      hint: /levels/,
    });
  });

  it("a level in `levels:` that no kept subject has is an InputError at the levels key (one and several)", () => {
    expectInputError(() => code("site", ["a", "b", "a"], { levels: ["a", "b", "c"] }), {
      ...LEVELS_KEY,
      message: [/level 'c' of 'site' has no kept subject/],
    });
    expectInputError(() => code("site", ["a", "b", "a"], { levels: ["a", "b", "c", "d"] }), {
      ...LEVELS_KEY,
      message: [/levels 'c', 'd' of 'site' have no kept subject/],
    });
  });

  it("a factor with one level in every subject is an InputError naming it", () => {
    expectInputError(() => code("site", ["a", "a"]), { file: FILE, key: "model", message: [/factor 'site' has one level \('a'\)/] });
  });

  it("centring a factor is an InputError at the center key", () => {
    expectInputError(() => code("site", ["a", "b"], { center: true }), { ...CENTER_KEY, message: [/'site' is categorical/] });
  });

  it("texts that are not decimal numbers (Infinity, NaN, 0x10) make the column a factor", () => {
    expect(code("x", ["Infinity", "1"]).kind).toBe("factor");
    expect(code("x", ["NaN", "1"]).kind).toBe("factor");
    expect(code("x", ["0x10", "1"]).kind).toBe("factor");
  });
});

describe("default level order does not depend on row order", () => {
  // Found while writing these tests: the default order sorts with compareLevels, which compares
  // two numbers numerically but a number and a text by code point. On a mixed set that is not a
  // total order (9 < 10 numerically, "10" < "1a" and "1a" < "9" by code point), so the levels,
  // and with them the reference level, depend on the order of the rows. The source's doc
  // comment says mixed sets sort by code point; suggested fix (the default branch of
  // codeVariable is only reached when some value is not a number):
  //   levels = [...new Set(values)].sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  it("a mixed numeric/text level set gets the same levels in any row order (fast-check)", () => {
    const base = ["10", "9", "1a", "2"];
    fc.assert(
      fc.property(fc.shuffledSubarray(base, { minLength: base.length, maxLength: base.length }), (values) => {
        expect(asFactor(code("x", values)).levels).toEqual(asFactor(code("x", base)).levels);
      }),
      { seed: 21, numRuns: 50 },
    );
  });

  it("for text levels, the order is the same in any row order (fast-check)", () => {
    fc.assert(
      fc.property(fc.array(fc.constantFrom("north", "south", "Central", "east", "b2"), { minLength: 3, maxLength: 12 }), (values) => {
        const distinct = new Set(values);
        if (distinct.size < 2) return;
        const reversed = [...values].reverse();
        expect(asFactor(code("x", values)).levels).toEqual(asFactor(code("x", reversed)).levels);
        expect(asFactor(code("x", values)).levels).toEqual([...distinct].sort());
      }),
      { seed: 22, numRuns: 200 },
    );
  });

  it("compareLevels compares two numbers numerically and two texts by code point", () => {
    expect(compareLevels("2", "10")).toBeLessThan(0);
    expect(compareLevels("b", "a")).toBeGreaterThan(0);
    expect(compareLevels("B", "a")).toBeLessThan(0);
    expect(compareLevels("x", "x")).toBe(0);
  });
});
