// subnetwork_values.tsv (src/run/subnetworkValues.ts) end to end on the invented cohort of
// test/fixtures/r/effect_cohort (written by test/fixtures/r/effect_sizes.R), against an independent
// computation here: each participant's mean of atanh(r) over the subnetwork's edges read straight
// from the matrix files, the subnetworks rebuilt from edges.tsv (components.tsv's p_fwe ≤ α, or the
// connected sets of q_fdr ≤ α edges of one sign), and the adjustment by ordinary least squares with
// ml-matrix 6.15.1 (pseudoInverse, the SVD route) with the 95% interval from
// @stdlib/stats-base-dists-t-quantile and inverse(X'X). The R check of the adjustment itself is
// test/unit/model/covariateAdjusted.test.ts.
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { Matrix, inverse, pseudoInverse } from "ml-matrix";
import tQuantile from "@stdlib/stats-base-dists-t-quantile";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { numberColumn, readFisherCohort, readTable, runCli } from "../unit/strength/strengthTestFiles.js";
import { expectAllClose } from "../helpers/close.js";

const cohortDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../fixtures/r/effect_cohort");
const cohort = readFisherCohort(cohortDir);
const REGIONS = cohort.matrices[0].length;
let root = "";

async function run(name: string, inference: string[], contrasts: string[]): Promise<string> {
  const design = path.join(root, `${name}.yaml`);
  writeFileSync(
    design,
    [
      `subjects: ${JSON.stringify(path.join(cohortDir, "participants.tsv"))}`,
      `connectomes: ${JSON.stringify(path.join(cohortDir, "connectomes", "{participant_id}.tsv"))}`,
      `regions: ${JSON.stringify(path.join(cohortDir, "regions.tsv"))}`,
      "model: group + age + site",
      "contrasts:",
      ...contrasts.map((c) => `  ${c}`),
      "transform: fisher-z",
      "inference:",
      ...inference.map((line) => `  ${line}`),
      "",
    ].join("\n"),
  );
  const out = path.join(root, name);
  const result = await runCli(["run", design, "--out", out, "--threads", "1", "--quiet"]);
  if (result.code !== 0) throw new Error(result.stderr);
  return out;
}

let fdr = "";
let components = "";
beforeAll(async () => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-subnetwork-values-"));
  fdr = await run("fdr", ["method: fdr", "alpha: 0.05"], ["patient_gt_control: group[patient] - group[control]", "age_up: age", "both_ways: [[0, 1, 0, 0, 0], [0, 0, 1, 0, 0]]"]);
  components = await run("components", ["method: components", "threshold: 2", "permutations: 200", "seed: 3", "tail: both"], ["patient_gt_control: group[patient] - group[control]"]);
}, 120_000);

afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

/** Edge k of the upper triangle in row-major order (i < j). */
const PAIRS: [number, number][] = [];
for (let i = 0; i < REGIONS; i++) for (let j = i + 1; j < REGIONS; j++) PAIRS.push([i, j]);

/** Connected sets of the marked edges (union–find over regions), largest first, ties by lowest edge. */
function connectedSets(marked: number[]): number[][] {
  const parent = Array.from({ length: REGIONS }, (_, i) => i);
  const find = (a: number): number => (parent[a] === a ? a : (parent[a] = find(parent[a])));
  for (const e of marked) parent[find(PAIRS[e][0])] = find(PAIRS[e][1]);
  const sets = new Map<number, number[]>();
  for (const e of marked) {
    const root = find(PAIRS[e][0]);
    if (!sets.has(root)) sets.set(root, []);
    sets.get(root)!.push(e);
  }
  return [...sets.values()].sort((a, b) => b.length - a.length || a[0] - b[0]);
}

/** The design as R's model.matrix(~ group + age + site) codes it, and which columns are nuisance. */
function design(): number[][] {
  return cohort.rows.map(([, group, age, site]) => [1, group === "patient" ? 1 : 0, Number(age), site === "b" ? 1 : 0, site === "c" ? 1 : 0]);
}

function reference(edges: number[], nuisance: boolean[]) {
  const mean = cohort.matrices.map((m) => edges.reduce((sum, e) => sum + m[PAIRS[e][0]][PAIRS[e][1]], 0) / edges.length);
  const X = new Matrix(design());
  const beta = pseudoInverse(X).mmul(Matrix.columnVector(mean)).to1DArray();
  const residual = mean.map((y, i) => y - X.getRow(i).reduce((sum, x, j) => sum + x * beta[j], 0));
  const df = X.rows - X.columns;
  const sigma = Math.sqrt(residual.reduce((sum, r) => sum + r * r, 0) / df);
  const means = Array.from({ length: X.columns }, (_, j) => X.getColumn(j).reduce((a, b) => a + b, 0) / X.rows);
  const covariance = inverse(X.transpose().mmul(X));
  const q = tQuantile(0.975, df);
  const rows = X.to2DArray().map((row) => row.map((x, j) => (nuisance[j] ? means[j] : x)));
  const fitted = rows.map((row) => row.reduce((sum, x, j) => sum + x * beta[j], 0));
  const half = rows.map((row) => q * sigma * Math.sqrt(new Matrix([row]).mmul(covariance).mmul(Matrix.columnVector(row)).get(0, 0)));
  return { mean, adjusted: fitted.map((f, i) => f + residual[i]), fitted, lower: fitted.map((f, i) => f - half[i]), upper: fitted.map((f, i) => f + half[i]) };
}

