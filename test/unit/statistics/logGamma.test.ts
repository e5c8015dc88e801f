// log Γ, log B and the regularized incomplete beta function (src/statistics/logGamma.ts,
// incompleteBeta.ts), the pieces under the Student t tails, against closed forms that need no
// numerical library (Abramowitz & Stegun 1964, Handbook of Mathematical Functions: Γ(n) =
// (n − 1)!, Γ(n + ½) = (2n)! √π / (4ⁿ n!), B(a, b) = Γ(a)Γ(b)/Γ(a + b), and from the
// definition of I_x(a, b): I_x(a, 1) = xᵃ, I_x(1, b) = 1 − (1 − x)ᵇ, I_x(½, ½) = (2/π) asin √x;
// A&S section numbers 6.1.6, 6.1.12, 6.2.2, 26.5.1 from memory). Factorials are exact BigInt
// products; their logarithms are taken from the leading digits and the decimal exponent.
// Tolerances (measured worst case when written in brackets):
//   logGamma(n), n = 1..171:       relative 1e-14 + absolute 4e-15  [2.7e-15; 1.8e-15 abs at n = 1, 2]
//   logGamma(k + ½), k = 0..80:    relative 1e-14 + absolute 4e-15  [1.2e-15 absolute at k = 1]
//   logBeta of whole numbers:      relative 1e-14                    [2.9e-15]
//   logBeta(a, 1) = −ln a:         relative 1e-14 for a from 2 to 1e12 [2.4e-15]
//   incomplete beta closed forms:  relative 1e-13                    [3.1e-14, I_x(7.5, 1) at x = 1e-10]
import { describe, expect, it } from "vitest";
import { regularizedIncompleteBeta } from "../../../src/statistics/incompleteBeta.js";
import { logBeta, logGamma } from "../../../src/statistics/logGamma.js";
import { expectClose } from "../../helpers/close.js";

function factorial(n: number): bigint {
  let f = 1n;
  for (let k = 2n; k <= BigInt(n); k++) f *= k;
  return f;
}

/**
 * ln(num/den) for positive BigInts: the ratio as mantissa m in [1, 10) (about 20 exact digits
 * before rounding to a double) times 10^E, so ln = ln m + E ln 10 with an error of a few ulps of
 * the result (and none from the exponent when E = 0).
 */
function logRatio(num: bigint, den: bigint): number {
  const shift = Math.max(0, den.toString().length - num.toString().length + 20);
  const scaled = (num * 10n ** BigInt(shift)) / den; // at least 20 significant digits
  const text = scaled.toString();
  const mantissa = Number(`${text[0]}.${text.slice(1, 25)}`);
  const exponent = text.length - 1 - shift;
  return Math.log(mantissa) + exponent * Math.LN10;
}

describe("logGamma against exact factorials", () => {
  it("logGamma(n) = ln((n − 1)!) for n = 1..171 (A&S: Γ(n) = (n − 1)!)", () => {
    for (let n = 1; n <= 171; n++) {
      expectClose(logGamma(n), logRatio(factorial(n - 1), 1n), { rel: 1e-14, abs: 4e-15, label: "lnΓ(n) vs ln (n−1)!", inputs: { n } });
    }
  });

  it("logGamma(k + ½) = ln((2k)! √π / (4^k k!)) for k = 0..80 (A&S: Γ(n + ½))", () => {
    for (let k = 0; k <= 80; k++) {
      const exact = logRatio(factorial(2 * k), 4n ** BigInt(k) * factorial(k)) + 0.5 * Math.log(Math.PI);
      expectClose(logGamma(k + 0.5), exact, { rel: 1e-14, abs: 4e-15, label: "lnΓ(k + ½) vs closed form", inputs: { k } });
    }
  });

  it("logGamma is +∞ at 0 and NaN below 0 or for NaN (kernels never throw)", () => {
    expect(logGamma(0)).toBe(Infinity);
    expect(logGamma(-1)).toBeNaN();
    expect(logGamma(NaN)).toBeNaN();
    expect(logGamma(Infinity)).toBe(Infinity);
  });
});

