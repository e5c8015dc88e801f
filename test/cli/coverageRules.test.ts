// The coverage rules (edges: missing / present_in, transform: log1p, scale: total) checked
// against numpy 1.24.2 and statsmodels 0.13.5 (test/fixtures/coverage/make_coverage_reference.py,
// which wrote the invented cohort in test/fixtures/coverage/cohort/ and reference.json):
// which edges are kept and why the others are not, the log1p-then-scaled values the model sees,
// OLS t / estimate / SE / p at the kept edges (statsmodels OLS), BH q-values over the kept edges
// only (statsmodels multipletests fdr_bh), and the components of the kept supra-threshold edges
// (a union-find in the script). Also the errors a user can cause with these keys.
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { prepareAnalysis } from "../../src/run/prepareAnalysis.js";
import { isInputError } from "../../src/errors.js";
import { expectClose } from "../helpers/close.js";
import { numberColumn, readTable, runCli, writeDesignFile } from "../unit/strength/strengthTestFiles.js";

const FIXTURES = path.resolve(__dirname, "../fixtures/coverage");
const COHORT = path.join(FIXTURES, "cohort");

interface Reference {
  versions: Record<string, string>;
  regions: string[];
  edges: [string, string][];
  reasons: string[];
  kept: number[];
  totals: number[];
  scaled: number[][];
  t: number[];
  estimate: number[];
  standard_error: number[];
  p_upper: number[];
  q_fdr_bh: number[];
  components: [string, string][][];
}
const reference = JSON.parse(readFileSync(path.join(FIXTURES, "reference.json"), "utf8")) as Reference;

let root = "";
const designLines = (extra: string[]): string[] => [
  `subjects: ${path.join(COHORT, "participants.tsv")}`,
  `connectomes: ${path.join(COHORT, "{participant_id}.tsv")}`,
  `regions: ${path.join(COHORT, "regions.tsv")}`,
  "model: group + age",
  "levels:",
  "  group: [control, patient]",
  "contrasts:",
  "  patient_gt_control: group[patient] - group[control]",
  ...extra,
];
const COVERAGE = ["transform: log1p", "scale: total", "edges:", "  missing: drop", "  present_in: 0.75"];
const INFERENCE = ["inference:", "  method: components", "  threshold: 2.0", "  tail: upper", "  permutations: 199", "  seed: 3"];

beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-coverage-"));
});
afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

