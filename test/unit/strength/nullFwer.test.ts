// Family-wise error of nodal strength under the null, in a reduced form sized for CI: 200
// simulated cohorts without any group effect (simulateCohort, no planted subnetwork; age and
// site effects on every edge), each analysed like `plexus strength` (model group + age, the
// group contrast, Freedman–Lane, 99 Monte Carlo relabelings, upper tail). A cohort counts as a
// family-wise error when any region has p_fwe ≤ 0.05. With p = (1 + b)/(1 + K) and K = 99 the
// test rejects with probability 5/100 = 0.05 exactly when the errors are exchangeable (Phipson &
// Smyth 2010), so the count of errors is Binomial(200, 0.05); it must fall inside the central
// 99% interval of that distribution, whose bounds come from jStat 1.9.6's binomial CDF (a
// general-purpose library). The full-size check (more cohorts and relabelings) is the
// validation study's business; this form takes a few seconds.
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import jStat from "jstat";
import { afterAll, describe, expect, it } from "vitest";
import { prepareAnalysis } from "../../../src/run/prepareAnalysis.js";
import { analyzeStrength } from "../../../src/strength/strengthAnalysis.js";
import { groupDesignLines, writeDesignFile, writeSimulatedCohort } from "./strengthTestFiles.js";

const COHORTS = 200;
const ALPHA = 0.05;
const root = mkdtempSync(path.join(tmpdir(), "plexus-strength-null-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** jStat's binomial CDF, P(X ≤ k) for X ~ Binomial(n, p). */
const binomialCdf = (k: number, n: number, p: number): number => jStat.binomial.cdf(k, n, p);

/** The central 99% interval [low, high] of Binomial(n, p): P(X < low) ≤ 0.005 and P(X > high) ≤ 0.005. */
function binomialInterval(n: number, p: number): { low: number; high: number } {
  let low = 0;
  while (binomialCdf(low, n, p) <= 0.005) low++;
  let high = 0;
  while (binomialCdf(high, n, p) < 0.995) high++;
  return { low, high };
}

describe("nodal strength FWER under the null (reduced CI form)", () => {
  it(`${COHORTS} null cohorts, 99 relabelings: family-wise errors within the 99% binomial interval around ${ALPHA}`, async () => {
    let errors = 0;
    for (let seed = 1; seed <= COHORTS; seed++) {
      const dir = path.join(root, `cohort-${seed}`);
      writeSimulatedCohort(dir, { regions: 10, patients: 10, controls: 10, kind: "correlation", effect: null, covariates: true }, 1000 + seed, {
        format: "npy",
      });
      const design = writeDesignFile(
        path.join(dir, "design.yaml"),
        groupDesignLines({
          cohort: "",
          npy: true,
          model: "group + age",
          contrasts: ["patient_gt_control: group[patient] - group[control]"],
          inference: ["method: max-t", "permutations: 99", `seed: ${seed}`],
        }),
      );
      const prepared = prepareAnalysis(design);
      const analysis = await analyzeStrength(prepared, { measure: "nodal", positiveOnly: false, mean: false, sets: [] }, { threads: 1, chunkSize: 99 });
      const { familywise } = analysis.contrasts[0];
      expect(familywise?.exact).toBe(false);
      if (Array.from(familywise!.pFwe).some((p) => p <= ALPHA)) errors++;
      rmSync(dir, { recursive: true, force: true });
    }
    const { low, high } = binomialInterval(COHORTS, ALPHA);
    console.info(`nodal strength FWER under the null: ${errors}/${COHORTS} (99% interval ${low}–${high})`);
    expect(low, "interval from jStat: Binomial(200, 0.05) central 99%").toBeGreaterThanOrEqual(2);
    expect(errors, `${errors} of ${COHORTS} null cohorts had a region with p_fwe ≤ ${ALPHA}; 99% interval ${low}–${high}`).toBeGreaterThanOrEqual(low);
    expect(errors, `${errors} of ${COHORTS} null cohorts had a region with p_fwe ≤ ${ALPHA}; 99% interval ${low}–${high}`).toBeLessThanOrEqual(high);
  }, 120_000);
});
