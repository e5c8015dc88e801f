// Nodal and global strength regressed on the design (src/strength/measureStatistics.ts via
// strengthValues) against an independent computation done here from the raw files of a
// simulated cohort: the matrices read as text and Fisher z-transformed (Math.atanh), nodal
// strength as row sums of the full matrix, global strength as the mean off-diagonal cell; then,
// per measure, ordinary least squares with ml-matrix 6.15.1 (pseudoInverse, the SVD route, with
// inverse(X'X) for the contrast variance — not the QR route plexus takes), the t distribution's
// tails from @stdlib/stats-base-dists-t-cdf 0.2.3 (upper tail as cdf(−t) by symmetry; two-sided
// 2·cdf(−|t|)), partial r = t/√(t² + df) (Rosenthal 1994), and Benjamini–Hochberg q-values from
// @stdlib/stats-padjust 0.2.1.
// Tolerance: relative 1e-9 plus absolute 1e-12 (two different, both stable, least-squares routes;
// common practice, as in test/cli/run.test.ts).
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import tCdf from "@stdlib/stats-base-dists-t-cdf";
import padjust from "@stdlib/stats-padjust";
import { inverse, Matrix, pseudoInverse } from "ml-matrix";
import { afterAll, beforeAll, describe, it } from "vitest";
import { prepareAnalysis, type PreparedAnalysis } from "../../../src/run/prepareAnalysis.js";
import { simulateCohort } from "../../../src/simulate/simulateCohort.js";
import { simulationRandom } from "../../../src/simulate/simulationRandom.js";
import { writeCohort } from "../../../src/simulate/writeCohort.js";
import { measureStatistics } from "../../../src/strength/measureStatistics.js";
import { strengthValues } from "../../../src/strength/strengthAnalysis.js";
import { expectAllClose } from "../../helpers/close.js";

const TOLERANCE = { rel: 1e-9, abs: 1e-12 };
const REGIONS = 9;
let root = "";

beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-strength-stats-"));
  const cohort = simulateCohort(
    { regions: REGIONS, patients: 11, controls: 9, kind: "correlation", effect: { regions: 4, size: 1.5 }, covariates: true },
    simulationRandom(11),
  );
  writeCohort(path.join(root, "cohort"), cohort, { format: "tsv", plantedFile: false });
});
afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

function design(name: string, tail: string, fdr = "bh"): string {
  const file = path.join(root, name);
  writeFileSync(
    file,
    [
      "subjects: cohort/participants.tsv",
      "connectomes: cohort/connectomes/{participant_id}.tsv",
      "regions: cohort/regions.tsv",
      "model: group + age + sex",
      "levels:",
      "  group: [control, patient]",
      "contrasts:",
      "  patient_gt_control: group[patient] - group[control]",
      "  age_down: [0, 0, -1, 0]",
      "transform: fisher-z",
      "inference:",
      "  method: fdr",
      `  tail: ${tail}`,
      `  fdr: ${fdr}`,
      "",
    ].join("\n"),
  );
  return file;
}

// ---- the independent side: raw files → measures → OLS ----

function readRows(file: string): string[][] {
  return readFileSync(file, "utf8")
    .split("\n")
    .filter((line) => line !== "")
    .map((line) => line.split("\t"));
}

/** Participants (header dropped) and their Fisher-z matrices. */
function rawCohort(): { rows: string[][]; matrices: number[][][] } {
  const rows = readRows(path.join(root, "cohort", "participants.tsv")).slice(1);
  const matrices = rows.map((row) =>
    readRows(path.join(root, "cohort", "connectomes", `${row[0]}.tsv`)).map((cells, i) => cells.map((c, j) => (i === j ? 0 : Math.atanh(Number(c))))),
  );
  return { rows, matrices };
}

/** X = [1, patient, age, male] from participants.tsv (participant_id, group, age, sex, …). */
function designRows(rows: string[][]): number[][] {
  return rows.map((r) => [1, r[1] === "patient" ? 1 : 0, Number(r[2]), r[3] === "M" ? 1 : 0]);
}

interface Reference {
  estimate: number[];
  se: number[];
  t: number[];
  p: number[];
  partialR: number[];
  q: number[];
}