describe("logBeta against exact factorial ratios", () => {
  it("logBeta(a, b) = ln((a−1)!(b−1)!/(a+b−1)!) for whole a, b with a + b ≤ 171, within 1e-14 relative (A&S: B = ΓΓ/Γ)", () => {
    for (let a = 1; a <= 90; a += 1) {
      for (let b = 1; a + b <= 171; b += 5) {
        const exact = logRatio(factorial(a - 1) * factorial(b - 1), factorial(a + b - 1));
        if (exact === 0) {
          expectClose(logBeta(a, b), 0, { abs: 4e-15, label: "ln B(1, 1) = 0", inputs: { a, b } });
          continue;
        }
        expectClose(logBeta(a, b), exact, { rel: 1e-14, label: "ln B(a, b) vs exact factorial ratio", inputs: { a, b } });
        expect(logBeta(b, a)).toBe(logBeta(a, b));
      }
    }
  });

  it("logBeta(a, 1) = −ln a from a = 2 to 1e12 within 1e-14 relative (the large-argument branches)", () => {
    for (const a of [2, 9.5, 10, 11, 100, 1e4, 1e6, 1e8, 1e12]) {
      expectClose(logBeta(a, 1), -Math.log(a), { rel: 1e-14, label: "ln B(a, 1) = −ln a", inputs: { a } });
    }
  });

  it("logBeta(½, ½) = ln π within 1e-14 absolute", () => {
    expectClose(logBeta(0.5, 0.5), Math.log(Math.PI), { abs: 1e-14, label: "ln B(½, ½) = ln π" });
  });
});

describe("regularizedIncompleteBeta against closed forms", () => {
  const xs = [1e-10, 0.01, 0.3, 0.5, 0.77, 0.99, 1 - 1e-9];

  it("I_x(a, 1) = x^a and I_x(1, b) = 1 − (1 − x)^b within 1e-13 relative", () => {
    for (const x of xs) {
      for (const a of [0.5, 1, 2, 7.5, 100]) {
        expectClose(regularizedIncompleteBeta(x, a, 1), x ** a, { rel: 1e-13, label: "I_x(a, 1) = x^a", inputs: { x, a } });
        const expected = -Math.expm1(a * Math.log1p(-x));
        expectClose(regularizedIncompleteBeta(x, 1, a), expected, { rel: 1e-13, label: "I_x(1, b) = 1 − (1−x)^b", inputs: { x, b: a } });
      }
    }
  });

  it("I_x(½, ½) = (2/π) asin √x within 1e-13 relative", () => {
    for (const x of xs) {
      // Above ½ the equivalent 1 − (2/π) asin √(1 − x) (1 − x is exact there) keeps the reference
      // well conditioned; asin √x near x = 1 would lose digits in the reference itself.
      const expected = x <= 0.5 ? (2 / Math.PI) * Math.asin(Math.sqrt(x)) : 1 - (2 / Math.PI) * Math.asin(Math.sqrt(1 - x));
      expectClose(regularizedIncompleteBeta(x, 0.5, 0.5), expected, {
        rel: 1e-13,
        label: "I_x(½, ½) = (2/π) asin √x",
        inputs: { x },
      });
    }
  });

  it("the ends and NaN: I_0 = 0, I_1 = 1, NaN in → NaN out", () => {
    expect(regularizedIncompleteBeta(0, 2, 3)).toBe(0);
    expect(regularizedIncompleteBeta(-1, 2, 3)).toBe(0);
    expect(regularizedIncompleteBeta(1, 2, 3)).toBe(1);
    expect(regularizedIncompleteBeta(NaN, 2, 3)).toBeNaN();
    expect(regularizedIncompleteBeta(0.5, NaN, 3)).toBeNaN();
  });
});
