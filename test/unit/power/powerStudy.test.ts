import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { clopperPearson } from "../../../src/inference/familywiseP.js";
import { analysePowerCohort, sampleSizeFor, sampleSizeSentence, sampleSizeWithInterval, summarizePower, type PowerPlan } from "../../../src/power/powerStudy.js";
import { plantedEdges } from "../../../src/power/powerCohort.js";

// Reference: the power of a one-sided two-sample t test on a single edge with
// no correction is known analytically from the noncentral t distribution;
// the values come from R (test/fixtures/r/power_noncentral_t.R →
// power_noncentral_t.json: pt(..., ncp) cross-checked with power.t.test).
const fixture = JSON.parse(readFileSync(new URL("../../fixtures/r/power_noncentral_t.json", import.meta.url), "utf8")) as {
  rows: { per_group: number; d: number; alpha: number; power: number }[];
};

describe("power planning", () => {
  for (const row of fixture.rows) {
    it(`one edge, n = ${row.per_group} per group, d = ${row.d}: simulated power matches the noncentral t (R)`, () => {
      const plan: PowerPlan = {
        regionCount: 2,
        planted: [0],
        effectSize: row.d,
        threshold: 3,
        size: "extent",
        alpha: row.alpha,
        permutations: 0,
        seed: 7,
        pilot: null,
      };
      const cohorts = 3000;
      const outcomes = Array.from({ length: cohorts }, (_, k) => analysePowerCohort(plan, row.per_group, k + 1));
      const detected = outcomes.filter((o) => o.uncorrected).length;
      // The analytic value must lie in the simulation's 99.9% Clopper–Pearson interval.
      const { low, high } = clopperPearson(detected, cohorts, 0.999);
      if (!(low <= row.power && row.power <= high)) {
        throw new Error(`simulated ${detected}/${cohorts} = ${(detected / cohorts).toFixed(4)}, interval ${low.toFixed(4)}–${high.toFixed(4)}, analytic ${row.power}`);
      }
    });
  }

  it("is reproducible from its seed and picks the smallest sample size reaching the target", () => {
    const plan: PowerPlan = { regionCount: 12, planted: [...plantedEdges(12, 4, null, 3)], effectSize: 1.2, threshold: 2.5, size: "extent", alpha: 0.05, permutations: 99, seed: 3, pilot: null };
    const a = Array.from({ length: 20 }, (_, k) => analysePowerCohort(plan, 12, k + 1));
    const b = Array.from({ length: 20 }, (_, k) => analysePowerCohort(plan, 12, k + 1));
    expect(a).toEqual(b);
    const estimates = [...summarizePower(10, a.map((o) => ({ ...o, components: false }))), ...summarizePower(20, a.map((o) => ({ ...o, components: true })))];
    expect(sampleSizeFor(estimates, 0.8).components).toBe(20);
  });

  it("says a sample size reaches the target only when its interval does, and names a point estimate as one", () => {
    // 17/20 = 85% (Clopper–Pearson lower bound below 80%), 60/60 = 100% (lower bound above 80%): intervals from
    // clopperPearson, itself checked against R's binom.test elsewhere (test/unit/inference).
    const detections = (n: number, of: number) => Array.from({ length: of }, (_, k) => ({ components: k < n, "max-t": false, fdr: false, uncorrected: false }));
    const estimates = [...summarizePower(10, detections(17, 20)), ...summarizePower(20, detections(60, 60))];
    const low = clopperPearson(17, 20, 0.95).low;
    expect(low).toBeLessThan(0.8);
    expect(sampleSizeFor(estimates, 0.8).components).toBe(10);
    expect(sampleSizeWithInterval(estimates, 0.8).components).toBe(20);
    const line = sampleSizeSentence("components", estimates, 0.8);
    expect(line).toContain("the point estimate of power first reaches 80.0% at 10 participants per group");
    expect(line).toContain("but the interval still includes lower power there");
    expect(line).toContain("20 participants per group (40 in all) reach 80.0% with the whole interval at or above it");
    const only = summarizePower(10, detections(17, 20));
    expect(sampleSizeSentence("components", only, 0.8)).toContain("no sample size in the grid reaches 80.0% with its whole interval");
    expect(sampleSizeSentence("fdr", only, 0.8)).toBe("- fdr: no sample size in the grid reaches 80.0% power, even as a point estimate.");
  });

  it("plants every edge among the k regions nearest the seed region (coordinates)", () => {
    const coordinates = [0, 1, 2, 10, 11, 50].map((x) => ({ x, y: 0, z: 0 }));
    const edges = plantedEdges(6, 3, coordinates, 0);
    // Regions 0, 1, 2 → edges (0,1), (0,2), (1,2) = indices 0, 1, 5 in the row-major order of 6 regions.
    expect([...edges].sort((x, y) => x - y)).toEqual([0, 1, 5]);
  });
});