function olsReference(x: number[][], measures: number[][], contrast: number[], tail: "upper" | "lower" | "both"): Reference {
  const X = new Matrix(x);
  const pinv = pseudoInverse(X);
  const xtxInv = inverse(X.transpose().mmul(X));
  const c = Matrix.columnVector(contrast);
  const factor = c.transpose().mmul(xtxInv).mmul(c).get(0, 0);
  const df = x.length - x[0].length;
  const out: Reference = { estimate: [], se: [], t: [], p: [], partialR: [], q: [] };
  for (const y of measures) {
    const Y = Matrix.columnVector(y);
    const beta = pinv.mmul(Y);
    const residual = Y.sub(X.mmul(beta));
    const rss = residual.to1DArray().reduce((sum, r) => sum + r * r, 0);
    const estimate = c.transpose().mmul(beta).get(0, 0);
    const se = Math.sqrt((rss / df) * factor);
    const t = estimate / se;
    out.estimate.push(estimate);
    out.se.push(se);
    out.t.push(t);
    out.p.push(tail === "upper" ? tCdf(-t, df) : tail === "lower" ? tCdf(t, df) : 2 * tCdf(-Math.abs(t), df));
    out.partialR.push(t / Math.sqrt(t * t + df));
  }
  out.q = padjust(out.p, "bh");
  return out;
}

function expectMatches(prepared: PreparedAnalysis, measures: number[][], tail: "upper" | "lower" | "both", label: string) {
  const { rows } = rawCohort();
  const x = designRows(rows);
  const S = x.length;
  const values = Float64Array.from(measures.flat());
  const results = measureStatistics(prepared.matrix, prepared.contrasts, values, measures.length, prepared.design.inference);
  const contrasts: Record<string, number[]> = { patient_gt_control: [0, 1, 0, 0], age_down: [0, 0, -1, 0] };
  for (const result of results) {
    const name = result.contrast.name;
    const reference = olsReference(x, measures, contrasts[name], tail);
    const inputs = { design: x.slice(0, 3), subjects: S, contrast: contrasts[name], tail };
    const options = (what: string) => ({ ...TOLERANCE, label: `${label}, ${name}: ${what}`, inputs });
    expectAllClose(result.statistics.estimate, reference.estimate, options("estimate vs ml-matrix OLS"));
    expectAllClose(result.statistics.standardError, reference.se, options("standard error vs ml-matrix OLS"));
    expectAllClose(result.statistics.statistic, reference.t, options("t vs ml-matrix OLS"));
    expectAllClose(result.pUncorrected, reference.p, options("p vs @stdlib t cdf"));
    expectAllClose(result.statistics.partialR, reference.partialR, options("partial r"));
    expectAllClose(result.qFdr, reference.q, options("q vs @stdlib padjust bh"));
  }
}

describe("strength statistics equal an independent least-squares fit", () => {
  it("nodal strength (sum), upper tail", () => {
    const prepared = prepareAnalysis(design("upper.yaml", "upper"));
    const { matrices } = rawCohort();
    const measured = strengthValues(prepared, { measure: "nodal", positiveOnly: false, mean: false, sets: [] });
    const S = matrices.length;
    const independent = Array.from({ length: REGIONS }, (_, i) => matrices.map((m) => m[i].reduce((a, b) => a + b, 0)));
    expectAllClose(measured.values, independent.flat(), { ...TOLERANCE, label: "nodal strength values vs row sums of atanh(r)" });
    const measures = Array.from({ length: REGIONS }, (_, i) => Array.from(measured.values.subarray(i * S, (i + 1) * S)));
    expectMatches(prepared, measures, "upper", "nodal");
  });

  it("nodal strength (positive-only mean), two-sided", () => {
    const prepared = prepareAnalysis(design("both.yaml", "both"));
    const { matrices } = rawCohort();
    const independent = Array.from({ length: REGIONS }, (_, i) =>
      matrices.map((m) => m[i].reduce((a, b) => a + Math.max(b, 0), 0) / (REGIONS - 1)),
    );
    const measured = strengthValues(prepared, { measure: "nodal", positiveOnly: true, mean: true, sets: [] });
    expectAllClose(measured.values, independent.flat(), { ...TOLERANCE, label: "positive-only mean strength vs row means" });
    expectMatches(prepared, independent, "both", "nodal positive-only mean");
  });

  it("global strength, lower tail", () => {
    const prepared = prepareAnalysis(design("lower.yaml", "lower"));
    const { matrices } = rawCohort();
    const independent = [matrices.map((m) => m.flat().reduce((a, b) => a + b, 0) / (REGIONS * (REGIONS - 1)))];
    const measured = strengthValues(prepared, { measure: "global", positiveOnly: false, mean: false, sets: [] });
    expectAllClose(measured.values, independent[0], { ...TOLERANCE, label: "global strength vs mean off-diagonal atanh(r)" });
    expectMatches(prepared, independent, "lower", "global");
  });
});
