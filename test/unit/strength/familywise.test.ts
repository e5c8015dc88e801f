// Family-wise p-values of nodal strength (src/strength/measureFamilywise.ts through
// analyzeStrength) against the definition of the single-step maximum statistic (Westfall &
// Young 1993, Resampling-Based Multiple Testing, Wiley, §2.6) computed here by brute force on a
// simulated 4 + 4 cohort with `model: group`: every one of the C(8,4) = 70 assignments of the
// group labels is refitted by ordinary least squares with ml-matrix 6.15.1 (the intercept is the
// only nuisance, so Freedman–Lane relabeling is relabeling the rows; Winkler et al. 2014,
// NeuroImage 92:381, Table 2), the largest statistic over the regions is recorded (t for the
// upper tail, |t| two-sided), and p_fwe of a region is the share of the 70 assignments whose
// maximum reaches its observed statistic (exact enumeration includes the identity).
// Tolerance: p-values are multiples of 1/70, compared within 1e-12 (absolute).
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { Matrix, pseudoInverse } from "ml-matrix";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { prepareAnalysis } from "../../../src/run/prepareAnalysis.js";
import { analyzeStrength } from "../../../src/strength/strengthAnalysis.js";
import { expectAllClose } from "../../helpers/close.js";
import { groupDesignLines, readFisherCohort, rowSums, writeDesignFile, writeSimulatedCohort } from "./strengthTestFiles.js";

const REGIONS = 7;
let root = "";

beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-strength-fwe-"));
  writeSimulatedCohort(
    path.join(root, "cohort"),
    { regions: REGIONS, patients: 4, controls: 4, kind: "correlation", effect: { regions: 3, size: 2 }, covariates: false },
    21,
  );
});
afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

function design(name: string, tail: string, permutations: number): string {
  return writeDesignFile(
    path.join(root, name),
    groupDesignLines({
      cohort: "cohort",
      model: "group",
      contrasts: ["patient_gt_control: group[patient] - group[control]"],
      inference: ["method: max-t", `tail: ${tail}`, `permutations: ${permutations}`, "seed: 4"],
    }),
  );
}

/** Nodal strength per region and subject from the raw files: strength[i][s]. */
function rawStrength(): { patient: number[]; strength: number[][] } {
  const { rows, matrices } = readFisherCohort(path.join(root, "cohort"));
  return { patient: rows.map((r) => (r[1] === "patient" ? 1 : 0)), strength: rowSums(matrices) };
}

/** t of the group coefficient of y on [1, g], by least squares with ml-matrix. */
function groupT(g: number[], y: number[]): number {
  const X = new Matrix(g.map((v) => [1, v]));
  const Y = Matrix.columnVector(y);
  const beta = pseudoInverse(X).mmul(Y);
  const rss = Y.sub(X.mmul(beta)).to1DArray().reduce((s, r) => s + r * r, 0);
  const n1 = g.reduce((a, b) => a + b, 0);
  const n0 = g.length - n1;
  const se = Math.sqrt((rss / (g.length - 2)) * (1 / n0 + 1 / n1));
  return beta.get(1, 0) / se;
}

function bruteForceFamilywise(tail: "upper" | "both"): { observed: number[]; p: number[]; count: number } {
  const { patient, strength } = rawStrength();
  const scale = (t: number) => (tail === "both" ? Math.abs(t) : t);
  const observed = strength.map((y) => groupT(patient, y));
  const maxima: number[] = [];
  for (let mask = 0; mask < 256; mask++) {
    const g = Array.from({ length: 8 }, (_, s) => (mask >> s) & 1);
    if (g.reduce((a, b) => a + b, 0) !== 4) continue;
    maxima.push(Math.max(...strength.map((y) => scale(groupT(g, y)))));
  }
  // Ties count (≥). With two groups of 4, the complementary assignment gives exactly −t at every
  // region, so two-sided its maximum equals the observed one in exact arithmetic; a relative
  // 1e-9 keeps such exact ties from being lost to rounding on this side.
  const p = observed.map((t) => maxima.filter((m) => m >= scale(t) - 1e-9 * Math.abs(scale(t))).length / maxima.length);
  return { observed, p, count: maxima.length };
}

describe("nodal strength p_fwe by the maximum statistic", () => {
  for (const tail of ["upper", "both"] as const) {
    it(`equals a brute-force enumeration of all 70 group assignments (${tail} tail)`, async () => {
      const prepared = prepareAnalysis(design(`exact-${tail}.yaml`, tail, 1000));
      const analysis = await analyzeStrength(prepared, { measure: "nodal", positiveOnly: false, mean: false, sets: [] }, { threads: 1, chunkSize: 16 });
      const [result] = analysis.contrasts;
      const reference = bruteForceFamilywise(tail);
      expect(reference.count).toBe(70);
      expect(result.familywise?.exact).toBe(true);
      expect(result.familywise?.count).toBe(70);
      expectAllClose(result.statistics.statistic, reference.observed, { rel: 1e-9, abs: 1e-12, label: `observed t (${tail})` });
      expectAllClose(result.familywise!.pFwe, reference.p, { abs: 1e-12, label: `p_fwe (${tail}) vs brute force`, inputs: reference });
      // The maximum statistic's p_fwe is never below the region's own permutation p-value share, and the smallest is 1/70.
      expect(Math.min(...result.familywise!.pFwe)).toBeGreaterThanOrEqual(1 / 70 - 1e-12);
    });
  }

  it("gives identical p_fwe with 1 and 2 worker threads (Monte Carlo)", async () => {
    // 70 distinct relabelings: asking for 50 gives Monte Carlo.
    const monteCarlo = prepareAnalysis(design("threads-mc.yaml", "upper", 50));
    const choice = { measure: "nodal" as const, positiveOnly: false, mean: false, sets: [] };
    const one = await analyzeStrength(monteCarlo, choice, { threads: 1, chunkSize: 7 });
    const two = await analyzeStrength(monteCarlo, choice, { threads: 2, chunkSize: 7 });
    expect(one.contrasts[0].familywise?.exact).toBe(false);
    expect(Array.from(two.contrasts[0].familywise!.pFwe)).toEqual(Array.from(one.contrasts[0].familywise!.pFwe));
  });

  it("leaves the connectome data unchanged", async () => {
    const prepared = prepareAnalysis(design("unchanged.yaml", "upper", 1000));
    const before = Float64Array.from(prepared.connectomes.data);
    await analyzeStrength(prepared, { measure: "nodal", positiveOnly: false, mean: false, sets: [] }, { threads: 1, chunkSize: 16 });
    expect(prepared.connectomes.data).toEqual(before);
  });
});
