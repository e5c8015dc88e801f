// `select` and `cohort_table` end to end through the CLI, against R.
//
// The invented cohort in test/fixtures/r/select_cohort/ and the expected values in
// select_cohort_table.json were written by test/fixtures/r/select_cohort_table.R (base R 4.2.2;
// the version is in the JSON):
// - Table 1 of the subset `site: [north, south]` grouped by `group` (cohort_table.by), with a
//   variable outside the model that is missing for some analysed participants (education) and
//   one missing for a whole group (symptom): per-group n, mean and SD (R mean, sd), counts per
//   level (R table), and the tests (R t.test(var.equal = FALSE); chisq.test(correct = FALSE) or
//   fisher.test for a 2 × 2 table with an expected count below 5);
// - within patients (`select: { group: [patient] }`), the edge t and estimate of a symptom score
//   adjusting for age, against R lm() on the patients (a patient without a score dropped by
//   lm's na.omit), and the same again from plexus on a hand-filtered participants table.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { expectAllClose, expectClose } from "../helpers/close.js";
import { readTable, runCli, writeDesignFile } from "../unit/strength/strengthTestFiles.js";

const HERE = path.dirname(fileURLToPath(import.meta.url));
const FIXTURE = path.join(HERE, "..", "fixtures", "r", "select_cohort");
const R = JSON.parse(readFileSync(path.join(HERE, "..", "fixtures", "r", "select_cohort_table.json"), "utf8"));
/** R and plexus compute the same sums in different orders: a few ulps of the values. */
const R_TOLERANCE = { rel: 1e-10, abs: 1e-12 };

let root = "";
beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-select-"));
});
afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

function design(name: string, lines: string[], participants = path.join(FIXTURE, "participants.tsv")): string {
  return writeDesignFile(path.join(root, `${name}.yaml`), [
    `subjects: ${participants}`,
    `connectomes: ${path.join(FIXTURE, "connectomes")}/{participant_id}.tsv`,
    ...lines,
  ]);
}

function summaryOf(out: string) {
  return JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
}

describe("select + cohort_table: Table 1 of a subset against R", () => {
  let out = "";
  beforeAll(async () => {
    const file = design("cohort", [
      "select: { site: [north, south] }",
      "model: group + age",
      "levels: { group: [control, patient] }",
      "contrasts:",
      "  patient_gt_control: group[patient] - group[control]",
      "cohort_table:",
      "  by: group",
      "  variables: [age, sex, symptom, education, site]",
      "inference: { method: fdr }",
    ]);
    out = path.join(root, "cohort-out");
    const result = await runCli(["run", file, "--out", out, "--quiet"]);
    expect(result.stderr).toBe("");
    expect(result.code).toBe(0);
  });

  it("records the selection and the cohort table in summary.json; the others are not selected, not excluded", () => {
    const summary = summaryOf(out);
    expect(summary.subjects.selection).toEqual({ site: ["north", "south"] });
    expect(summary.subjects.not_selected).toBe(R.cohort_subset.not_selected);
    expect(summary.subjects.used).toBe(R.cohort_subset.selected);
    expect(summary.subjects.excluded).toEqual([]);
    expect(summary.warnings).toEqual([]);
    expect(summary.cohort_table).toEqual({ by: "group", by_from: "design", variables: ["age", "sex", "symptom", "education", "site"] });
    const subjects = readTable(path.join(out, "subjects.tsv"));
    const reason = subjects.header.indexOf("exclusion_reason");
    const reasons = subjects.rows.map((row) => row[reason]).filter((r) => r !== "");
    expect(reasons).toHaveLength(R.cohort_subset.not_selected);
    expect(new Set(reasons)).toEqual(new Set(["not selected (site: central)"]));
  });

  it("gives R's per-group n, mean, SD and counts (tables/cohort.tsv)", () => {
    const table = readTable(path.join(out, "tables", "cohort.tsv"));
    const col = (name: string) => table.header.indexOf(name);
    const rows = (variable: string, level = "") => table.rows.filter((r) => r[col("variable")] === variable && r[col("level")] === level);
    const participants = rows("participants");
    expect(participants.map((r) => r[col("group")])).toEqual(R.cohort_subset.groups);
    expect(participants.map((r) => Number(r[col("n")]))).toEqual(R.cohort_subset.group_n);
    for (const variable of R.cohort) {
      if (variable.kind === "numeric") {
        const found = rows(variable.variable);
        expect(found.map((r) => r[col("group")])).toEqual(R.cohort_subset.groups);
        variable.groups.forEach((g: { n: number; mean: number | null; sd: number | null }, k: number) => {
          expect(Number(found[k][col("n")]), `${variable.variable} n`).toBe(g.n);
          const mean = found[k][col("mean")] === "" ? null : Number(found[k][col("mean")]);
          const sd = found[k][col("sd")] === "" ? null : Number(found[k][col("sd")]);
          if (g.mean === null) expect(mean).toBeNull();
          else expectClose(mean!, g.mean, { ...R_TOLERANCE, label: `${variable.variable} mean, R mean()` });
          if (g.sd === null) expect(sd).toBeNull();
          else expectClose(sd!, g.sd, { ...R_TOLERANCE, label: `${variable.variable} SD, R sd()` });
        });
      } else {
        variable.levels.forEach((level: string, i: number) => {
          const found = rows(variable.variable, level);
          expect(found.map((r) => Number(r[col("count")])), `${variable.variable} ${level} counts, R table()`).toEqual(variable.counts[i]);
        });
      }
    }
  });

  it("gives R's tests (tables/cohort_tests.tsv), and none where a group has no value", () => {
    const table = readTable(path.join(out, "tables", "cohort_tests.tsv"));
    const col = (name: string) => table.header.indexOf(name);
    for (const variable of R.cohort) {
      const row = table.rows.find((r) => r[col("variable")] === variable.variable)!;
      expect(row, variable.variable).toBeDefined();
      if (variable.test === null) {
        expect(row[col("p_value")], `${variable.variable}: not testable`).toBe("");
        continue;
      }
      expect(row[col("test")]).toBe(variable.test.test);
      expectClose(Number(row[col("p_value")]), variable.test.p_value, { ...R_TOLERANCE, label: `${variable.variable} p, R ${variable.test.test}` });
      if (variable.test.statistic !== undefined) {
        expectClose(Number(row[col("statistic")]), variable.test.statistic, { ...R_TOLERANCE, label: `${variable.variable} statistic, R` });
        expectClose(Number(row[col("df")]), variable.test.df, { ...R_TOLERANCE, label: `${variable.variable} df, R` });
      }
    }
  });

  it("says which subset was analysed in the methods and the tables, and counts no one as excluded", () => {
    const methods = readFileSync(path.join(out, "methods.md"), "utf8");
    expect(methods).toContain("Analyses were restricted to participants with site = north or south (n = 19 of the 26 listed).");
    expect(methods).not.toMatch(/(were|was) excluded/);
    const tables = readFileSync(path.join(out, "tables.md"), "utf8");
    expect(tables).toContain("Participant characteristics by group");
    expect(tables).toContain("Analysed subset: site = north or south (19 of the 26 participants listed).");
    expect(tables).not.toContain("Excluded from the analysis");
    const report = readFileSync(path.join(out, "report.html"), "utf8");
    expect(report).toContain("Subset (select)");
    expect(report).not.toMatch(/(were|was) excluded from the analysis/);
  });
});

