// Golden test of the report on a fixed simulated cohort (test/unit/report/reportCohort.ts):
// every report file is compared byte for byte with test/golden/report/. After an intended
// change, rewrite them with
//   UPDATE_GOLDEN=1 npx vitest run test/unit/report/reportGolden.test.ts
// and review the diff. The cohort table's numbers are also checked against references
// outside plexus (named beside each check), and the hostile strings the cohort carries
// must come out harmless in the HTML and in every TSV.
import ttest2 from "@stdlib/stats-ttest2";
import jStat from "jstat";
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { createHash } from "node:crypto";
import { dirname, join, relative } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parseTsv } from "../../../src/io/tsv.js";
import { scriptJson } from "../../../src/output/report/reportData.js";
import { writeReport } from "../../../src/output/report/writeReport.js";
import { expectClose } from "../../helpers/close.js";
import { analysedCohort, FORMULA_ID, FORMULA_SITE, GOLDEN_DESIGN, HTML_LABEL, type AnalysedCohort } from "./reportCohort.js";

const GOLDEN = join(dirname(fileURLToPath(import.meta.url)), "..", "..", "golden", "report");
const UPDATE = process.env.UPDATE_GOLDEN === "1";

let cohort: AnalysedCohort;
/** Text files as strings; tables.docx as bytes (deterministic: fixed timestamps, see tablesDocx.ts). */
const files = new Map<string, string | Uint8Array>();
const text = (name: string) => files.get(name) as string;

beforeAll(async () => {
  cohort = await analysedCohort({ design: GOLDEN_DESIGN });
  await writeReport(cohort.results, (path, text) => {
    files.set(path, text);
    const full = join(cohort.results, path);
    mkdirSync(dirname(full), { recursive: true });
    writeFileSync(full, text);
  });
  if (UPDATE) {
    rmSync(GOLDEN, { recursive: true, force: true });
    // PNGs are not kept as golden files (binary, large): their names are checked below, and their bytes by the repeat test.
    for (const [path, text] of files) {
      if (path.endsWith(".png")) continue;
      mkdirSync(dirname(join(GOLDEN, path)), { recursive: true });
      writeFileSync(join(GOLDEN, path), text);
    }
  }
});
afterAll(() => cohort?.remove());

function goldenFiles(dir: string): string[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter((entry) => entry.isFile())
    .map((entry) => relative(dir, join(entry.parentPath, entry.name)))
    .sort();
}

describe("report golden files (test/golden/report, UPDATE_GOLDEN=1 to rewrite)", () => {
  it("writes exactly the golden set of files", () => {
    const printed = [...files.keys()].filter((name) => !name.endsWith(".png"));
    expect(printed.sort()).toEqual(goldenFiles(GOLDEN));
    const figureFiles = ["control_gt_patient-matrix", "control_gt_patient-null", "patient_gt_control-matrix", "patient_gt_control-network", "patient_gt_control-null", "patient_gt_control-subnetwork1-data"].flatMap(
      (base) => ["-180mm.png", "-180mm.svg", "-85mm.png", "-85mm.svg"].map((suffix) => `figures/${base}${suffix}`),
    );
    expect([...files.keys()].sort()).toEqual([
      ...figureFiles,
      "methods.md",
      "report.html",
      "results.md",
      "tables.docx",
      "tables.md",
      "tables.tex",
      "tables/cohort.tsv",
      "tables/cohort_tests.tsv",
      "tables/excluded.tsv",
      "tables/hubs.tsv",
      "tables/subnetwork_edges.tsv",
      "tables/subnetworks.tsv",
    ]);
  });

  for (const name of goldenFiles(GOLDEN)) {
    it(`${name} matches the golden file`, () => {
      const written = files.get(name);
      if (written instanceof Uint8Array) {
        expect(Buffer.from(written).equals(readFileSync(join(GOLDEN, name))), `${name} differs from test/golden/report/${name} (bytes)`).toBe(true);
      } else {
        expect(written, `${name} differs from test/golden/report/${name}`).toBe(readFileSync(join(GOLDEN, name), "utf8"));
      }
    });
  }

  it("writing the report twice gives identical files (no clock, no randomness)", async () => {
    const again = new Map<string, string | Uint8Array>();
    await writeReport(cohort.results, (path, text) => again.set(path, text));
    expect(again).toEqual(files);
  });
});

