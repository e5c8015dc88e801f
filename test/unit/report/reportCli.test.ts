// `plexus report DIR` through the CLI entry point (main with a captured sink): it rewrites the
// report of an existing results folder without recomputing, atomically, and turns every
// problem with the folder into a located input error (exit 2, message only).
import { existsSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { OutputSink } from "../../../src/cli/outputSink.js";
import { main } from "../../../src/cli/main.js";
import { loadResults } from "../../../src/output/report/loadResults.js";
import { allReportFiles } from "../../../src/output/report/writeReport.js";
import { analysedCohort, GOLDEN_DESIGN, HTML_LABEL, type AnalysedCohort } from "./reportCohort.js";

interface Captured extends OutputSink {
  stdout: string;
  stderr: string;
}

function capture(): Captured {
  const sink: Captured = {
    stdout: "",
    stderr: "",
    errIsTerminal: false,
    out: (text) => void (sink.stdout += text),
    err: (text) => void (sink.stderr += text),
  };
  return sink;
}

async function report(...args: string[]): Promise<{ code: number; sink: Captured }> {
  const sink = capture();
  const code = await main(["report", ...args], sink);
  return { code, sink };
}

const FDR_DESIGN = [
  "model: group + age + sex + site",
  "levels:",
  "  group: [control, patient]",
  "contrasts:",
  "  patient_gt_control: group[patient] - group[control]",
  "  site_any: site",
  "transform: fisher-z",
  "inference:",
  "  method: fdr",
  "  fdr: by",
  "  alpha: 0.05",
  "",
].join("\n");

const NUMERIC_DESIGN = ["model: age", "contrasts:", "  age_down: -age", "transform: fisher-z", "inference:", "  method: fdr", "  alpha: 0.2", ""].join("\n");

const MAX_T_DESIGN = [
  "model: group + age",
  "levels:",
  "  group: [control, patient]",
  "contrasts:",
  "  patient_vs_control: group[patient] - group[control]",
  "transform: fisher-z",
  "inference:",
  "  method: max-t",
  "  threshold: 3.0",
  "  size: mass",
  "  tail: both",
  "  permutations: 200",
  "  seed: 5",
  "  blocks: site",
  "  alpha: 0.05",
  "",
].join("\n");

const COUNTS_DESIGN = ["model: group", "levels:", "  group: [control, patient]", "contrasts:", "  up: group[patient] - group[control]", "inference:", "  method: fdr", ""].join("\n");

let components: AnalysedCohort;
let fdr: AnalysedCohort;
let numeric: AnalysedCohort;
let maxT: AnalysedCohort;
let counts: AnalysedCohort;

beforeAll(async () => {
  components = await analysedCohort({ design: GOLDEN_DESIGN });
  fdr = await analysedCohort({ design: FDR_DESIGN, noCoordinates: true, simulation: { effect: { regions: 6, size: 3 } } });
  numeric = await analysedCohort({ design: NUMERIC_DESIGN, simulation: { effect: null } });
  maxT = await analysedCohort({ design: MAX_T_DESIGN });
  counts = await analysedCohort({ design: COUNTS_DESIGN, simulation: { kind: "counts" } });
});
afterAll(() => {
  for (const c of [components, fdr, numeric, maxT, counts]) c?.remove();
});

describe("plexus report DIR", () => {
  it("writes every report file into the folder, the same as the library, and leaves no temporary folder", async () => {
    const { code, sink } = await report(components.results);
    expect(sink.stderr).toBe("");
    expect(code).toBe(0);
    // 32 files, and the data figure of its significant subnetwork at two widths as SVG and PNG.
    expect(sink.stdout).toMatch(/^plexus report: wrote 36 files to /);
    const expected = await allReportFiles(loadResults(components.results));
    expect(expected.has("tables.docx")).toBe(true);
    for (const [name, written] of expected) expect(readFileSync(join(components.results, name)).equals(Buffer.from(written)), name).toBe(true);
    expect(readdirSync(components.results).filter((name) => name.startsWith("."))).toEqual([]);
  });

  it("does not touch the analysis files (it never recomputes)", async () => {
    const analysis = ["summary.json", "subjects.tsv", "regions.tsv", "patient_gt_control/edges.tsv", "patient_gt_control/null.tsv"];
    const before = analysis.map((name) => [readFileSync(join(components.results, name), "utf8"), statSync(join(components.results, name)).mtimeMs]);
    expect((await report(components.results)).code).toBe(0);
    const after = analysis.map((name) => [readFileSync(join(components.results, name), "utf8"), statSync(join(components.results, name)).mtimeMs]);
    expect(after).toEqual(before);
  });

  it("--median adds a median [IQR] row under each numeric characteristic", async () => {
    expect((await report(components.results, "--median")).code).toBe(0);
    expect(readFileSync(join(components.results, "tables.md"), "utf8")).toContain("| age, median [IQR] |");
    expect((await report(components.results)).code).toBe(0);
    expect(readFileSync(join(components.results, "tables.md"), "utf8")).not.toContain("median");
  });

  it("a method-fdr design without coordinates: FDR edge tables (Benjamini–Yekutieli), a circular network, no null figure, an F contrast", async () => {
    expect((await report(fdr.results)).code).toBe(0);
    const figures = readdirSync(join(fdr.results, "figures")).sort();
    expect(figures.some((name) => name.endsWith("-null-180mm.svg"))).toBe(false);
    expect(figures).toContain("patient_gt_control-matrix-180mm.svg");
    expect(figures).toContain("site_any-matrix-180mm.svg");
    const network = readFileSync(join(fdr.results, "figures", "patient_gt_control-network-180mm.svg"), "utf8");
    expect(network).toContain("Regions on a circle");
    const tables = readFileSync(join(fdr.results, "tables.md"), "utf8");
    expect(tables).toContain("Edges with q_FDR ≤ 0.05: patient_gt_control");
    expect(tables).not.toContain("Significant subnetworks");
    const methods = readFileSync(join(fdr.results, "methods.md"), "utf8");
    expect(methods).toContain("Benjamini–Yekutieli");
    expect(methods).toContain("Benjamini Y, Yekutieli D (2001)");
    expect(methods).toContain("F-statistic");
    const summary = JSON.parse(readFileSync(join(fdr.results, "summary.json"), "utf8"));
    const f = summary.contrasts.find((c: { name: string }) => c.name === "site_any");
    if (f.significant_edges_fdr > 0) expect(tables).toContain("| F | Partial η² |");
    const html = readFileSync(join(fdr.results, "report.html"), "utf8");
    expect(html).not.toContain(HTML_LABEL);
  });

  it("a model without a factor describes everyone in one column, with no group test", async () => {
    expect((await report(numeric.results)).code).toBe(0);
    const tables = readFileSync(join(numeric.results, "tables.md"), "utf8");
    expect(tables).toContain("| Characteristic | All (n = 23) |");
    expect(tables).not.toContain("Welch");
    expect(readFileSync(join(numeric.results, "methods.md"), "utf8")).not.toContain("Welch");
  });
});

describe("plexus report on other inference settings", () => {
  it("max-t, two-sided, mass, exchangeability blocks: the rule, the edge-level p_FWE and the methods say so", async () => {
    expect((await report(maxT.results)).code).toBe(0);
    const tables = readFileSync(join(maxT.results, "tables.md"), "utf8");
    expect(tables).toContain("\\|t\\| > 3");
    expect(tables).toContain("| mass |");
    const summary = JSON.parse(readFileSync(join(maxT.results, "summary.json"), "utf8"));
    if (summary.contrasts[0].significant_components > 0) expect(tables).toContain("p_FWE (edge)");
    const methods = readFileSync(join(maxT.results, "methods.md"), "utf8");
    expect(methods).toContain("(Westfall & Young 1993)");
    expect(methods).toContain("exchangeability blocks given by site");
    expect(methods).toContain("whose |t| exceeded 3 (positive and negative edges separately)");
    expect(methods).toContain("measured by its mass");
    expect(existsSync(join(maxT.results, "figures", "patient_vs_control-null-180mm.svg"))).toBe(true);
  });
});

describe("plexus report warns about edges without a statistic", () => {
  it("streamline counts absent in everyone: the warning, the methods sentence and the blank matrix cells are reported", async () => {
    expect((await report(counts.results)).code).toBe(0);
    const summary = JSON.parse(readFileSync(join(counts.results, "summary.json"), "utf8"));
    const missing = summary.contrasts[0].edges_without_statistic as number;
    expect(missing).toBeGreaterThan(0);
    const html = readFileSync(join(counts.results, "report.html"), "utf8");
    expect(html).toContain(`up: ${missing} edges have zero residual variance`);
    expect(readFileSync(join(counts.results, "methods.md"), "utf8")).toContain(`${missing} edges had zero residual variance`);
    expect(readFileSync(join(counts.results, "figures", "up-matrix-180mm.svg"), "utf8")).toContain(`white: ${missing} edges with no statistic`);
  });
});

describe("plexus report: problems with the folder are input errors (exit 2, message only)", () => {
  it("a missing folder names the folder", async () => {
    const missing = join(components.dir, "no-such-folder");
    const { code, sink } = await report(missing);
    expect(code).toBe(2);
    expect(sink.stderr).toContain(`plexus: error: ${missing}: not a results folder`);
    expect(sink.stderr).not.toContain("    at ");
  });

  it("a folder without summary.json names summary.json", async () => {
    const { code, sink } = await report(components.dir);
    expect(code).toBe(2);
    expect(sink.stderr).toContain(join(components.dir, "summary.json"));
  });

  it("a summary.json that is not JSON, or lacks a key, names the file (and the key)", async () => {
    const other = await analysedCohort({ design: GOLDEN_DESIGN });
    try {
      const file = join(other.results, "summary.json");
      const original = readFileSync(file, "utf8");
      writeFileSync(file, "{ not json");
      let result = await report(other.results);
      expect(result.code).toBe(2);
      expect(result.sink.stderr).toContain(`${file}: summary.json is not valid JSON`);
      const parsed = JSON.parse(original);
      delete parsed.contrasts;
      writeFileSync(file, JSON.stringify(parsed));
      result = await report(other.results);
      expect(result.code).toBe(2);
      expect(result.sink.stderr).toContain(`${file}, key 'contrasts': expected an array in summary.json`);
    } finally {
      other.remove();
    }
  });

  it("a missing or damaged edges.tsv names the file (and the line and column); the earlier report stays as it was", async () => {
    const other = await analysedCohort({ design: GOLDEN_DESIGN });
    try {
      expect((await report(other.results)).code).toBe(0);
      const html = readFileSync(join(other.results, "report.html"), "utf8");
      const edges = join(other.results, "patient_gt_control", "edges.tsv");
      const lines = readFileSync(edges, "utf8").split("\n");
      const cells = lines[1].split("\t");
      cells[2] = "not-a-number";
      lines[1] = cells.join("\t");
      writeFileSync(edges, lines.join("\n"));
      let result = await report(other.results);
      expect(result.code).toBe(2);
      expect(result.sink.stderr).toContain(`${edges}:2:3: 'not-a-number' is not a number`);
      rmSync(edges);
      result = await report(other.results);
      expect(result.code).toBe(2);
      expect(result.sink.stderr).toContain(`cannot read ${edges}`);
      expect(readFileSync(join(other.results, "report.html"), "utf8")).toBe(html);
      expect(readdirSync(other.results).filter((name) => name.startsWith("."))).toEqual([]);
      expect(existsSync(join(other.results, "tables.md"))).toBe(true);
    } finally {
      other.remove();
    }
  });
});
