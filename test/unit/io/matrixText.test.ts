import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { parseDecimalSpan, parseMatrixText } from "../../../src/io/matrixText.js";
import { expectInputError, parsesOrInputError, resultOrInputError } from "./inputErrorAssertions.js";

/** Exact equality that tells -0 from 0, with the inputs printed on failure (tolerance: none, bit-exact). */
function expectSameNumber(actual: number, expected: number, input: string): void {
  if (!Object.is(actual, expected)) {
    throw new Error(
      `input ${JSON.stringify(input)}: expected ${expected} (Number() of the text), actual ${actual}, difference ${actual - expected}, tolerance 0 (exact)`,
    );
  }
}

describe("parseMatrixText: layouts", () => {
  const expected = [1, -2.5, 3e-4, 0.25, 5, -6, 7.125, 8, 9];

  it.each([
    ["tabs", "1\t-2.5\t3e-4\n0.25\t5\t-6\n7.125\t8\t9\n"],
    ["commas", "1,-2.5,3e-4\n0.25,5,-6\n7.125,8,9"],
    ["commas with spaces around them", "1 , -2.5,  3e-4\n0.25 ,5 ,\t-6\n 7.125,8, 9  \n"],
    ["runs of spaces", "1   -2.5  3e-4\n  0.25 5 -6\n7.125      8 9\n"],
    ["a mix of spaces and tabs", "1 \t -2.5\t\t3e-4\n0.25\t 5 -6\n7.125 8\t9\n"],
    ["CRLF, a byte-order mark and trailing blank lines", "\uFEFF1\t-2.5\t3e-4\r\n0.25\t5\t-6\r\n7.125\t8\t9\r\n\r\n  \r\n\n"],
  ])("reads %s, row-major", (_name, text) => {
    const matrix = parseMatrixText(text, "m.txt");
    expect(matrix.size).toBe(3);
    expect(Array.from(matrix.values)).toEqual(expected);
  });

  it("reports the file line of each matrix row, skipping blank lines", () => {
    expect(parseMatrixText("\n1 2\n\n3 4\n", "m.txt").rowLines).toEqual([2, 4]);
  });

  it("reads a 1 × 1 matrix", () => {
    expect(Array.from(parseMatrixText("42\n", "m.txt").values)).toEqual([42]);
  });
});

describe("parseMatrixText: bad input names file, line and column", () => {
  it("a short row", () => {
    expectInputError(() => parseMatrixText("1 2 3\n4 5\n7 8 9\n", "m.txt"), {
      file: "m.txt",
      line: 2,
      column: 3,
      message: ["not square", "2 values, expected 3"],
    });
  });

  it("a long row", () => {
    expectInputError(() => parseMatrixText("1 2\n3 4 5\n", "m.txt"), {
      file: "m.txt",
      line: 2,
      column: 3,
      message: ["more than 2 values"],
    });
  });

  it("more rows than columns", () => {
    expectInputError(() => parseMatrixText("1 2\n3 4\n\n5 6\n", "m.txt"), { file: "m.txt", line: 4, message: ["not square"] });
  });

  it("fewer rows than columns", () => {
    expectInputError(() => parseMatrixText("1 2 3\n4 5 6\n\n", "m.txt"), {
      file: "m.txt",
      line: 2,
      message: ["not square", "2 rows of 3 values"],
    });
  });

  it("a non-numeric cell, with its text", () => {
    expectInputError(() => parseMatrixText("1\t2\n3\tabc\n", "m.txt"), {
      file: "m.txt",
      line: 2,
      column: 2,
      message: ["'abc'", "row 2, column 2", "not a number"],
    });
  });

  it.each(["0x10", "1_000", "1e", "1e+", ".", "-", "1.2.3", "12a", "١٢"])("the cell '%s' is not a number", (cell) => {
    expectInputError(() => parseMatrixText(`0 ${cell}\n1 1\n`, "m.txt"), {
      file: "m.txt",
      line: 1,
      column: 2,
      message: [`'${cell}'`],
    });
  });

  it.each(["NaN", "nan", "Inf", "-inf", "Infinity", "1e999"])("the cell '%s' is not finite", (cell) => {
    expectInputError(() => parseMatrixText(`1,2\n3, ${cell}\n`, "m.txt"), {
      file: "m.txt",
      line: 2,
      column: 2,
      message: [`'${cell}'`, "not finite"],
    });
  });

  it("with allowNonFiniteDiagonal, NaN and ±Inf are kept on the diagonal and still rejected off it", () => {
    const matrix = parseMatrixText("nan 1 2\n1 Inf 3\n2 3 -infinity\n", "m.txt", { allowNonFiniteDiagonal: true });
    expect(Array.from(matrix.values)).toEqual([NaN, 1, 2, 1, Infinity, 3, 2, 3, -Infinity]);
    expectInputError(() => parseMatrixText("0 NaN\n1 0\n", "m.txt", { allowNonFiniteDiagonal: true }), {
      file: "m.txt",
      line: 1,
      column: 2,
      message: ["only the diagonal"],
    });
  });

  it("comma-separated: a missing comma, an empty cell and a trailing comma", () => {
    expectInputError(() => parseMatrixText("1,2\n3 4\n", "m.txt"), { file: "m.txt", line: 2, column: 2, message: ["comma"] });
    expectInputError(() => parseMatrixText("1,,2\n3,4,5\n", "m.txt"), { file: "m.txt", line: 1, column: 2, message: ["empty cell"] });
    expectInputError(() => parseMatrixText("1,2,\n3,4\n", "m.txt"), { file: "m.txt", line: 1, column: 3, message: ["empty cell"] });
  });

  it("a whitespace-separated file with a comma later on", () => {
    expectInputError(() => parseMatrixText("1 2\n3,4\n", "m.txt"), { file: "m.txt", line: 2, column: 1, message: ["'3,4'"] });
  });

  it("an empty file", () => {
    expectInputError(() => parseMatrixText("\uFEFF\r\n  \n", "m.txt"), { file: "m.txt", line: 1, message: ["empty"] });
  });
});