describe("cohort table against references outside plexus", () => {
  const participants = () => {
    const table = parseTsv(readFileSync(join(cohort.dir, "cohort", "participants.tsv"), "utf8"), "participants.tsv");
    const column = (name: string) => table.header.indexOf(name);
    return table.rows.filter((row) => row[column("age")] !== "n/a").map((row) => ({
      group: row[column("group")],
      age: Number(row[column("age")]),
      sex: row[column("sex")],
      site: row[column("site")],
    }));
  };
  const tests = () => {
    const table = parseTsv(text("tables/cohort_tests.tsv"), "cohort_tests.tsv");
    return new Map(table.rows.map((row) => [row[0], Object.fromEntries(table.header.map((h, k) => [h, row[k]]))]));
  };

  it("age: Welch's t, df and p equal @stdlib/stats-ttest2 (variance 'unequal') on the analysed participants", () => {
    const people = participants();
    const control = people.filter((p) => p.group === "control").map((p) => p.age);
    const patient = people.filter((p) => p.group === "patient").map((p) => p.age);
    const reference = ttest2(control, patient, { variance: "unequal" });
    const age = tests().get("age")!;
    expect(age.test).toBe("welch-t");
    const inputs = { control, patient };
    expectClose(Number(age.statistic), reference.statistic, { rel: 1e-12, label: "age t vs @stdlib/stats-ttest2", inputs });
    expectClose(Number(age.df), reference.df, { rel: 1e-12, label: "age df vs @stdlib/stats-ttest2", inputs });
    expectClose(Number(age.p_value), reference.pValue, { rel: 1e-10, label: "age p vs @stdlib/stats-ttest2", inputs });
  });

  it("sex: a 2 × 2 table with an expected count below 5 gets Fisher's exact p, equal to jStat's hypergeometric sum", () => {
    const people = participants();
    const a = people.filter((p) => p.group === "control" && p.sex === "F").length;
    const controls = people.filter((p) => p.group === "control").length;
    const women = people.filter((p) => p.sex === "F").length;
    const total = people.length;
    // Two-sided: sum of hypergeometric probabilities (jStat.hypgeom.pdf, npm jstat) no larger than the observed one.
    const pdf = (k: number) => jStat.hypgeom.pdf(k, total, women, controls);
    const observed = pdf(a);
    let p = 0;
    for (let k = Math.max(0, women + controls - total); k <= Math.min(women, controls); k++) if (pdf(k) <= observed * (1 + 1e-7)) p += pdf(k);
    const sex = tests().get("sex")!;
    expect(sex.test).toBe("fisher-exact");
    expectClose(Number(sex.p_value), p, { rel: 1e-10, label: "sex Fisher p vs jStat hypergeometric", inputs: { a, controls, women, total } });
  });

  it("site: Pearson's chi-square p equals jStat's chi-square upper tail at the X² of the counted table, and is flagged", () => {
    const people = participants();
    const sites = [FORMULA_SITE, "central", "south"];
    const groups = ["control", "patient"];
    const counts = sites.map((s) => groups.map((g) => people.filter((p) => p.site === s && p.group === g).length));
    const total = people.length;
    let x2 = 0;
    let smallest = Infinity;
    sites.forEach((_, i) =>
      groups.forEach((__, j) => {
        const expected = (counts[i].reduce((s, v) => s + v, 0) * counts.reduce((s, row) => s + row[j], 0)) / total;
        smallest = Math.min(smallest, expected);
        x2 += (counts[i][j] - expected) ** 2 / expected;
      }),
    );
    const site = tests().get("site")!;
    expect(site.test).toBe("chi-square");
    expectClose(Number(site.statistic), x2, { rel: 1e-12, label: "site X² vs direct count", inputs: counts });
    // jStat's upper tail is 1 − CDF, fine at p ≈ 0.95.
    expectClose(Number(site.p_value), 1 - jStat.chisquare.cdf(x2, 2), { rel: 1e-10, label: "site p vs jStat chi-square", inputs: counts });
    expect(smallest).toBeLessThan(5);
    expect(files.get("tables.md")).toContain("At least one expected count is below 5");
  });

  it("counts and percentages in tables/cohort.tsv match the participants table", () => {
    const people = participants();
    const table = parseTsv(text("tables/cohort.tsv"), "cohort.tsv");
    const col = (name: string) => table.header.indexOf(name);
    for (const row of table.rows.filter((r) => r[col("variable")] === "sex")) {
      const inGroup = people.filter((p) => p.group === row[col("group")]);
      const count = inGroup.filter((p) => p.sex === row[col("level")]).length;
      expect(Number(row[col("count")])).toBe(count);
      expectClose(Number(row[col("percent")]), (100 * count) / inGroup.length, { rel: 1e-14, label: "percent" });
    }
  });
});