describe("select: a symptom score within patients", () => {
  let out = "";
  const lines = ["model: symptom + age", "contrasts:", "  symptom_up: symptom", "inference: { method: fdr, tail: both }"];
  beforeAll(async () => {
    out = path.join(root, "symptom-out");
    const result = await runCli(["run", design("symptom", ["select: { group: [patient] }", ...lines]), "--out", out, "--quiet"]);
    expect(result.code).toBe(0);
  });

  it("gives R lm's t and estimate of the score at every edge, on the patients only", () => {
    const edges = readTable(path.join(out, "symptom_up", "edges.tsv"));
    const column = (name: string) => edges.rows.map((r) => Number(r[edges.header.indexOf(name)]));
    expectAllClose(column("statistic"), R.symptom.t, { rel: 1e-9, abs: 1e-12, label: "edge t of symptom, R lm(edge ~ symptom + age) on patients" });
    expectAllClose(column("estimate"), R.symptom.estimate, { rel: 1e-9, abs: 1e-12, label: "edge estimate of symptom, R lm" });
    const summary = summaryOf(out);
    expect(summary.df).toBe(R.symptom.df);
  });

  it("reports the missing score inside the subset as today, and the controls only as not selected", () => {
    const summary = summaryOf(out);
    expect(summary.subjects.used).toBe(R.symptom.used);
    expect(summary.subjects.not_selected).toBe(R.symptom.not_selected);
    expect(summary.subjects.excluded).toEqual([{ participant_id: "sub-05", line: 6, reason: "missing symptom" }]);
    expect(summary.warnings).toEqual(["1 participant left out for missing values: sub-05 (missing symptom)"]);
    // No contrast compares a factor: Table 1 describes every analysed participant in one column.
    expect(summary.cohort_table).toEqual({ by: null, by_from: "none", variables: ["symptom", "age"] });
    const methods = readFileSync(path.join(out, "methods.md"), "utf8");
    expect(methods).toContain("(n = 13 of the 26 listed). Connectivity matrices of 12 participants were analysed (1 of the 13 selected participants was excluded: missing symptom)");
    const tables = readFileSync(path.join(out, "tables.md"), "utf8");
    expect(tables).toContain("Excluded from the analysis: 1 of 13 selected participants (missing symptom: 1).");
    expect(tables).toContain("All (n = 12)");
  });

  it("equals the same model run on a participants table filtered by hand", async () => {
    const text = readFileSync(path.join(FIXTURE, "participants.tsv"), "utf8").split("\n");
    const filtered = path.join(root, "patients.tsv");
    writeFileSync(filtered, [text[0], ...text.slice(1).filter((line) => line.split("\t")[1] === "patient")].join("\n") + "\n");
    const handOut = path.join(root, "hand-out");
    const result = await runCli(["run", design("hand", lines, filtered), "--out", handOut, "--quiet"]);
    expect(result.code).toBe(0);
    expect(readFileSync(path.join(handOut, "symptom_up", "edges.tsv"), "utf8")).toBe(readFileSync(path.join(out, "symptom_up", "edges.tsv"), "utf8"));
  });

  it("plexus check prints the select and Table 1 lines", async () => {
    const result = await runCli(["check", design("check", ["select: { group: [patient] }", ...lines])]);
    expect(result.code).toBe(0);
    expect(result.stdout).toContain("select      group = patient: 13 of 26 selected, 13 not selected (not analysed by design)");
    expect(result.stdout).toContain("table 1     by none (all analysed participants) (no factor compared); variables symptom, age");
  });
});

