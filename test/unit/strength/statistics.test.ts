// Nodal and global strength regressed on the design (src/strength/measureStatistics.ts via
// strengthValues) against an independent computation done here from the raw files of a
// simulated cohort: the matrices read as text and Fisher z-transformed (Math.atanh), nodal
// strength as row sums of the full matrix, global strength as the mean off-diagonal cell; then,
// per measure, ordinary least squares with ml-matrix 6.15.1 (pseudoInverse, the SVD route — not
// the QR route plexus takes) and the t tails from @stdlib/stats-base-dists-t-cdf 0.2.3
// (olsReference in strengthTestFiles.ts), and Benjamini–Hochberg q-values from
// @stdlib/stats-padjust 0.2.1.
// Tolerance: relative 1e-9 plus absolute 1e-12 (two different, both stable, least-squares routes;
// common practice, as in test/cli/run.test.ts).
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import padjust from "@stdlib/stats-padjust";
import { afterAll, beforeAll, describe, it } from "vitest";
import { prepareAnalysis } from "../../../src/run/prepareAnalysis.js";
import { measureStatistics } from "../../../src/strength/measureStatistics.js";
import { strengthValues, type StrengthChoice } from "../../../src/strength/strengthAnalysis.js";
import { expectAllClose } from "../../helpers/close.js";
import { clinicDesign, groupDesignLines, olsReference, readFisherCohort, rowSums, writeDesignFile, writeSimulatedCohort } from "./strengthTestFiles.js";

const TOLERANCE = { rel: 1e-9, abs: 1e-12 };
const REGIONS = 9;
const CONTRASTS: Record<string, number[]> = { patient_gt_control: [0, 1, 0, 0], age_down: [0, 0, -1, 0] };
let root = "";

beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-strength-stats-"));
  writeSimulatedCohort(
    path.join(root, "cohort"),
    { regions: REGIONS, patients: 11, controls: 9, kind: "correlation", effect: { regions: 4, size: 1.5 }, covariates: true },
    11,
  );
});
afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

function design(tail: "upper" | "lower" | "both"): string {
  return writeDesignFile(
    path.join(root, `${tail}.yaml`),
    groupDesignLines({
      cohort: "cohort",
      regions: true,
      model: "group + age + sex",
      contrasts: ["patient_gt_control: group[patient] - group[control]", "age_down: [0, 0, -1, 0]"],
      inference: ["method: fdr", `tail: ${tail}`],
    }),
  );
}

/** Computes the measures with plexus, checks them against `expected`, then every statistic against OLS. */
function check(choice: StrengthChoice, tail: "upper" | "lower" | "both", expected: number[][], label: string) {
  const prepared = prepareAnalysis(design(tail));
  const measured = strengthValues(prepared, choice);
  expectAllClose(measured.values, expected.flat(), { ...TOLERANCE, label: `${label}: values vs the full matrices` });
  const { rows } = readFisherCohort(path.join(root, "cohort"));
  const x = clinicDesign(rows);
  const results = measureStatistics(prepared.matrix, prepared.contrasts, measured.values, expected.length, prepared.design.inference);
  for (const result of results) {
    const name = result.contrast.name;
    const reference = olsReference(x, expected, CONTRASTS[name], tail);
    const inputs = { firstDesignRows: x.slice(0, 3), subjects: x.length, contrast: CONTRASTS[name], tail };
    const options = (what: string) => ({ ...TOLERANCE, label: `${label}, ${name}: ${what}`, inputs });
    expectAllClose(result.statistics.estimate, reference.estimate, options("estimate vs ml-matrix OLS"));
    expectAllClose(result.statistics.standardError, reference.se, options("standard error vs ml-matrix OLS"));
    expectAllClose(result.statistics.statistic, reference.t, options("t vs ml-matrix OLS"));
    expectAllClose(result.pUncorrected, reference.p, options("p vs @stdlib t cdf"));
    expectAllClose(result.statistics.partialR, reference.partialR, options("partial r"));
    expectAllClose(result.qFdr, padjust(reference.p, "bh"), options("q vs @stdlib padjust bh"));
  }
}

describe("strength statistics equal an independent least-squares fit", () => {
  it("nodal strength (sum), upper tail", () => {
    const { matrices } = readFisherCohort(path.join(root, "cohort"));
    check({ measure: "nodal", positiveOnly: false, mean: false, sets: [] }, "upper", rowSums(matrices), "nodal");
  });

  it("nodal strength (positive-only mean), two-sided", () => {
    const { matrices } = readFisherCohort(path.join(root, "cohort"));
    const expected = rowSums(matrices, (w) => Math.max(w, 0)).map((region) => region.map((v) => v / (REGIONS - 1)));
    check({ measure: "nodal", positiveOnly: true, mean: true, sets: [] }, "both", expected, "nodal positive-only mean");
  });

  it("global strength, lower tail", () => {
    const { matrices } = readFisherCohort(path.join(root, "cohort"));
    const expected = [matrices.map((m) => m.flat().reduce((a, b) => a + b, 0) / (REGIONS * (REGIONS - 1)))];
    check({ measure: "global", positiveOnly: false, mean: false, sets: [] }, "lower", expected, "global");
  });
});
