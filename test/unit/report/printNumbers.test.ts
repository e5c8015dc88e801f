import { describe, expect, it } from "vitest";
import { count, decimalsFor, fixed, percent, pValue, significant } from "../../../src/output/report/printNumbers.js";

// Print conventions are common practice (p to three decimals with "< 0.001", as in APA style);
// no single published source fixes them, so these tests pin this project's choices.
describe("printNumbers", () => {
  it("pValue(p) prints three decimals and '< 0.001' below that; NaN as a dash", () => {
    expect(pValue(0.0004)).toBe("< 0.001");
    expect(pValue(0.001)).toBe("0.001");
    expect(pValue(0.04951)).toBe("0.050");
    expect(pValue(1)).toBe("1.000");
    expect(pValue(NaN)).toBe("—");
  });
  it("significant(x, 3) keeps three significant digits, whole numbers beyond, short exponents below 1e-6", () => {
    expect(significant(28.890872620013187)).toBe("28.9");
    expect(significant(0.0123456)).toBe("0.0123");
    expect(significant(12345.6)).toBe("12346");
    expect(significant(1.2e-7)).toBe("1.20e-7");
  });
  it("fixed never prints a negative zero", () => {
    expect(fixed(-0.0001, 2)).toBe("0.00");
    expect(fixed(-1.234, 2)).toBe("-1.23");
  });
  it("decimalsFor(SD) shows the SD's second significant digit", () => {
    expect(decimalsFor(6.9)).toBe(1);
    expect(decimalsFor(0.35)).toBe(2);
    expect(decimalsFor(123)).toBe(0);
  });
  it("count prints integers plainly and percent to one decimal", () => {
    expect(count(4)).toBe("4");
    expect(count(4.25)).toBe("4.25");
    expect(percent(1, 3)).toBe("33.3%");
    expect(percent(1, 0)).toBe("—");
  });
});