describe("coverage rules against numpy and statsmodels", () => {
  it("keeps the edges the reference keeps, and the model sees log(1 + x) scaled to each participant's total of kept edges", () => {
    const design = writeDesignFile(path.join(root, "prepare.yaml"), [...designLines(COVERAGE), ...INFERENCE]);
    const prepared = prepareAnalysis(design);
    const rules = prepared.edgeRules!;
    expect([...rules.kept]).toEqual(reference.kept);
    expect(rules.reasons).toEqual(reference.reasons);
    // The analysed pairs carry the kept edges' real regions (1-based labels R1..R7 here).
    expect(Array.from(prepared.pairs.regionA, (a, k) => [`R${a + 1}`, `R${prepared.pairs.regionB[k] + 1}`])).toEqual(
      reference.kept.map((e) => reference.edges[e]),
    );
    const S = prepared.connectomes.subjectCount;
    expect(prepared.connectomes.edgeCount).toBe(reference.kept.length);
    reference.scaled.forEach((row, s) =>
      row.forEach((expected, k) =>
        expectClose(prepared.connectomes.data[k * S + s], expected, { rel: 1e-12, label: `scaled log1p value, participant ${s + 1}, kept edge ${k} (numpy)` }),
      ),
    );
    expect(rules.regionsWithoutEdges.map((r) => `R${r + 1}`)).toEqual(["R7"]);
  });

  it("edges.tsv: OLS t, estimate, SE and p at the kept edges (statsmodels), q over the kept edges only (fdr_bh), dropped edges empty with their reason last", async () => {
    const design = writeDesignFile(path.join(root, "run.yaml"), [...designLines(COVERAGE), ...INFERENCE]);
    const out = path.join(root, "results");
    const result = await runCli(["run", design, "--out", out, "--threads", "1", "--quiet"]);
    expect(result.code, result.stderr).toBe(0);
    const table = readTable(path.join(out, "patient_gt_control", "edges.tsv"));
    expect(table.header[table.header.length - 1]).toBe("reason");
    expect(table.rows.map((r) => [r[0], r[1]])).toEqual(reference.edges);
    expect(table.rows.map((r) => r[r.length - 1])).toEqual(reference.reasons);
    const statistic = numberColumn(table, "statistic");
    const estimate = numberColumn(table, "estimate");
    const se = numberColumn(table, "standard_error");
    const p = numberColumn(table, "p_unc");
    const q = numberColumn(table, "q_fdr");
    const component = table.rows.map((r) => r[table.header.indexOf("component")]);
    reference.kept.forEach((e, k) => {
      expectClose(statistic[e], reference.t[k], { rel: 1e-9, label: `t at ${reference.edges[e].join("–")} (statsmodels OLS)` });
      expectClose(estimate[e], reference.estimate[k], { rel: 1e-9, label: `estimate at ${reference.edges[e].join("–")} (statsmodels OLS)` });
      expectClose(se[e], reference.standard_error[k], { rel: 1e-9, label: `SE at ${reference.edges[e].join("–")} (statsmodels OLS)` });
      expectClose(p[e], reference.p_upper[k], { rel: 1e-8, abs: 1e-15, label: `upper-tail p at ${reference.edges[e].join("–")} (statsmodels OLS)` });
      expectClose(q[e], reference.q_fdr_bh[k], { rel: 1e-8, abs: 1e-15, label: `BH q over the kept edges at ${reference.edges[e].join("–")} (statsmodels fdr_bh)` });
    });
    reference.reasons.forEach((reason, e) => {
      if (reason === "") return;
      expect([statistic[e], estimate[e], p[e], q[e], se[e]].every(Number.isNaN), `dropped edge ${reference.edges[e].join("–")}`).toBe(true);
      expect(component[e], `a dropped edge is never in a component`).toBe("");
    });
    // Components: the kept edges with t > 2 (the script's union-find); the strongest edge of the data,
    // R1–R2 (patients only, present in 50%), is dropped and in no component.
    const byLabel = new Map<string, [string, string][]>();
    table.rows.forEach((r, e) => {
      if (component[e] !== "") byLabel.set(component[e], [...(byLabel.get(component[e]) ?? []), [r[0], r[1]]]);
    });
    expect([...byLabel.values()]).toEqual(reference.components);
    expect(reference.reasons[0]).toMatch(/^present in 50% < 75%$/);

    const summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
    const dropped = (pattern: RegExp) => reference.reasons.filter((r) => pattern.test(r)).length;
    expect(summary.edge_rules).toEqual({
      missing: "drop",
      present_in: 0.75,
      edges: reference.edges.length,
      kept: reference.kept.length,
      dropped: reference.edges.length - reference.kept.length,
      dropped_missing: dropped(/^missing/),
      dropped_present_in: dropped(/^present/),
      regions_without_edges: ["R7"],
    });
    expect(summary.options.scale).toBe("total");
    expect(summary.options.transform).toBe("log1p");
    expect(summary.contrasts[0].significant_edges_fdr).toBe(reference.q_fdr_bh.filter((v) => v <= 0.05).length);
    const methods = readFileSync(path.join(out, "methods.md"), "utf8");
    expect(methods).toContain(`the remaining ${reference.kept.length} of ${reference.edges.length} edges`);
    expect(methods).toContain("log(1 + x)");
    expect(methods).toContain("divided by their sum over the kept edges");
    expect(methods).toContain("de Reus MA, van den Heuvel MP (2013)");
    expect(readFileSync(path.join(out, "tables.md"), "utf8")).toContain(`Edges analysed: ${reference.kept.length} of ${reference.edges.length}`);
    const report = readFileSync(path.join(out, "report.html"), "utf8");
    expect(report).toContain(`${reference.kept.length} of ${reference.edges.length} edges analysed`);

    const check = await runCli(["check", design]);
    expect(check.code, check.stderr).toBe(0);
    expect(check.stdout).toMatch(new RegExp(`edges +log\\(1 \\+ x\\) at reading; ${reference.kept.length} of ${reference.edges.length} kept`));
  });
});