describe("hostile strings from the user's files come out harmless", () => {
  it("report.html shows the HTML label escaped and has only its own two script elements, the label inert in the JSON", () => {
    const html = text("report.html");
    expect(html).toContain("&lt;script&gt;alert(1)&lt;/script&gt;");
    expect(html).not.toContain(HTML_LABEL);
    expect(html.toLowerCase().split("<script").length - 1).toBe(2);
    expect(html.toLowerCase().split("</script").length - 1).toBe(2);
    expect(html).toContain(FORMULA_ID);
    // The JSON element: the label is escaped for a script context (\u003c…) and reads back unchanged.
    const json = /<script type="application\/json" id="plexus-data">([^<]*)<\/script>/.exec(html);
    expect(json).not.toBeNull();
    expect(json![1]).toContain("\\u003cscript\\u003ealert(1)\\u003c/script\\u003e");
    expect(JSON.parse(json![1]).regions).toContain(HTML_LABEL);
    // The Content-Security-Policy lets exactly the inline script run (its SHA-256) and nothing else.
    const script = /<script>([\s\S]*?)<\/script>/.exec(html)![1];
    const hash = createHash("sha256").update(script, "utf8").digest("base64");
    expect(html).toContain(`script-src 'sha256-${hash}'`);
    expect(html).not.toMatch(/script-src[^"]*unsafe-inline/);
  });

  it("scriptJson keeps a label that closes the script element inert and reads back unchanged", () => {
    const hostile = "</script><script>alert(1)</script>\u2028&<!--";
    const text = scriptJson({ label: hostile });
    expect(text).not.toMatch(/[<>&\u2028\u2029]/);
    expect(JSON.parse(text)).toEqual({ label: hostile });
  });

  it("the SVG figures escape the label too", () => {
    const network = text("figures/patient_gt_control-network-180mm.svg");
    expect(network).toContain("&lt;script&gt;");
    for (const name of files.keys()) if (name.endsWith(".svg")) expect(text(name).toLowerCase(), name).not.toContain("<script");
  });

  it("Markdown and LaTeX tables escape it", () => {
    // Markdown: a backslash before each < that a letter or / follows, so no tag starts; no HTML entity.
    expect(files.get("tables.md")).toContain("\\<script>alert(1)\\</script>");
    expect(files.get("tables.md")).not.toContain(HTML_LABEL);
    expect(files.get("tables.tex")).toContain("\\textless{}script\\textgreater{}alert(1)\\textless{}/script\\textgreater{}");
  });

  it("no cell of any TSV starts like a spreadsheet formula unless it is a plain number", () => {
    let neutralised = 0;
    for (const name of files.keys()) {
      if (!name.endsWith(".tsv")) continue;
      const table = parseTsv(text(name), name);
      for (const cell of [...table.header, ...table.rows.flat()]) {
        const raw = cell.startsWith('"') ? cell.slice(1) : cell;
        if (/^[=+\-@\t\r]/.test(raw)) expect(raw, `${name}: '${cell}'`).toMatch(/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/);
        if (raw.startsWith("'=")) neutralised++;
      }
    }
    expect(neutralised).toBeGreaterThan(0);
    expect(files.get("tables/excluded.tsv")).toContain(`'${FORMULA_ID}`);
    expect(files.get("tables/cohort.tsv")).toContain(`'${FORMULA_SITE}`);
  });
});
