// `plexus strength` end to end through the CLI: main(argv, sink) in-process on a small invented
// cohort (the simulator, written to a temporary folder), and the built binary once.
//
// The nodal and subnetwork results are checked against an independent computation done here
// from the raw files: matrices read as text, Fisher z-transformed with Math.atanh, strengths as
// row sums / cell means of the full matrices; per measure, ordinary least squares with
// ml-matrix 6.15.1 (pseudoInverse, with inverse(X'X) for the contrast variance), the upper tail
// from @stdlib/stats-base-dists-t-cdf 0.2.3 at −t, and q-values from @stdlib/stats-padjust 0.2.1.
// Tolerance: relative 1e-9 plus absolute 1e-12 (two stable least-squares routes; common practice).
// User mistakes must exit with code 2 and name the option (or file) at fault, with no stack.
import { spawnSync } from "node:child_process";
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import padjust from "@stdlib/stats-padjust";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { expectAllClose } from "../helpers/close.js";
import { expectRounded, readTables } from "../helpers/docxTables.js";
import {
  clinicDesign,
  groupDesignLines,
  numberColumn as column,
  olsReference,
  readFisherCohort,
  readTable,
  rowSums,
  runCli,
  writeDesignFile,
  writeSimulatedCohort,
} from "../unit/strength/strengthTestFiles.js";

const REPO = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");
const INDEPENDENT = { rel: 1e-9, abs: 1e-12 };
const REGIONS = 16; // two systems of eight (the simulator makes systems of about ten regions)

let root = "";
let design = "";

beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-strength-cli-"));
  writeSimulatedCohort(
    path.join(root, "cohort"),
    { regions: REGIONS, patients: 10, controls: 9, kind: "correlation", effect: { regions: 4, size: 1.5 }, covariates: true },
    8,
  );
  design = writeDesignFile(
    path.join(root, "design.yaml"),
    groupDesignLines({
      cohort: "cohort",
      regions: true,
      model: "group + age + sex",
      contrasts: ["patient_gt_control: group[patient] - group[control]", "age_down: -age"],
      inference: ["method: components", "permutations: 99", "seed: 2"],
    }),
  );
});

afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

const raw = () => readFisherCohort(path.join(root, "cohort"));

/** Which TSV column each printed column of tables.docx shows (nodes.tsv, measures.tsv). */
const DOCX_SOURCES: Record<string, Record<string, string>> = {
  nodes: { β: "estimate", SE: "standard_error", t: "statistic", p: "p_unc", p_FWE: "p_fwe", q_FDR: "q_fdr", "partial r": "partial_r" },
  measures: { Edges: "edges", β: "beta", SE: "se", t: "t", df: "df", p: "p_unc", p_FWE: "p_fwe", "partial r": "partial_r" },
};

/**
 * tables.docx opened as a zip of XML (test/helpers/docxTables.ts): one table per contrast under
 * "Table n. …", every printed number the TSV twin's value rounded to the digits shown, rows in the
 * order given. Returns the tables' notes.
 */
function checkDocx(out: string, contrasts: string[], twin: "nodes" | "measures", df: number, order: (name: string) => string[]): string[][] {
  const tables = readTables(readFileSync(path.join(out, "tables.docx")));
  expect(tables).toHaveLength(contrasts.length);
  return contrasts.map((name, k) => {
    const table = tables[k];
    expect(table.caption).toMatch(new RegExp(`^Table ${k + 1}\\. \\w+ strength, ${name} \\(`));
    const tsv = readTable(path.join(out, name, `${twin}.tsv`));
    const [header, ...body] = table.rows;
    expect(body.map((cells) => cells[0]), `${name}: docx row order`).toEqual(order(name));
    for (const cells of body) {
      const row = tsv.rows.find((r) => r[0] === cells[0])!;
      header.forEach((column, c) => {
        const label = `${name} ${cells[0]} ${column}`;
        if (column === "df" && twin === "nodes") expect(cells[c], label).toBe(String(df));
        else if (c > 0) expectRounded(cells[c], row[tsv.header.indexOf(DOCX_SOURCES[twin][column])], label);
      });
    }
    return table.after;
  });
}

/** Upper-tail statistics per measure by OLS on X = [1, patient, age, male]. */
const ols = (rows: string[][], measures: number[][], contrast: number[]) => olsReference(clinicDesign(rows), measures, contrast, "upper");

