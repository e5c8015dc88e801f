// Tests of the shared tolerance helper. The expected values are exact binary64 arithmetic
// worked by hand (no outside reference is needed: the helper computes no statistic).
import { describe, expect, it } from "vitest";
import { EPS, expectAllClose, expectClose, isClose } from "../../helpers/close.js";

function messageOf(run: () => void): string {
  try {
    run();
  } catch (error) {
    return (error as Error).message;
  }
  throw new Error("expected the comparison to fail");
}

describe("isClose(actual, expected, rel, abs)", () => {
  it("passes exactly at the boundary abs + rel * |expected| and fails just past it", () => {
    // |2.5 - 2| = 0.5 = 0.25 + 0.125 * 2, all exact in binary64
    expect(isClose(2.5, 2, 0.125, 0.25)).toBe(true);
    expect(isClose(2.5000000000000004, 2, 0.125, 0.25)).toBe(false);
  });

  it("matches NaN only with NaN", () => {
    expect(isClose(NaN, NaN, 0, 0)).toBe(true);
    expect(isClose(NaN, 1, 1, 1)).toBe(false);
    expect(isClose(1, NaN, 1, 1)).toBe(false);
  });

  it("matches an infinity only with the same infinity", () => {
    expect(isClose(Infinity, Infinity, 0, 0)).toBe(true);
    expect(isClose(-Infinity, Infinity, 1, 1)).toBe(false);
    expect(isClose(1e308, Infinity, 1, 1)).toBe(false);
  });

  it("treats EPS as 2^-52", () => {
    expect(EPS).toBe(2 ** -52);
    expect(isClose(1 + EPS, 1, EPS, 0)).toBe(true);
    expect(isClose(1 + 2 * EPS, 1, EPS, 0)).toBe(false);
  });
});

describe("expectClose(actual, expected, options)", () => {
  it("returns quietly within tolerance", () => {
    expect(() => expectClose(0.1 + 0.2, 0.3, { rel: 2 * EPS })).not.toThrow();
    expect(() => expectClose(1e-300, 0, { abs: 1e-299 })).not.toThrow();
  });

  it("prints label, inputs, expected, actual, difference and tolerance on failure", () => {
    const message = messageOf(() =>
      expectClose(3, 2, { rel: 0.25, abs: 0.25, label: "b1", inputs: { x: new Float64Array([1, NaN]) } }),
    );
    expect(message).toContain("expectClose failed: b1");
    expect(message).toContain("expected:   2");
    expect(message).toContain("actual:     3");
    expect(message).toContain("difference: 1 (relative 0.5)");
    expect(message).toContain("tolerance:  0.75 = abs 0.25 + rel 0.25 * |expected|");
    expect(message).toContain('inputs:     {"x":[1,"NaN"]}');
  });

  it("refuses a call that states no tolerance", () => {
    // @ts-expect-error: the type requires rel or abs
    expect(() => expectClose(1, 1, {})).toThrow(/state a tolerance/);
  });
});

describe("expectAllClose(actual, expected, options)", () => {
  it("accepts typed and plain arrays of the same values", () => {
    expect(() => expectAllClose(new Float64Array([1, 2, NaN]), [1, 2, NaN], { abs: 0 })).not.toThrow();
  });

  it("names the first failing index, the count and the worst element", () => {
    const message = messageOf(() => expectAllClose([1, 2.5, 3, 14], [1, 2, 3, 4], { abs: 0.25, label: "row" }));
    expect(message).toContain("expectAllClose failed: row");
    expect(message).toContain("index:      [1] (first of 2 failing element(s) out of 4)");
    expect(message).toContain("worst:      [3]");
    expect(message).toContain("difference: 10");
  });

  it("reports a length mismatch", () => {
    const message = messageOf(() => expectAllClose([1, 2], [1, 2, 3], { rel: 0 }));
    expect(message).toContain("length:     expected 3, actual 2");
  });
});