// Reference for every numeric check below: JavaScript's own Number(text)
// (ECMAScript StringToNumber, correctly rounded), compared bit for bit.
describe("parseMatrixText: values equal Number(text) (reference: JS Number())", () => {
  it.each([
    "0", "-0", "+0", "0.0", "-0.000", "00012", "5.", ".5", "-.5e-3", "+7", "1e22", "1e23", "1e-22", "1e-23",
    "9007199254740991", "9007199254740992", "9007199254740993", "1234567890123456", "12345678901234567",
    "0.1", "0.2", "0.30000000000000004", "123456789012345.6", "4.9e-324", "5e-324", "2e-324", "1e-400", "0e999999",
    "2.2250738585072011e-308", "2.2250738585072014e-308", "1.7976931348623157e308", "1.7976931348623158e308",
    "-1.234567890123456789e-01", "3.141592653589793238462643383279", "1E5", "1e+05", "000.000123",
    "0.000000000000000000000000000001", "100000000000000000000000000000",
  ])("%s", (cell) => {
    expectSameNumber(parseMatrixText(cell, "m.txt").values[0], Number(cell), cell);
  });

  it("random decimal strings (up to 25 digits each side, exponents up to 3 digits)", () => {
    const decimal = fc.stringMatching(/^[+-]?(\d{1,25}(\.\d{0,25})?|\.\d{1,25})([eE][+-]?\d{1,3})?$/);
    fc.assert(
      fc.property(decimal, (cell) => {
        const reference = Number(cell);
        if (Number.isFinite(reference)) expectSameNumber(parseDecimalSpan(cell, 0, cell.length), reference, cell);
        else expect(Number.isFinite(parseDecimalSpan(cell, 0, cell.length))).toBe(false);
      }),
      { numRuns: 20000 },
    );
  });

  it("random doubles written by String, toExponential, toFixed and toPrecision", () => {
    const written = fc
      .tuple(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.nat(4), fc.integer({ min: 0, max: 20 }))
      .map(([x, style, digits]) => {
        if (style === 1) return x.toExponential(digits);
        if (style === 2 && Math.abs(x) < 1e21) return x.toFixed(digits);
        if (style === 3) return x.toPrecision(digits + 1);
        return String(x);
      });
    fc.assert(
      fc.property(written, (cell) => {
        if (Number.isFinite(Number(cell))) expectSameNumber(parseMatrixText(cell, "m.txt").values[0], Number(cell), cell);
        else expectInputError(() => parseMatrixText(cell, "m.txt"), { file: "m.txt", line: 1, column: 1, message: ["not finite"] });
      }),
      { numRuns: 20000 },
    );
  });

  it("random small matrices in random layouts read back exactly", () => {
    const layout = fc.record({
      size: fc.integer({ min: 1, max: 6 }),
      separator: fc.constantFrom("\t", ",", ", ", " ,", " , ", " ", "   ", " \t ", "\t\t"),
      eol: fc.constantFrom("\n", "\r\n"),
      bom: fc.boolean(),
      lead: fc.constantFrom("", " ", "\t"),
      trailing: fc.constantFrom("", "\n", "\n\n", "\r\n  \r\n"),
    });
    const cell = fc.oneof(
      fc.double({ noNaN: true, noDefaultInfinity: true }).map(String),
      fc.double({ min: -1, max: 1, noNaN: true }).map((x) => x.toFixed(6)),
      fc.integer({ min: -1000, max: 1000 }).map(String),
      fc.double({ noNaN: true, noDefaultInfinity: true }).map((x) => x.toExponential(18)),
    );
    fc.assert(
      fc.property(layout, fc.array(cell, { minLength: 36, maxLength: 36 }), (shape, cells) => {
        const n = shape.size;
        const lines: string[] = [];
        for (let i = 0; i < n; i++) lines.push(shape.lead + cells.slice(i * n, (i + 1) * n).join(shape.separator));
        const text = (shape.bom ? "\uFEFF" : "") + lines.join(shape.eol) + shape.trailing;
        const matrix = parseMatrixText(text, "m.txt");
        expect(matrix.size).toBe(n);
        for (let k = 0; k < n * n; k++) expectSameNumber(matrix.values[k], Number(cells[k]), cells[k]);
      }),
      { numRuns: 3000 },
    );
  });
});

describe("parseMatrixText: malformed input", () => {
  it("random text from a numeric alphabet parses to a square matrix or raises an InputError (no other error, no hang)", () => {
    const unit = fc.constantFrom("0", "1", "9", ".", "-", "+", "e", "E", ",", " ", "\t", "\n", "\n", "\r", "n", "a", "i", "f", "x", "\uFEFF");
    fc.assert(
      fc.property(fc.string({ unit, maxLength: 60 }), fc.boolean(), (text, allowNonFiniteDiagonal) => {
        const matrix = resultOrInputError(() => parseMatrixText(text, "m.txt", { allowNonFiniteDiagonal }));
        if (matrix === undefined) return true;
        expect(matrix.values.length).toBe(matrix.size * matrix.size);
        expect(matrix.rowLines.length).toBe(matrix.size);
        return true;
      }),
      { numRuns: 10000 },
    );
  });

  it("arbitrary Unicode text never raises anything but an InputError", () => {
    fc.assert(
      fc.property(fc.string({ unit: "binary", maxLength: 100 }), (text) => parsesOrInputError(() => parseMatrixText(text, "m.txt"))),
      { numRuns: 3000 },
    );
  });
});