describe("the worked designs on demo-cohort/coverage", () => {
  const ROOT = path.resolve(__dirname, "../..");
  it("coverage-gaps.yaml leaves out the 19 edges of V-vale-04 and one more pair (the cohort was made so)", () => {
    const prepared = prepareAnalysis(path.join(ROOT, "designs", "coverage-gaps.yaml"));
    const rules = prepared.edgeRules!;
    expect(rules.dropped).toEqual({ missing: 20, rare: 0 });
    expect(rules.regionsWithoutEdges.map((r) => prepared.regions[r].label)).toEqual(["V-vale-04"]);
    expect(rules.reasons.filter((r) => r === "missing in 3 participants")).toHaveLength(19);
    expect(rules.reasons.filter((r) => r === "missing in 1 participant")).toHaveLength(1);
  });

  it("streamline-counts.yaml reads log1p counts, keeps the edges present in 75%, and scales each participant's kept edges to sum 1", () => {
    const prepared = prepareAnalysis(path.join(ROOT, "designs", "streamline-counts.yaml"));
    const rules = prepared.edgeRules!;
    expect(rules.dropped.missing).toBe(0);
    expect(rules.dropped.rare).toBeGreaterThan(0);
    const { data, subjectCount: S, edgeCount: E } = prepared.connectomes;
    for (let s = 0; s < S; s++) {
      let sum = 0;
      for (let e = 0; e < E; e++) sum += data[e * S + s];
      expectClose(sum, 1, { rel: 1e-12, label: `participant ${s + 1}: scaled kept edges sum to 1` });
    }
  });
});

describe("coverage rules: the strength measures see the kept edges only", () => {
  it("plexus extract's mean over a listed edge set uses its kept edges, on the scaled log1p values (numpy)", async () => {
    const design = writeDesignFile(path.join(root, "extract.yaml"), designLines(COVERAGE));
    const pairsFile = path.join(root, "pairs.tsv");
    // Two kept edges and R1–R2, which the prevalence rule drops.
    writeFileSync(pairsFile, "region_a\tregion_b\nR3\tR4\nR3\tR6\nR1\tR2\n");
    const out = path.join(root, "extract.tsv");
    const result = await runCli(["extract", design, "--pairs", pairsFile, "--out", out, "--quiet"]);
    expect(result.code, result.stderr).toBe(0);
    const table = readTable(out);
    const values = numberColumn(table, "pairs_pairs");
    const keptIndex = (a: string, b: string) => reference.kept.findIndex((e) => reference.edges[e][0] === a && reference.edges[e][1] === b);
    const [k34, k36] = [keptIndex("R3", "R4"), keptIndex("R3", "R6")];
    expect(k34 >= 0 && k36 >= 0).toBe(true);
    reference.scaled.forEach((row, s) =>
      expectClose(values[s], (row[k34] + row[k36]) / 2, { rel: 1e-12, label: `participant ${s + 1}: mean of the kept listed edges (numpy values)` }),
    );
  });
});

