import { Buffer } from "node:buffer";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { InputError } from "../../../src/errors.js";
import { parseDecimalSpan, parseMatrixBytes, parseMatrixText, type MatrixTextOptions, type ParsedMatrixText } from "../../../src/io/matrixText.js";
import { TextFileReader, readTextFile } from "../../../src/io/readInputFile.js";
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

// Reference for the byte reader: parseMatrixText on the text Node's readFileSync(path, "utf8") gives for
// the same bytes (Buffer#toString("utf8"), the same decoder): the same values, bit for bit (tolerance: none),
// the same rows and lines, or an InputError with the same message and location.
type Outcome = { matrix: ParsedMatrixText } | { error: InputError };

function outcome(action: () => ParsedMatrixText): Outcome {
  try {
    return { matrix: action() };
  } catch (error) {
    if (error instanceof InputError) return { error };
    throw error;
  }
}

function describeOutcome(result: Outcome): string {
  if ("error" in result) return `InputError ${JSON.stringify({ message: result.error.message, location: result.error.location })}`;
  const { size, rowLines, values } = result.matrix;
  return `matrix ${JSON.stringify({ size, rowLines, values: Array.from(values, String) })}`;
}

function expectSameOutcome(bytes: Uint8Array, options: MatrixTextOptions = {}, reuse?: ParsedMatrixText): ParsedMatrixText | undefined {
  const text = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString("utf8");
  const expected = outcome(() => parseMatrixText(text, "m.txt", options));
  const actual = outcome(() => parseMatrixBytes(bytes, "m.txt", options, reuse));
  const same =
    "error" in expected
      ? "error" in actual &&
        actual.error.message === expected.error.message &&
        JSON.stringify(actual.error.location) === JSON.stringify(expected.error.location) &&
        actual.error.hint === expected.error.hint
      : "matrix" in actual &&
        actual.matrix.size === expected.matrix.size &&
        actual.matrix.values.length === expected.matrix.values.length &&
        JSON.stringify(actual.matrix.rowLines) === JSON.stringify(expected.matrix.rowLines) &&
        expected.matrix.values.every((value, k) => Object.is(value, actual.matrix.values[k]));
  if (!same) {
    let firstDifference = "";
    if ("matrix" in expected && "matrix" in actual) {
      const k = expected.matrix.values.findIndex((value, i) => !Object.is(value, actual.matrix.values[i]));
      if (k >= 0) {
        const [e, a] = [expected.matrix.values[k], actual.matrix.values[k]];
        firstDifference = `; first differing cell ${k}: expected ${e}, actual ${a}, difference ${a - e}`;
      }
    }
    throw new Error(
      `input ${JSON.stringify(text)} (options ${JSON.stringify(options)}): expected ${describeOutcome(expected)} (parseMatrixText), ` +
        `actual ${describeOutcome(actual)} (parseMatrixBytes)${firstDifference}; tolerance 0 (exact)`,
    );
  }
  return "matrix" in actual ? actual.matrix : undefined;
}

const ascii = (text: string): Uint8Array => Buffer.from(text, "utf8");