describe("select and cohort_table: user mistakes are errors naming the key (exit 2)", () => {
  const base = ["contrasts:", "  patient_gt_control: group[patient] - group[control]", "inference: { method: fdr }"];
  const cases: [string, string[], RegExp][] = [
    ["an unknown column, with the nearest name", ["select: { gruop: [patient] }", "model: group + age", ...base], /select\.gruop.*not a column[\s\S]*did you mean 'group'/],
    ["a value no row has, with the nearest value", ["select: { group: [patinet] }", "model: age", "contrasts: { a: age }", "inference: { method: fdr }"], /select\.group.*'patinet'[\s\S]*did you mean 'patient'/],
    ["a number that is not the cells' text", ["select: { age: [66.0] }", "model: symptom", "contrasts: { a: symptom }", "inference: { method: fdr }"], /select\.age.*'66\.0'/],
    ["no participant left", ["select: { group: [patient], site: [central] }", "model: age", "contrasts: { a: age }", "inference: { method: fdr }"], /'select' keeps no participant/],
    ["a selected factor with one level left in the model", ["select: { group: [patient] }", "model: group + age", ...base], /select\.group.*one value among the analysed participants/],
    ["levels that select leaves out", ["select: { group: [patient] }", "model: group + age", "levels: { group: [control, patient] }", ...base], /select\.group.*'levels' of 'group' list 'control'/],
    ["an empty list", ["select: { group: [] }", "model: age", "contrasts: { a: age }"], /select\.group/],
    ["cohort_table.by not a column", ["model: group + age", "cohort_table: { by: grup }", ...base], /cohort_table\.by[\s\S]*did you mean 'group'/],
    ["cohort_table.variables not a column", ["model: group + age", "cohort_table: { variables: [age, educaton] }", ...base], /cohort_table\.variables[\s\S]*did you mean 'education'/],
    ["an unknown cohort_table key", ["model: group + age", "cohort_table: { group: group }", ...base], /unknown key 'cohort_table\.group'/],
  ];
  for (const [name, lines, message] of cases) {
    it(name, async () => {
      const result = await runCli(["check", design(`bad-${name.replace(/\W+/g, "-")}`, lines)]);
      expect(result.code).toBe(2);
      expect(result.stderr).toMatch(message);
      expect(result.stderr).not.toMatch(/\n\s+at /);
    });
  }
});

describe("cohort_table defaults and limits", () => {
  it("groups by the factor a t contrast compares, even after a contrast of a slope; never by another factor", async () => {
    const file = design("default-by", [
      "model: age + site + group",
      "contrasts:",
      "  age_up: age",
      "  patient_gt_control: group[patient] - group[control]",
      "inference: { method: fdr }",
    ]);
    const result = await runCli(["check", file]);
    expect(result.code).toBe(0);
    expect(result.stdout).toContain("table 1     by group (the factor compared by the first contrast between its levels); variables age, site");
    const slopeOnly = design("slope-only", ["model: age + site + group", "contrasts: { age_up: age }", "inference: { method: fdr }"]);
    expect((await runCli(["check", slopeOnly])).stdout).toContain("table 1     by none (all analysed participants) (no factor compared); variables age, site, group");
  });

  it("refuses a grouping column with more than 20 values among the analysed participants", async () => {
    const demo = path.join(HERE, "..", "..", "demo-cohort");
    const file = writeDesignFile(path.join(root, "by-age.yaml"), [
      `subjects: ${demo}/participants.tsv`,
      `connectomes: ${demo}/connectomes/{participant_id}.tsv`,
      "model: group + age",
      "contrasts:",
      "  patient_gt_control: group[patient] - group[control]",
      "cohort_table: { by: age }",
      "inference: { method: fdr }",
    ]);
    const result = await runCli(["check", file]);
    expect(result.code).toBe(2);
    expect(result.stderr).toMatch(/cohort_table\.by[\s\S]*at most 20 groups/);
  });
});
