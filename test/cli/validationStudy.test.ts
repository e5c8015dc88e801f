import { describe, expect, it } from "vitest";
import { clopperPearson } from "../../src/inference/familywiseP.js";
import { runCondition, type StudyCondition } from "../../src/errorRateStudy/errorRateStudy.js";
import { runAcrossContrastsCondition, type AcrossContrastsCondition } from "../../src/errorRateStudy/acrossContrastsStudy.js";

// The reduced, CI-sized form of the validation study (`npm run validate` runs the
// full one). Criterion: under the null the share of cohorts with a family-wise
// rejection at alpha = 0.05 lies within the 99% Clopper–Pearson (1934) interval
// of the observed count; for FDR, the mean false discovery proportion is at
// most q plus three standard errors (Benjamini & Hochberg 1995, Theorem 1:
// FDR ≤ q). The intervals come from jStat's beta quantiles (a general-purpose
// library) through clopperPearson.

const base = { regions: 12, patients: 10, controls: 10, kind: "correlation" as const, covariates: true };
const design = { model: "group + age + sex", contrast: "group[patient] - group[control]", levels: { group: ["control", "patient"] } };

function expectRateNear(rejections: number, cohorts: number, alpha: number, label: string) {
  const { low, high } = clopperPearson(rejections, cohorts, 0.99);
  if (!(low <= alpha && alpha <= high)) {
    throw new Error(`${label}: ${rejections}/${cohorts} rejections; 99% interval ${low.toFixed(4)}–${high.toFixed(4)} does not contain alpha ${alpha}`);
  }
}

describe("error control by simulation (reduced form)", () => {
  it("max-t and components hold the FWER under the null with Freedman–Lane and exchangeability blocks", () => {
    const condition: StudyCondition = {
      name: "ci-null-blocks",
      simulation: { ...base, effect: null },
      design,
      inference: { thresholds: [2.5], size: "mass", tail: "both" },
      blocks: true,
    };
    const cohorts = 1000;
    const outcomes = runCondition(condition, cohorts, 99);
    expectRateNear(outcomes.filter((o) => o.componentRejected).length, cohorts, 0.05, "components, mass, two-tailed, blocks");
    expectRateNear(outcomes.filter((o) => o.edgeRejected).length, cohorts, 0.05, "max-t, two-tailed, blocks");
  });

  it("max-t holds the FWER under the null with several scans per person (within each person, and whole people)", () => {
    for (const kind of ["within", "between", "paired-gain"] as const) {
      const condition: StudyCondition = {
        name: `ci-null-repeated-${kind}`,
        simulation: { ...base, effect: null },
        design,
        inference: { thresholds: [2.5], tail: "both" },
        repeated: { kind, people: 12, regions: 10, personSd: 1 },
      };
      const cohorts = 300;
      const outcomes = runCondition(condition, cohorts, 99);
      expectRateNear(outcomes.filter((o) => o.edgeRejected).length, cohorts, 0.05, `max-t, two-tailed, repeated ${kind}`);
    }
  });

  it("threshold-free enhancement holds the FWER under the null (Freedman–Lane)", () => {
    const condition: StudyCondition = {
      name: "ci-null-enhanced",
      simulation: { ...base, effect: null },
      design,
      inference: { method: "threshold-free", tail: "upper" },
    };
    const cohorts = 600;
    const outcomes = runCondition(condition, cohorts, 99);
    expectRateNear(outcomes.filter((o) => o.enhancedRejected).length, cohorts, 0.05, "threshold-free, upper tail");
  });

  it("Benjamini–Hochberg keeps the mean false discovery proportion at or below q", () => {
    const condition: StudyCondition = {
      name: "ci-fdr",
      simulation: { ...base, effect: { regions: 4, size: 1.2 } },
      design,
      inference: { thresholds: [2.5] },
    };
    const outcomes = runCondition(condition, 200, 19);
    const fdp = outcomes.map((o) => (o.fdr.declared === 0 ? 0 : (o.fdr.declared - o.fdr.truePositive) / o.fdr.declared));
    const mean = fdp.reduce((a, b) => a + b, 0) / fdp.length;
    const se = Math.sqrt(fdp.reduce((a, b) => a + (b - mean) ** 2, 0) / (fdp.length - 1) / fdp.length);
    expect(mean, `mean FDP ${mean} (se ${se})`).toBeLessThanOrEqual(0.05 + 3 * se);
    // The planted effect is found at all (the test is not vacuous).
    expect(outcomes.some((o) => o.fdr.truePositive > 0)).toBe(true);
  });
});

describe("error control across contrasts by simulation (reduced form)", () => {
  // Two opposite one-sided contrasts of null cohorts (Winkler et al. 2016, Human Brain Mapping
  // 37:1486, the joint null of the maxima): with each contrast at alpha on its own null, the
  // family-wise error over the pair is about 2 alpha, above alpha; on the family null of
  // `inference.across_contrasts` it is alpha (the 99% Clopper–Pearson interval contains 0.05 or
  // lies below it). `node validation/run.mjs --only across-contrasts` runs the full form.
  it("two opposite one-sided contrasts: about 2α each on its own, at most α with across_contrasts", () => {
    const condition: AcrossContrastsCondition = {
      name: "ci-across-contrasts",
      simulation: { ...base, effect: null },
      model: "group",
      levels: { group: ["control", "patient"] },
      contrasts: ["group[patient] - group[control]", "group[control] - group[patient]"],
      inference: { thresholds: [2.5], size: "mass", tail: "upper" },
    };
    const cohorts = 800;
    const outcomes = runAcrossContrastsCondition(condition, cohorts, 99);
    for (const key of ["component", "edge"] as const) {
      const joint = outcomes.filter((o) => o.joint[key]).length;
      const separate = outcomes.filter((o) => o.separate[key]).length;
      const jointInterval = clopperPearson(joint, cohorts, 0.99);
      expect(jointInterval.low, `${key}, across_contrasts: ${joint}/${cohorts}`).toBeLessThanOrEqual(0.05);
      const separateInterval = clopperPearson(separate, cohorts, 0.99);
      expect(separateInterval.low, `${key}, each contrast on its own: ${separate}/${cohorts} exceeds alpha`).toBeGreaterThan(0.05);
      expect(separateInterval.high, `${key}, each contrast on its own: ${separate}/${cohorts} near 2 alpha`).toBeGreaterThanOrEqual(0.1 - 0.02);
    }
  });
});
