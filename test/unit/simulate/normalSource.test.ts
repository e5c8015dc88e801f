import { createRequire } from "node:module";
import { describe, expect, it } from "vitest";
import { normalSource } from "../../../src/simulate/normalSource.js";
import { simulationRandom } from "../../../src/simulate/simulationRandom.js";
import { EPS, expectClose } from "../../helpers/close.js";

// Reference: the standard normal CDF of jStat (jstat, a general-purpose statistics library).
const require = createRequire(import.meta.url);
const { jStat } = require("jstat") as { jStat: { normal: { cdf(x: number, mean: number, sd: number): number } } };

describe("normalSource (Marsaglia & Bray 1964 polar method)", () => {
  it("draws match the standard normal CDF (Kolmogorov–Smirnov distance against jStat.normal.cdf)", () => {
    const n = 100_000;
    const normal = normalSource(simulationRandom(1));
    const draws = Float64Array.from({ length: n }, () => normal()).sort();
    let distance = 0;
    for (let k = 0; k < n; k++) {
      const cdf = jStat.normal.cdf(draws[k], 0, 1);
      distance = Math.max(distance, (k + 1) / n - cdf, cdf - k / n);
    }
    // Tolerance: the asymptotic 0.1 % critical value of the Kolmogorov distribution, 1.95/√n
    // (Smirnov 1948, Ann. Math. Stat. 19:279–281; value from memory).
    // The distance is ≥ 0, so |distance − 0| ≤ critical is the one-sided test.
    const critical = 1.95 / Math.sqrt(n);
    expectClose(distance, 0, { abs: critical, label: "KS distance of 100 000 polar-method draws", inputs: { n, seed: 1 } });
  });

  it("the sequence depends only on the uniforms it is given", () => {
    const first = normalSource(simulationRandom(9));
    const second = normalSource(simulationRandom(9));
    const a = Array.from({ length: 11 }, () => first());
    const b = Array.from({ length: 11 }, () => second());
    expect(b).toEqual(a);
    expect(new Set(a).size).toBe(11);
  });

  it("rejects uniform pairs outside the unit disc and at its centre", () => {
    // Uniforms (0.5, 0.5) map to the centre (0, 0): rejected. (0.999, 0.999) map to s ≈ 1.99 > 1:
    // rejected. (0.75, 0.5) map to u = 0.5, v = 0, s = 0.25: accepted.
    const uniforms = [0.5, 0.5, 0.999, 0.999, 0.75, 0.5];
    let k = 0;
    const normal = normalSource(() => uniforms[k++]);
    const x = normal();
    const y = normal();
    // Marsaglia & Bray: x = u·√(−2 ln s / s), y = v·√(−2 ln s / s) with u = 0.5, v = 0, s = 0.25.
    expect(k).toBe(6);
    const expected = 0.5 * Math.sqrt((-2 * Math.log(0.25)) / 0.25);
    expectClose(x, expected, { rel: 4 * EPS, label: "first polar-method normal", inputs: uniforms });
    expect(y).toBe(0);
  });
});