function expectValues(folder: string, contrast: string, subnetworks: number[][], nuisance: boolean[]) {
  const table = readTable(path.join(folder, contrast, "subnetwork_values.tsv"));
  expect(table.header).toEqual(["participant_id", "subnetwork", "group", "covariate", "mean_connectivity", "adjusted_connectivity", "fitted_connectivity", "fitted_lower", "fitted_upper"]);
  const ids = numberColumn(table, "subnetwork");
  expect([...new Set(ids)]).toEqual(subnetworks.map((_, k) => k + 1));
  subnetworks.forEach((edges, k) => {
    const rows = table.rows.filter((_, r) => ids[r] === k + 1);
    expect(rows.map((r) => r[0])).toEqual(cohort.rows.map((r) => r[0]));
    const sub = { header: table.header, rows };
    const expected = reference(edges, nuisance);
    const tolerance = { rel: 1e-10, abs: 1e-12 };
    expectAllClose(numberColumn(sub, "mean_connectivity"), expected.mean, { ...tolerance, label: `${contrast} ${k + 1} mean of atanh(r) over ${edges.length} edges` });
    expectAllClose(numberColumn(sub, "adjusted_connectivity"), expected.adjusted, { ...tolerance, label: `${contrast} ${k + 1} adjusted (ml-matrix OLS)` });
    expectAllClose(numberColumn(sub, "fitted_connectivity"), expected.fitted, { ...tolerance, label: `${contrast} ${k + 1} fitted` });
    expectAllClose(numberColumn(sub, "fitted_lower"), expected.lower, { ...tolerance, label: `${contrast} ${k + 1} lower (@stdlib t quantile)` });
    expectAllClose(numberColumn(sub, "fitted_upper"), expected.upper, { ...tolerance, label: `${contrast} ${k + 1} upper (@stdlib t quantile)` });
  });
}

describe("subnetwork_values.tsv", () => {
  it("fdr: the connected sets of the q_fdr ≤ 0.05 edges, group comparison adjusted for age and site", () => {
    const edges = readTable(path.join(fdr, "patient_gt_control", "edges.tsv"));
    const q = numberColumn(edges, "q_fdr");
    const t = numberColumn(edges, "statistic");
    const marked = q.map((v, e) => (v <= 0.05 && t[e] > 0 ? e : -1)).filter((e) => e >= 0);
    expect(marked.length).toBeGreaterThan(0);
    expectValues(fdr, "patient_gt_control", connectedSets(marked), [false, false, true, true, true]);
    const table = readTable(path.join(fdr, "patient_gt_control", "subnetwork_values.tsv"));
    expect(table.rows.map((r) => r[2]).slice(0, cohort.rows.length)).toEqual(cohort.rows.map((r) => r[1]));
    const summary = JSON.parse(readFileSync(path.join(fdr, "summary.json"), "utf8"));
    expect(summary.contrasts[0].subnetwork_values).toMatchObject({ plot: "groups", variable: "group", levels: ["control", "patient"], adjusted_for: ["age", "site"], selection: "fdr components" });
  });

  it("fdr: a covariate's slope keeps the covariate's column; an F contrast writes no values", () => {
    const edges = readTable(path.join(fdr, "age_up", "edges.tsv"));
    const q = numberColumn(edges, "q_fdr");
    const t = numberColumn(edges, "statistic");
    const marked = q.map((v, e) => (v <= 0.05 && t[e] > 0 ? e : -1)).filter((e) => e >= 0);
    if (marked.length > 0) expectValues(fdr, "age_up", connectedSets(marked), [false, true, false, true, true]);
    else expect(existsSync(path.join(fdr, "age_up", "subnetwork_values.tsv"))).toBe(false);
    expect(existsSync(path.join(fdr, "both_ways", "subnetwork_values.tsv"))).toBe(false);
  });

  it("components: the components with p_fwe ≤ 0.05 (the component column of edges.tsv), and their data figures", () => {
    const componentsTable = readTable(path.join(components, "patient_gt_control", "components.tsv"));
    const p = numberColumn(componentsTable, "p_fwe");
    const ids = numberColumn(componentsTable, "component").filter((_, k) => p[k] <= 0.05);
    expect(ids.length).toBeGreaterThan(0);
    const edges = readTable(path.join(components, "patient_gt_control", "edges.tsv"));
    const label = numberColumn(edges, "component");
    const subnetworks = ids.map((id) => label.map((l, e) => (l === id ? e : -1)).filter((e) => e >= 0));
    const table = readTable(path.join(components, "patient_gt_control", "subnetwork_values.tsv"));
    expect([...new Set(numberColumn(table, "subnetwork"))]).toEqual(ids);
    // Numbered as components.tsv numbers them: compare subnetwork by subnetwork.
    ids.forEach((id, k) => {
      const rows = table.rows.filter((r) => Number(r[1]) === id);
      const expected = reference(subnetworks[k], [false, false, true, true, true]);
      expectAllClose(numberColumn({ header: table.header, rows }, "adjusted_connectivity"), expected.adjusted, { rel: 1e-10, abs: 1e-12, label: `component ${id} adjusted` });
      for (const width of ["85mm", "180mm"]) {
        for (const ext of ["svg", "png"]) expect(existsSync(path.join(components, "figures", `patient_gt_control-subnetwork${id}-data-${width}.${ext}`))).toBe(true);
      }
    });
    const html = readFileSync(path.join(components, "report.html"), "utf8");
    expect(html).toContain('data-figure="data"');
    expect(html).toContain("overstates its effect");
    const methods = readFileSync(path.join(components, "methods.md"), "utf8");
    expect(methods).toContain("adjusted for age and site by removing their fitted contribution in the same linear model, centred at their means (partial residuals; Larsen & McCleary 1972)");
    expect(methods).toContain("Larsen WA, McCleary SJ (1972). The use of partial residual plots in regression analysis. Technometrics 14:781–790.");
  });
});
