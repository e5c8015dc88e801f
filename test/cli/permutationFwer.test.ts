// The family-wise error rate under the null hypothesis: in cohorts with no group effect, the share
// of cohorts with any component at p_fwe ≤ 0.05 must be about 0.05 — the defining property of
// permutation control of the FWER over a maximum statistic (Nichols & Holmes 2002, Hum. Brain Mapp.
// 15:1; Winkler et al. 2014, NeuroImage 92:381, §3 evaluates it the same way by simulation; the
// Monte Carlo p (1 + b)/(1 + K) of Phipson & Smyth 2010 keeps it at or below alpha).
// Each cohort is invented by the project's simulator (no effect), written to disk, and analysed
// through the library as `plexus run` does (prepareAnalysis → fitAll → observeContrast →
// setupNull → computeNullRange → familywiseInference), with 199 Monte Carlo relabelings.
// Acceptance: the count of rejecting cohorts lies in the central 99 % interval of
// Binomial(n, 0.05), computed with jStat.binomial.cdf (jStat 1.9.6, a general-purpose library).
// Ties in the null distribution (extents are integers) make the test conservative, so the rate may
// sit below 0.05; the interval's lower end still catches a test that never rejects.
// 500 cohorts per condition (the interval is [13, 38] rejections, i.e. 0.026–0.076). Measured:
// extent/group 30/500 (0.060), mass/group + age 23/500 (0.046); about 10 s on 2 cores.
import { writeFileSync } from "node:fs";
import { join } from "node:path";
import jStat from "jstat";
import { afterAll, describe, expect, it } from "vitest";
import { computeNullRange } from "../../src/permute/nullRange.js";
import { fitAll, observeContrast } from "../../src/run/analyzeContrasts.js";
import { familywiseInference, setupNull } from "../../src/run/permutationInference.js";
import { prepareAnalysis } from "../../src/run/prepareAnalysis.js";
import { simulateCohort } from "../../src/simulate/simulateCohort.js";
import { simulationRandom } from "../../src/simulate/simulationRandom.js";
import { writeCohort } from "../../src/simulate/writeCohort.js";
import { scratchFolder } from "../unit/permute/cohortFiles.js";

const COHORTS = 500;
const PERMUTATIONS = 199;
const ALPHA = 0.05;

const scratch = scratchFolder("permutation-fwer");
afterAll(() => scratch.remove());

/** Central 99 % interval [low, high] of Binomial(n, p): P(X < low) ≤ 0.005 and P(X > high) ≤ 0.005 (jStat). */
function binomialInterval(n: number, p: number): { low: number; high: number } {
  let low = 0;
  while (jStat.binomial.cdf(low, n, p) <= 0.005) low++;
  let high = 0;
  while (jStat.binomial.cdf(high, n, p) < 0.995) high++;
  return { low, high };
}

interface Outcome {
  rejected: number;
  withComponents: number;
}

function nullStudy(name: string, covariates: boolean, designBody: string, firstSeed: number): Outcome {
  let rejected = 0;
  let withComponents = 0;
  for (let c = 0; c < COHORTS; c++) {
    const dir = join(scratch.dir, `${name}-${c}`);
    const cohort = simulateCohort(
      { regions: 12, patients: 8, controls: 8, kind: "correlation", effect: null, covariates },
      simulationRandom(firstSeed + c),
    );
    writeCohort(dir, cohort, { format: "tsv", plantedFile: false });
    const designFile = join(dir, "design.yaml");
    writeFileSync(
      designFile,
      `subjects: participants.tsv\nconnectomes: connectomes/{participant_id}.tsv\ntransform: fisher-z\n${designBody}  permutations: ${PERMUTATIONS}\n  seed: ${c + 1}\n  alpha: ${ALPHA}\n`,
    );
    const prepared = prepareAnalysis(designFile);
    const observed = observeContrast(prepared, fitAll(prepared), prepared.contrasts[0]);
    if (observed.components.length > 0) withComponents++;
    const setup = setupNull(prepared, observed);
    expect(setup.context.plan.exact).toBe(false);
    const rows = computeNullRange(setup.context, 1, setup.context.plan.count + 1);
    const fwe = familywiseInference(prepared.design.inference, observed, rows, false);
    if (fwe.componentP.some((r) => r.p <= ALPHA)) rejected++;
  }
  return { rejected, withComponents };
}

describe(`FWER under the null: ${COHORTS} cohorts (12 regions, 8 + 8), ${PERMUTATIONS} relabelings each`, () => {
  const interval = binomialInterval(COHORTS, ALPHA);

  it("the 99 % binomial interval agrees with its normal approximation (np ± 2.576·√(np(1 − p)), within 2)", () => {
    const mean = COHORTS * ALPHA;
    const halfWidth = 2.576 * Math.sqrt(COHORTS * ALPHA * (1 - ALPHA));
    expect(Math.abs(interval.low - (mean - halfWidth))).toBeLessThanOrEqual(2);
    expect(Math.abs(interval.high - (mean + halfWidth))).toBeLessThanOrEqual(2);
  });

  it("extent, model `group` (permutation of group labels)", () => {
    const outcome = nullStudy(
      "extent",
      false,
      `model: group
contrasts:
  patient_gt_control: group[patient] - group[control]
inference:
  method: components
  size: extent
  threshold: 1.8
  tail: both
`,
      1000,
    );
    console.log(`extent, group: ${outcome.rejected}/${COHORTS} cohorts rejected (${outcome.withComponents} had components); 99 % interval [${interval.low}, ${interval.high}]`);
    expect(outcome.rejected).toBeGreaterThanOrEqual(interval.low);
    expect(outcome.rejected).toBeLessThanOrEqual(interval.high);
  });

  it("mass, model `group + age` (Freedman–Lane with a nuisance covariate)", () => {
    const outcome = nullStudy(
      "mass",
      true,
      `model: group + age
contrasts:
  patient_gt_control: group[patient] - group[control]
inference:
  method: components
  size: mass
  threshold: 1.8
  tail: both
`,
      5000,
    );
    console.log(`mass, group + age: ${outcome.rejected}/${COHORTS} cohorts rejected (${outcome.withComponents} had components); 99 % interval [${interval.low}, ${interval.high}]`);
    expect(outcome.rejected).toBeGreaterThanOrEqual(interval.low);
    expect(outcome.rejected).toBeLessThanOrEqual(interval.high);
  });
});