describe("parseMatrixBytes: the result or InputError of parseMatrixText on the decoded text (reference: parseMatrixText)", () => {
  it.each([
    ["tabs", "1\t-2.5\t3e-4\n0.25\t5\t-6\n7.125\t8\t9\n"],
    ["commas, no final line end", "1,-2.5,3e-4\n0.25,5,-6\n7.125,8,9"],
    ["commas with spaces around them", "1 , -2.5,  3e-4\n0.25 ,5 ,\t-6\n 7.125,8, 9  \n"],
    ["runs of spaces", "1   -2.5  3e-4\n  0.25 5 -6\n7.125      8 9\n"],
    ["CRLF, a byte-order mark and trailing blank lines", "\uFEFF1\t-2.5\t3e-4\r\n0.25\t5\t-6\r\n7.125\t8\t9\r\n\r\n  \r\n\n"],
    ["a CR at the very end", "1 2\r\n3 4\r"],
    ["blank lines between rows", "\n1 2\n\n3 4\n"],
    ["a 1 × 1 matrix", "42\n"],
    ["non-finite words on the diagonal", "nan 1 2\n1 Inf 3\n2 3 -infinity\n"],
    ["signs, bare dots and exponents", "+1 -.5 5. 1E5\n-0 +0.0 1e+05 -1e-05\n.5e-3 00012 0e999999 1e-400\n1e22 1e23 9007199254740993 12345678901234567\n"],
  ])("reads %s", (_name, text) => {
    expectSameOutcome(ascii(text));
    expectSameOutcome(ascii(text), { allowNonFiniteDiagonal: true });
  });

  it.each([
    ["a short row", "1 2 3\n4 5\n7 8 9\n"],
    ["a long row", "1 2\n3 4 5\n"],
    ["more rows than columns", "1 2\n3 4\n\n5 6\n"],
    ["fewer rows than columns", "1 2 3\n4 5 6\n\n"],
    ["a non-numeric cell", "1\t2\n3\tabc\n"],
    ["a hexadecimal cell", "0 0x10\n1 1\n"],
    ["an exponent without digits", "0 1e\n1 1\n"],
    ["a lone sign", "0 -\n1 1\n"],
    ["two dots", "0 1.2.3\n1 1\n"],
    ["NaN off the diagonal", "1,2\n3, NaN\n"],
    ["an overflowing cell", "1,2\n3, 1e999\n"],
    ["a missing comma", "1,2\n3 4\n"],
    ["an empty cell", "1,,2\n3,4,5\n"],
    ["a trailing comma", "1,2,\n3,4\n"],
    ["a comma in a whitespace-separated file", "1 2\n3,4\n"],
    ["an empty file with a byte-order mark", "\uFEFF\r\n  \n"],
    ["a CR inside a line", "1\r2 3\n4 5\n"],
    ["a NUL byte", "1 2\n3 \u00004\n"],
    ["Arabic-Indic digits (non-ASCII)", "0 ١٢\n1 1\n"],
    ["a non-ASCII cell after good rows", "1 2 3\n4 5 6\n7 8 é\n"],
  ])("gives the same InputError for %s", (_name, text) => {
    expectSameOutcome(ascii(text));
    expectSameOutcome(ascii(text), { allowNonFiniteDiagonal: true });
  });

  it("random small matrices in random layouts (ASCII, with or without a byte-order mark)", () => {
    const layout = fc.record({
      size: fc.integer({ min: 1, max: 6 }),
      separator: fc.constantFrom("\t", ",", ", ", " ,", " , ", " ", "   ", " \t ", "\t\t"),
      eol: fc.constantFrom("\n", "\r\n"),
      bom: fc.boolean(),
      lead: fc.constantFrom("", " ", "\t"),
      trailing: fc.constantFrom("", "\n", "\n\n", "\r\n  \r\n", "\r"),
    });
    const cell = fc.oneof(
      fc.double({ noNaN: true, noDefaultInfinity: true }).map(String),
      fc.double({ min: -1, max: 1, noNaN: true }).map((x) => x.toFixed(6)),
      fc.integer({ min: -1000, max: 1000 }).map(String),
      fc.double({ noNaN: true, noDefaultInfinity: true }).map((x) => x.toExponential(18)),
      fc.constantFrom("nan", "-Inf", "+infinity", "NaN", "1e400", "-0", ".5", "5."),
    );
    fc.assert(
      fc.property(layout, fc.array(cell, { minLength: 36, maxLength: 36 }), fc.boolean(), (shape, cells, allowNonFiniteDiagonal) => {
        const n = shape.size;
        const lines: string[] = [];
        for (let i = 0; i < n; i++) lines.push(shape.lead + cells.slice(i * n, (i + 1) * n).join(shape.separator));
        const text = (shape.bom ? "\uFEFF" : "") + lines.join(shape.eol) + shape.trailing;
        expectSameOutcome(ascii(text), { allowNonFiniteDiagonal });
      }),
      { numRuns: 3000 },
    );
  });

  it("random text from a numeric alphabet, some of it non-ASCII", () => {
    const unit = fc.constantFrom("0", "1", "9", ".", "-", "+", "e", "E", ",", " ", "\t", "\n", "\n", "\r", "n", "a", "i", "f", "t", "y", "x", "\uFEFF", "é");
    fc.assert(
      fc.property(fc.string({ unit, maxLength: 60 }), fc.boolean(), (text, allowNonFiniteDiagonal) => {
        expectSameOutcome(ascii(text), { allowNonFiniteDiagonal });
      }),
      { numRuns: 10000 },
    );
  });

  it("arbitrary bytes, invalid UTF-8 included", () => {
    const bytes = fc.oneof(
      fc.uint8Array({ maxLength: 40 }),
      fc.uint8Array({ min: 0, max: 127, maxLength: 40 }),
      fc.array(fc.constantFrom(0x30, 0x31, 0x2e, 0x2d, 0x20, 0x09, 0x0a, 0x0d, 0x2c, 0x65, 0xef, 0xbb, 0xbf, 0xff), { maxLength: 40 }).map(
        (list) => Uint8Array.from(list),
      ),
    );
    fc.assert(
      fc.property(bytes, fc.boolean(), (input, allowNonFiniteDiagonal) => {
        expectSameOutcome(input, { allowNonFiniteDiagonal });
      }),
      { numRuns: 10000 },
    );
  });

  it("reusing the previous result: its arrays for the same size, new ones for another size, correct after an error", () => {
    const a = "1 2 3\n4 5 6\n7 8 9\n";
    const b = "-1\t0.5\t2e3\n4\t5\t6\n\n7\t8\t9.25\n";
    const c = "1,2\n3,4\n";
    const first = expectSameOutcome(ascii(a)) as ParsedMatrixText;
    const second = expectSameOutcome(ascii(b), {}, first) as ParsedMatrixText;
    expect(second.values).toBe(first.values);
    expect(second.rowLines).toBe(first.rowLines);
    expect(Array.from(second.values)).toEqual([-1, 0.5, 2000, 4, 5, 6, 7, 8, 9.25]); // exact (tolerance: none)
    expect(second.rowLines).toEqual([1, 2, 4]);
    const third = expectSameOutcome(ascii(c), {}, second) as ParsedMatrixText;
    expect(third.values.length).toBe(4);
    expect(third.rowLines).toEqual([1, 2]);
    expect(expectSameOutcome(ascii("1 2 3\n4 5\n7 8 9\n"), {}, third)).toBeUndefined();
    const fourth = expectSameOutcome(ascii("9 8\n7 6\n"), {}, third) as ParsedMatrixText;
    expect(Array.from(fourth.values)).toEqual([9, 8, 7, 6]);
    // A first row longer than the reused array (64 values when none is given).
    const wide = Array.from({ length: 100 }, (_, i) => Array.from({ length: 100 }, (_, j) => String(i * 100 + j)).join(" ")).join("\n");
    const big = expectSameOutcome(ascii(wide), {}, fourth) as ParsedMatrixText;
    expect(big.values[99 * 100 + 99]).toBe(9999);
    expectSameOutcome(ascii(wide));
  });

  it("reads the bytes TextFileReader.readBytes gives, as parseMatrixText reads readTextFile's text", () => {
    const dir = mkdtempSync(join(tmpdir(), "plexus-matrix-bytes-"));
    try {
      const reader = new TextFileReader();
      let previous: ParsedMatrixText | undefined;
      const contents = ["1\t0.5\n0.5\t1\n", "\uFEFF1,0.25\r\n0.25,1\r\n", "1 2\n3 4", "1 x\n2 3\n", "0.1 0.2\n0.3 é\n", "nan 1\n1 inf\n"];
      contents.forEach((content, k) => {
        const path = join(dir, `m${k}.txt`);
        writeFileSync(path, content);
        const expected = outcome(() => parseMatrixText(readTextFile(path), path, { allowNonFiniteDiagonal: true }));
        const actual = outcome(() => parseMatrixBytes(reader.readBytes(path), path, { allowNonFiniteDiagonal: true }, previous));
        expect(describeOutcome(actual), JSON.stringify(content)).toBe(describeOutcome(expected));
        if ("matrix" in actual) previous = actual.matrix;
      });
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

/** m · 10^exponent written out in decimal (exact, by BigInt arithmetic), e.g. (25n, -1) → "2.5". */
function decimalText(m: bigint, exponent: number): string {
  if (exponent >= 0) return (m * 10n ** BigInt(exponent)).toString();
  const digits = m.toString().padStart(-exponent + 1, "0");
  return `${digits.slice(0, exponent)}.${digits.slice(exponent)}`;
}

function significantDigits(text: string): number {
  return text.replace(/[-+.]/g, "").replace(/^0+/, "").length;
}

// Reference: JavaScript's Number(text), compared bit for bit (tolerance: none). These cells need more than
// 2^53 in their digits, so they go past Clinger's fast path to the exact correction (or to Number()).
describe("17 to 19 significant digits equal Number(text) (reference: JS Number())", () => {
  function expectBothReaders(cell: string): void {
    const reference = Number(cell);
    expectSameNumber(parseDecimalSpan(cell, 0, cell.length), reference, cell);
    const matrix = parseMatrixBytes(ascii(`${cell}\t${cell}\n${cell} ${cell}`), "m.txt");
    expectSameNumber(matrix.values[3], reference, cell);
  }

  it.each([
    "9007199254740993", "9007199254740995", "18014398509481986", "18014398509481990", "9223372036854775807",
    "9999999999999999999", "2251799813685248.25", "2251799813685248.75", "4503599627370495.5", "4503599627370496.5",
    "0.12345678901234567", "-0.99999999999999999", "0.50000000000000000", "0.250000000000000001", "1.0000000000000002",
    "0.000012345678901234567", "1234567890.123456789", "0.0000000000000000000012345678901234567",
  ])("%s", (cell) => expectBothReaders(cell));

  it("random digit strings of 16 to 19 significant digits, any dot position, exponents −25 … 5", () => {
    const cell = fc
      .tuple(
        fc.bigInt({ min: 10n ** 15n, max: 10n ** 19n - 1n }),
        fc.integer({ min: -25, max: 5 }),
        fc.integer({ min: 0, max: 4 }),
        fc.constantFrom("", "-", "+"),
        fc.boolean(),
      )
      .map(([m, exponent, leadingZeros, sign, explicit]) => {
        const text = explicit ? `${m}e${exponent}` : decimalText(m, exponent);
        return sign + (text.startsWith(".") ? "0".repeat(leadingZeros) + text : text);
      });
    fc.assert(
      fc.property(cell, (text) => expectBothReaders(text)),
      { numRuns: 20000 },
    );
  });

  it("random doubles written with 17 to 19 significant digits (String, toPrecision)", () => {
    const cell = fc
      .tuple(fc.double({ min: 1e-7, max: 1e19, noNaN: true }), fc.integer({ min: 17, max: 19 }), fc.boolean())
      .map(([x, digits, negative]) => (negative ? "-" : "") + (digits === 17 ? String(x) : x.toPrecision(digits)));
    fc.assert(
      fc.property(cell, (text) => expectBothReaders(text)),
      { numRuns: 20000 },
    );
  });

  it("exact halfway points between neighbouring doubles, and the decimals one unit either side", () => {
    // A midpoint (2M + 1) · 2^(F − 1) between M · 2^F and (M + 1) · 2^F, M in [2^52, 2^53), written exactly
    // (BigInt); those of at most 19 significant digits have F from −3 to 10. Number() rounds a tie to even M.
    const midpoint = fc
      .tuple(fc.bigInt({ min: 2n ** 52n, max: 2n ** 53n - 1n }), fc.integer({ min: -3, max: 10 }))
      .map(([M, F]) => {
        const twice = 2n * M + 1n;
        return F - 1 >= 0 ? { m: twice * 2n ** BigInt(F - 1), exponent: 0 } : { m: twice * 5n ** BigInt(1 - F), exponent: F - 1 };
      })
      .filter(({ m }) => m < 10n ** 19n);
    let checked = 0;
    fc.assert(
      fc.property(midpoint, ({ m, exponent }) => {
        for (const nearby of [m, m - 1n, m + 1n]) {
          const text = decimalText(nearby, exponent);
          if (significantDigits(text) <= 19) {
            expectBothReaders(text);
            checked++;
          }
        }
      }),
      { numRuns: 5000 },
    );
    expect(checked).toBeGreaterThan(5000);
  });
});