describe("plexus strength", () => {
  it("nodal: writes nodes.tsv per contrast, strength_values.tsv, results.md and summary.json, matching an independent fit", async () => {
    const out = path.join(root, "nodal");
    const result = await runCli(["strength", design, "--out", out, "--threads", "1"]);
    expect(result.stderr).not.toContain("error");
    expect(result.code).toBe(0);
    // figures/ holds the nodal figure of each contrast when figures/nodalFigure.ts draws one.
    expect(readdirSync(out).filter((name) => name !== "figures").sort()).toEqual([
      "age_down",
      "methods.md",
      "patient_gt_control",
      "plexus-files.json",
      "report.html",
      "results.md",
      "strength_values.tsv",
      "summary.json",
      "tables.docx",
      "tables.tex",
    ]);
    const { rows, labels, matrices } = raw();
    const strength = rowSums(matrices);

    const values = readTable(path.join(out, "strength_values.tsv"));
    expect(values.header).toEqual(["participant_id", ...labels]);
    expect(values.rows.map((r) => r[0])).toEqual(rows.map((r) => r[0]));
    labels.forEach((label, i) =>
      expectAllClose(column(values, label), strength[i], { ...INDEPENDENT, label: `strength_values.tsv ${label} vs row sums of atanh(r)` }),
    );

    for (const [name, contrast] of [
      ["patient_gt_control", [0, 1, 0, 0]],
      ["age_down", [0, 0, -1, 0]],
    ] as const) {
      const nodes = readTable(path.join(out, name, "nodes.tsv"));
      expect(nodes.header).toEqual(["region", "statistic", "estimate", "p_unc", "p_fwe", "q_fdr", "partial_r", "standard_error"]);
      expect(nodes.rows.map((r) => r[0])).toEqual(labels);
      const reference = ols(rows, strength, [...contrast]);
      const label = (what: string) => ({ ...INDEPENDENT, label: `${name} nodes.tsv ${what}` });
      expectAllClose(column(nodes, "statistic"), reference.t, label("statistic vs ml-matrix OLS"));
      expectAllClose(column(nodes, "estimate"), reference.estimate, label("estimate vs ml-matrix OLS"));
      expectAllClose(column(nodes, "standard_error"), reference.se, label("standard_error vs ml-matrix OLS"));
      expectAllClose(column(nodes, "p_unc"), reference.p, label("p_unc vs @stdlib t cdf"));
      expectAllClose(column(nodes, "q_fdr"), padjust(reference.p, "bh"), label("q_fdr vs @stdlib padjust bh"));
      expectAllClose(column(nodes, "partial_r"), reference.partialR, label("partial_r = t/√(t² + df)"));
      // Monte Carlo with K = 99: p_fwe = (1 + b)/100, never below 0.01, never below the region's p_unc share.
      for (const p of column(nodes, "p_fwe")) {
        expect(p).toBeGreaterThanOrEqual(0.01);
        expect(p).toBeLessThanOrEqual(1);
        expect(Math.round(p * 100)).toBeCloseTo(p * 100, 9);
      }
    }

    const summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
    expect(summary.analysis).toBe("strength");
    expect(summary.measure.kind).toBe("nodal");
    expect(summary.contrasts.map((c: { mode: string; permutations: number }) => [c.mode, c.permutations])).toEqual([
      ["monte-carlo", 99],
      ["monte-carlo", 99],
    ]);
    expect(summary.inputs.filter((i: { role: string }) => i.role === "connectome")).toHaveLength(rows.length);
    const markdown = readFileSync(path.join(out, "results.md"), "utf8");
    expect(markdown).toContain("| Region | β | SE | t | df | p | p_FWE | q_FDR | partial r |");
    expect(markdown.match(/^\| /gm)?.length).toBe(2 * (REGIONS + 2));
    // The printed tables list regions by p (ties in matrix order); nodes.tsv keeps matrix order.
    const printed = markdown
      .split(/^\*\*Table \d+\. /m)
      .slice(1)
      .map((part) => part.split("\n").filter((line) => line.startsWith("| ")).slice(2).map((line) => line.split(" | ")[0].slice(2)));
    expect(printed).toHaveLength(2);
    ["patient_gt_control", "age_down"].forEach((name, k) => {
      const nodes = readTable(path.join(out, name, "nodes.tsv"));
      const p = column(nodes, "p_unc");
      const byP = labels.map((_, i) => i).sort((a, b) => (Number.isFinite(p[a]) ? p[a] : Infinity) - (Number.isFinite(p[b]) ? p[b] : Infinity) || a - b);
      expect(printed[k], `${name}: table rows by p`).toEqual(byP.map((i) => labels[i]));
      if (k === 0) expect(byP, "the planted effect moves regions off matrix order").not.toEqual(labels.map((_, i) => i));
    });
    expect(markdown).toContain("Regions are listed by p, smallest first (ties in matrix order)");
    // tables.docx: the same tables, same order, every cell the nodes.tsv value rounded as printed.
    const notes = checkDocx(out, ["patient_gt_control", "age_down"], "nodes", rows.length - 4, (name) => printed[name === "age_down" ? 1 : 0]);
    for (const after of notes) expect(after.join(" ")).toContain("Regions are listed by p, smallest first");
    expect(readFileSync(path.join(out, "plexus-files.json"), "utf8")).toContain("tables.docx");
    // tables.tex: the same tables as booktabs floats, regions in the same order (LaTeX's escaped underscore read back).
    const tex = readFileSync(path.join(out, "tables.tex"), "utf8");
    const texRows = [...tex.matchAll(/\\midrule\n([\s\S]*?)\\bottomrule/g)].map((m) =>
      m[1].trim().split("\n").map((line) => line.split(" & ")[0].replace(/\\_/g, "_")),
    );
    expect(texRows).toEqual(printed);
    expect(tex.match(/\\begin\{table\}/g)).toHaveLength(2);
  });

  it("subnetwork: one measure per system, pair of systems and edge list, each the mean of its cells", async () => {
    const { rows, labels, systems, matrices } = raw();
    const system = systems[0];
    const other = systems.find((s) => s !== system)!;
    const pairsFile = path.join(root, "my-edges.tsv");
    writeFileSync(pairsFile, `region_a\tregion_b\n${labels[3]}\t${labels[0]}\n${labels[5]}\t${labels[8]}\n`);
    const out = path.join(root, "subnetwork");
    const result = await runCli(["strength", design, "--out", out, "--system", system, "--between", `${system},${other}`, "--pairs", pairsFile, "-q", "-t", "1"]);
    expect(result.stderr).toBe("");
    expect(result.code).toBe(0);
    const cellMean = (keep: (i: number, j: number) => boolean) =>
      matrices.map((m) => {
        let sum = 0;
        let count = 0;
        for (let i = 0; i < REGIONS; i++) for (let j = i + 1; j < REGIONS; j++) if (keep(i, j)) (sum += m[i][j]), count++;
        return sum / count;
      });
    const expected = [
      cellMean((i, j) => systems[i] === system && systems[j] === system),
      cellMean((i, j) => (systems[i] === system && systems[j] === other) || (systems[i] === other && systems[j] === system)),
      cellMean((i, j) => (i === 0 && j === 3) || (i === 5 && j === 8)),
    ];
    const names = [`within_${system}`, `between_${system}_${other}`, "pairs_my-edges"];
    const values = readTable(path.join(out, "strength_values.tsv"));
    expect(values.header).toEqual(["participant_id", ...names]);
    names.forEach((name, k) => expectAllClose(column(values, name), expected[k], { ...INDEPENDENT, label: `${name} vs the mean of its cells` }));

    const measures = readTable(path.join(out, "patient_gt_control", "measures.tsv"));
    expect(measures.header).toEqual(["measure", "beta", "se", "t", "df", "p_unc", "partial_r", "p_fwe", "edges", "description"]);
    expect(measures.rows.map((r) => r[0])).toEqual(names);
    expect(measures.rows[2][measures.header.indexOf("edges")]).toBe("2");
    const reference = ols(rows, expected, [0, 1, 0, 0]);
    expectAllClose(column(measures, "beta"), reference.estimate, { ...INDEPENDENT, label: "measures.tsv beta" });
    expectAllClose(column(measures, "se"), reference.se, { ...INDEPENDENT, label: "measures.tsv se" });
    expectAllClose(column(measures, "t"), reference.t, { ...INDEPENDENT, label: "measures.tsv t" });
    expectAllClose(column(measures, "p_unc"), reference.p, { ...INDEPENDENT, label: "measures.tsv p_unc" });
    expectAllClose(column(measures, "partial_r"), reference.partialR, { ...INDEPENDENT, label: "measures.tsv partial_r" });
    expect(column(measures, "df")).toEqual([reference.df, reference.df, reference.df]);
    const markdown = readFileSync(path.join(out, "results.md"), "utf8");
    expect(markdown).toContain("| Measure | Edges | β | SE | t | df | p | p_FWE | partial r |");
    checkDocx(out, ["patient_gt_control", "age_down"], "measures", reference.df, () => names);
  });

  it("results.md says the terminal's warnings in plain words, without code spans", async () => {
    const joint = path.join(root, "joint.yaml");
    writeFileSync(joint, readFileSync(design, "utf8").replace("method: components", "method: components\n  across_contrasts: true"));
    const out = path.join(root, "joint");
    const result = await runCli(["strength", joint, "--out", out, "--threads", "1"]);
    expect(result.code).toBe(0);
    expect(result.stderr).toContain("applies to `plexus run`");
    const markdown = readFileSync(path.join(out, "results.md"), "utf8");
    expect(markdown).toContain("> **Caution.** 'inference.across_contrasts' applies to plexus run; the p_FWE of plexus strength are corrected over the measures within each contrast");
    expect(markdown).not.toContain("`");
  });

  it("global with --positive-only and a design without permutations (method fdr): p_fwe is empty", async () => {
    const fdrDesign = path.join(root, "fdr.yaml");
    writeFileSync(fdrDesign, readFileSync(design, "utf8").replace("method: components", "method: fdr"));
    const out = path.join(root, "global");
    const result = await runCli(["strength", fdrDesign, "--out", out, "--measure", "global", "--positive-only"]);
    expect(result.code).toBe(0);
    const measures = readTable(path.join(out, "age_down", "measures.tsv"));
    expect(measures.rows).toHaveLength(1);
    expect(measures.rows[0][0]).toBe("global");
    expect(measures.rows[0][measures.header.indexOf("p_fwe")]).toBe("");
    const { matrices } = raw();
    const expected = matrices.map((m) => {
      let sum = 0;
      for (let i = 0; i < REGIONS; i++) for (let j = i + 1; j < REGIONS; j++) sum += Math.max(m[i][j], 0);
      return sum / ((REGIONS * (REGIONS - 1)) / 2);
    });
    expectAllClose(column(readTable(path.join(out, "strength_values.tsv")), "global"), expected, { ...INDEPENDENT, label: "global positive-only" });
    const summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
    expect(summary.contrasts[0].mode).toBeNull();
    expect(summary.measure.positive_only).toBe(true);
  });

  describe("user mistakes exit with code 2 and name the option", () => {
    const cases: [string, string[], string][] = [
      ["an unknown measure", ["--measure", "local"], "--measure"],
      ["edge-set options with --measure nodal", ["--measure", "nodal", "--system", "x"], "--measure"],
      ["--measure subnetwork without an edge set", ["--measure", "subnetwork"], "--measure"],
      ["--mean with global strength", ["--measure", "global", "--mean"], "--mean"],
      ["an unknown system", ["--system", "no-such-system"], "--system"],
      ["--between with one system", ["--between", "a"], "--between"],
      ["--component without --from", ["--measure", "nodal", "--component", "1"], "--component"],
      ["a component id that is not a number", ["--from", "x", "--component", "one"], "--component"],
      ["--threads 0", ["--threads", "0"], "--threads"],
      ["a missing results folder", ["--from", "no/such/folder"], "--from"],
      ["a missing edge list", ["--pairs", "no-such-file.tsv"], "--pairs"],
    ];
    for (const [what, flags, named] of cases) {
      it(what, async () => {
        const out = path.join(root, "mistake");
        const result = await runCli(["strength", design, "--out", out, ...flags]);
        expect(result.code, result.stderr).toBe(2);
        expect(result.stderr).toContain(named);
        expect(result.stderr).not.toContain("    at ");
        expect(existsSync(out)).toBe(false);
      });
    }

    it("an edge list with an unknown label names the file, line and column", async () => {
      const { labels } = raw();
      const file = path.join(root, "bad-edges.tsv");
      writeFileSync(file, `region_a\tregion_b\n${labels[0]}\t${labels[1]}\n${labels[2]}\tnowhere\n`);
      const result = await runCli(["strength", design, "--out", path.join(root, "mistake"), "--pairs", file]);
      expect(result.code).toBe(2);
      expect(result.stderr).toContain(`${file}:3:2`);
      expect(result.stderr).toContain("'nowhere'");
    });

    it("an F contrast (several rows) names the contrast's key and line", async () => {
      const fDesign = path.join(root, "f-contrast.yaml");
      writeFileSync(fDesign, readFileSync(design, "utf8").replace("  age_down: -age", "  group_or_age: [[0, 1, 0, 0], [0, 0, 1, 0]]").replace("method: components", "method: fdr"));
      const result = await runCli(["strength", fDesign, "--out", path.join(root, "mistake")]);
      expect(result.code, result.stderr).toBe(2);
      expect(result.stderr).toContain("key 'contrasts.group_or_age'");
      expect(result.stderr).toContain("F contrast");
    });

    it("an existing non-empty output folder without --force", async () => {
      const out = path.join(root, "taken");
      mkdirSync(out);
      writeFileSync(path.join(out, "keep.txt"), "x");
      const result = await runCli(["strength", design, "--out", out, "--measure", "global"]);
      expect(result.code).toBe(2);
      expect(result.stderr).toContain("--force");
      expect(readFileSync(path.join(out, "keep.txt"), "utf8")).toBe("x");
    });
  });
});

describe("the built binary (node bin/plexus.js, dist/ from npx tsc -p tsconfig.build.json)", () => {
  it("exits 2 with the message only for a bad option", () => {
    const result = spawnSync(process.execPath, [path.join(REPO, "bin", "plexus.js"), "strength", design, "--out", path.join(root, "bin-out"), "--measure", "hub"], {
      encoding: "utf8",
    });
    expect(result.status).toBe(2);
    expect(result.stderr).toContain("key '--measure'");
    expect(result.stderr).not.toContain("    at ");
  });
});