describe("coverage rules: user mistakes are InputErrors naming the key or the file", () => {
  const prepareError = (name: string, lines: string[]) => {
    const design = writeDesignFile(path.join(root, `${name}.yaml`), lines);
    try {
      prepareAnalysis(design);
    } catch (error) {
      if (isInputError(error)) return error;
      throw error;
    }
    throw new Error("expected an InputError");
  };

  it("without edges: a nan cell stops the run, with the hint to drop missing edges given once", () => {
    const error = prepareError("no-rules", designLines(["transform: log1p"]));
    const text = error.format();
    expect(text).toContain("not finite");
    expect(text.split("edges: {missing: drop}").length - 1).toBe(1);
  });

  it("a participants × edges table: an empty cell stops the run with the hint; with missing: drop it is a missing edge", () => {
    const dir = path.join(root, "edge-table");
    mkdirSync(dir, { recursive: true });
    writeFileSync(path.join(dir, "participants.tsv"), "participant_id\tgroup\na\tcontrol\nb\tpatient\nc\tcontrol\nd\tpatient\n");
    writeFileSync(path.join(dir, "edges.tsv"), "participant_id\t1-2\t1-3\t2-3\na\t1\t2\t3\nb\t\t2\t4\nc\t2\t3\t1\nd\t1\t5\t2\n");
    const lines = ["subjects: participants.tsv", "connectomes: edges.tsv", "model: group", "contrasts:", "  g: group[patient] - group[control]", "inference: { method: fdr }"];
    const error = prepareError(path.join("edge-table", "error"), lines);
    expect(error.message).toContain("is empty");
    expect(error.hint).toContain("edges: {missing: drop}");
    const design = writeDesignFile(path.join(dir, "drop.yaml"), [...lines, "edges: { missing: drop }"]);
    const prepared = prepareAnalysis(design);
    expect(prepared.edgeRules!.reasons).toEqual(["missing in 1 participant", "", ""]);
  });

  it.each([["0"], ["1.5"], ["-0.2"], ["high"], ["[0.5]"]])("edges.present_in: %s is refused, naming the key", (value) => {
    const error = prepareError("bad-present", designLines([`edges: { present_in: ${value} }`]));
    expect(error.location.key).toBe("edges.present_in");
    expect(error.message).toContain("(0, 1]");
  });

  it("edges.missing and unknown keys under edges are refused, naming the key", () => {
    expect(prepareError("bad-missing", designLines(["edges: { missing: skip }"])).location.key).toBe("edges.missing");
    const unknown = prepareError("bad-key", designLines(["edges: { present: 0.5 }"]));
    expect(unknown.location.key).toBe("edges.present");
    expect(unknown.hint).toContain("present_in");
    expect(prepareError("bad-scale", designLines(["scale: sum"])).location.key).toBe("scale");
    expect(prepareError("bad-edges", designLines(["edges: drop"])).location.key).toBe("edges");
  });

  it("log1p of a value ≤ −1 names the file and the cell; scale: total of a participant without weight names the participant", () => {
    const dir = path.join(root, "negative");
    mkdirSync(dir, { recursive: true });
    writeFileSync(path.join(dir, "participants.tsv"), "participant_id\tgroup\tage\na\tcontrol\t50\nb\tpatient\t60\nc\tcontrol\t55\nd\tpatient\t65\n");
    const matrix = (w: number) => `0\t${w}\t1\n${w}\t0\t2\n1\t2\t0\n`;
    writeFileSync(path.join(dir, "a.tsv"), matrix(3));
    writeFileSync(path.join(dir, "b.tsv"), matrix(-1));
    writeFileSync(path.join(dir, "c.tsv"), matrix(4));
    writeFileSync(path.join(dir, "d.tsv"), matrix(5));
    const lines = (extra: string[]) => [
      "subjects: participants.tsv",
      "connectomes: '{participant_id}.tsv'",
      "model: group + age",
      "contrasts:",
      "  g: group[patient] - group[control]",
      "inference: { method: fdr }",
      ...extra,
    ];
    const log1p = prepareError(path.join("negative", "log1p"), lines(["transform: log1p"]));
    expect(log1p.location.file).toContain("b.tsv");
    expect(log1p.message).toContain("log1p");
    writeFileSync(path.join(dir, "b.tsv"), "0\t0\t0\n0\t0\t0\n0\t0\t0\n");
    const scale = prepareError(path.join("negative", "scale"), lines(["scale: total"]));
    expect(scale.message).toContain("participant 'b'");
    expect(scale.location.file).toContain("b.tsv");
  });

  it("nan cells (any case) are missing with missing: drop, and every edge missing leaves nothing to analyse (edges)", () => {
    const dir = path.join(root, "all-missing");
    mkdirSync(dir, { recursive: true });
    writeFileSync(path.join(dir, "participants.tsv"), "participant_id\tgroup\na\tcontrol\nb\tpatient\nc\tcontrol\nd\tpatient\n");
    for (const id of ["a", "b", "c", "d"]) writeFileSync(path.join(dir, `${id}.tsv`), id === "b" ? "0\tNAN\tnan\nNAN\t0\tNaN\nnan\tNaN\t0\n" : "0\t1\t2\n1\t0\t3\n2\t3\t0\n");
    const error = prepareError(path.join("all-missing", "design"), [
      "subjects: participants.tsv",
      "connectomes: '{participant_id}.tsv'",
      "model: group",
      "contrasts:",
      "  g: group[patient] - group[control]",
      "inference: { method: fdr }",
      "edges: { missing: drop }",
    ]);
    expect(error.location.key).toBe("edges");
    expect(error.message).toContain("no edge to analyse");
  });
});
