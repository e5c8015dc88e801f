// Effect sizes in edges.tsv against R 4.2.2 (test/fixtures/r/effect_sizes.R wrote the cohort in
// test/fixtures/r/effect_cohort/ and every expected value in effect_sizes.json): per edge, the
// contrast's 95% interval (c'b ± qt(0.975, df)·√(c'Vc) from vcov), Cohen's d = c'b / sigma(fit),
// d's interval (uniroot on pt(t, df, ncp) times SE/sigma) and the two levels' means on the
// correlation scale (tanh of the mean of predict() with every participant set to the level).
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runCli } from "../unit/strength/strengthTestFiles.js";
import { expectAllClose } from "../helpers/close.js";
import { loadFixture, toNumbers, type FixtureNumber } from "../helpers/fixtures.js";

interface ContrastFixture {
  vector: number[];
  levels: [string, string] | null;
  df: number;
  estimate: FixtureNumber[];
  t: FixtureNumber[];
  ci_low: FixtureNumber[];
  ci_high: FixtureNumber[];
  cohens_d: FixtureNumber[];
  cohens_d_ci_low: FixtureNumber[];
  cohens_d_ci_high: FixtureNumber[];
  r_first: FixtureNumber[];
  r_second: FixtureNumber[];
}
interface EffectSizesFixture {
  r_version: string;
  contrasts: Record<string, ContrastFixture>;
}

const fixture = loadFixture<EffectSizesFixture>("r/effect_sizes.json");
const cohort = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../fixtures/r/effect_cohort");
let root = "";
let out = "";

beforeAll(async () => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-effects-"));
  const design = path.join(root, "design.yaml");
  writeFileSync(
    design,
    [
      `subjects: ${JSON.stringify(path.join(cohort, "participants.tsv"))}`,
      `connectomes: ${JSON.stringify(path.join(cohort, "connectomes", "{participant_id}.tsv"))}`,
      `regions: ${JSON.stringify(path.join(cohort, "regions.tsv"))}`,
      "model: group + age + site",
      "contrasts:",
      "  patient_gt_control: group[patient] - group[control]",
      "  control_gt_patient: group[control] - group[patient]",
      "  site_b_vs_c: site[b] - site[c]",
      "  age_up: age",
      "transform: fisher-z",
      "inference:",
      "  method: fdr",
      "",
    ].join("\n"),
  );
  out = path.join(root, "results");
  const result = await runCli(["run", design, "--out", out, "--threads", "1", "--quiet"]);
  if (result.code !== 0) throw new Error(result.stderr);
}, 120_000);

afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

function edgeTable(name: string): { header: string[]; column: (n: string) => Float64Array } {
  const lines = readFileSync(path.join(out, name, "edges.tsv"), "utf8").trimEnd().split("\n");
  const header = lines[0].split("\t");
  const rows = lines.slice(1).map((line) => line.split("\t"));
  return {
    header,
    column: (n) => {
      const j = header.indexOf(n);
      if (j < 0) throw new Error(`${name}/edges.tsv has no column ${n}`);
      return Float64Array.from(rows, (row) => (row[j] === "" ? NaN : Number(row[j])));
    },
  };
}

describe(`edges.tsv effect sizes against R (${fixture.r_version})`, () => {
  for (const [name, expected] of Object.entries(fixture.contrasts)) {
    it(`${name}: the estimate's interval${expected.levels ? ", Cohen's d with its interval and the levels' means" : " (no d: not a comparison of two levels)"}`, () => {
      const table = edgeTable(name);
      const tolerance = { rel: 1e-9, abs: 1e-12 };
      expectAllClose(table.column("estimate"), toNumbers(expected.estimate), { ...tolerance, label: `${name} estimate (lm)` });
      expectAllClose(table.column("statistic"), toNumbers(expected.t), { ...tolerance, label: `${name} t (lm)` });
      expectAllClose(table.column("ci_low"), toNumbers(expected.ci_low), { ...tolerance, label: `${name} ci_low (c'b − qt·SE)` });
      expectAllClose(table.column("ci_high"), toNumbers(expected.ci_high), { ...tolerance, label: `${name} ci_high (c'b + qt·SE)` });
      expectAllClose(table.column("cohens_d"), toNumbers(expected.cohens_d), { ...tolerance, label: `${name} cohens_d (c'b / sigma)` });
      // R's pnt is accurate to about 1e-12 absolute, so its uniroot roots are good to about 1e-10.
      expectAllClose(table.column("cohens_d_ci_low"), toNumbers(expected.cohens_d_ci_low), { rel: 1e-8, abs: 1e-9, label: `${name} d interval low (pt, uniroot)` });
      expectAllClose(table.column("cohens_d_ci_high"), toNumbers(expected.cohens_d_ci_high), { rel: 1e-8, abs: 1e-9, label: `${name} d interval high (pt, uniroot)` });
      const effectColumns = ["ci_low", "ci_high", "cohens_d", "cohens_d_ci_low", "cohens_d_ci_high"];
      const start = table.header.indexOf("standard_error") + 1;
      if (expected.levels) {
        const [first, second] = expected.levels;
        expect(table.header.slice(start)).toEqual([...effectColumns, `r_${first}`, `r_${second}`]);
        expectAllClose(table.column(`r_${first}`), toNumbers(expected.r_first), { ...tolerance, label: `${name} r_${first} (tanh of predict)` });
        expectAllClose(table.column(`r_${second}`), toNumbers(expected.r_second), { ...tolerance, label: `${name} r_${second} (tanh of predict)` });
      } else {
        expect(table.header.slice(start)).toEqual(effectColumns);
      }
    });
  }

  it("summary.json records the effect sizes: level, standardiser and, per contrast, the factor and levels compared", () => {
    const summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
    const block = summary.effect_sizes;
    expect(block.confidence_level).toBe(0.95);
    expect(block.cohens_d.standardiser).toMatch(/residual standard deviation of the full model/);
    const byName = new Map(block.contrasts.map((c: { name: string }) => [c.name, c]));
    expect(byName.get("patient_gt_control")).toMatchObject({ cohens_d: { factor: "group", levels: ["patient", "control"] }, level_means: { columns: ["r_patient", "r_control"] } });
    expect(byName.get("site_b_vs_c")).toMatchObject({ cohens_d: { factor: "site", levels: ["b", "c"] } });
    expect(byName.get("age_up")).toMatchObject({ cohens_d: null, level_means: null });
  });

  it("the methods text says how the interval and d were computed; the report's tables name the columns", () => {
    const methods = readFileSync(path.join(out, "methods.md"), "utf8");
    expect(methods).toContain(`the 95% confidence interval of the estimate was the estimate ± the 97.5th percentile of the t distribution with ${fixture.contrasts.age_up.df} degrees of freedom`);
    expect(methods).toContain("Cohen's d (Cohen 1988) was the estimate divided by the residual standard deviation of the full model");
    expect(methods).toContain("Steiger JH, Fouladi RT (1997)");
    const edgesTsv = readFileSync(path.join(out, "tables", "subnetwork_edges.tsv"), "utf8").split("\n")[0].split("\t");
    expect(edgesTsv.slice(-9)).toEqual(["ci_low", "ci_high", "cohens_d", "cohens_d_ci_low", "cohens_d_ci_high", "level_1", "r_level_1", "level_2", "r_level_2"]);
  });
});
