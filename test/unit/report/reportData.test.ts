// The data report.html's script reads (reportData.ts) and the attributes it finds the figures
// and table rows by: checked against the results folder's own edge columns and findings, for a
// components run (t contrasts, projections) and an FDR run with an F contrast (circle layout).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadResults, type LoadedResults } from "../../../src/output/report/loadResults.js";
import { reportContent, type ReportContent } from "../../../src/output/report/reportContent.js";
import { reportData } from "../../../src/output/report/reportData.js";
import { reportFiles } from "../../../src/output/report/writeReport.js";
import { analysedCohort, GOLDEN_DESIGN, HTML_LABEL, type AnalysedCohort } from "./reportCohort.js";

const FDR_WITH_F = [
  "model: group + age + sex + site",
  "levels:",
  "  group: [control, patient]",
  "contrasts:",
  "  patient_gt_control: group[patient] - group[control]",
  "  site_any: site",
  "transform: fisher-z",
  "inference:",
  "  method: fdr",
  "  alpha: 0.05",
  "",
].join("\n");

interface Loaded {
  cohort: AnalysedCohort;
  results: LoadedResults;
  content: ReportContent;
  html: string;
}

async function load(design: string, noCoordinates = false): Promise<Loaded> {
  const cohort = await analysedCohort({ design, noCoordinates, simulation: noCoordinates ? { effect: { regions: 6, size: 3 } } : undefined });
  const results = loadResults(cohort.results);
  return { cohort, results, content: reportContent(results), html: reportFiles(results).get("report.html")! };
}

const embedded = (html: string) => JSON.parse(/<script type="application\/json" id="plexus-data">([^<]*)<\/script>/.exec(html)![1]);
const attributeValues = (html: string, pattern: RegExp) => [...html.matchAll(pattern)].map((m) => Number(m[1]));

let components: Loaded;
let fdr: Loaded;
beforeAll(async () => {
  components = await load(GOLDEN_DESIGN);
  fdr = await load(FDR_WITH_F, true);
}, 120_000);
afterAll(() => {
  components?.cohort.remove();
  fdr?.cohort.remove();
});

describe("report.html's embedded data", () => {
  it("reads back from the page exactly as reportData built it, the HTML label included", () => {
    for (const run of [components, fdr]) {
      const data = embedded(run.html);
      expect(data).toEqual(JSON.parse(JSON.stringify(reportData(run.results, run.content))));
      expect(data.regions).toContain(HTML_LABEL);
    }
  });

  it("holds every edge's pair and its statistic, estimate, p and q to four significant digits", () => {
    for (const run of [components, fdr]) {
      const data = reportData(run.results, run.content);
      run.results.contrasts.forEach((contrast, k) => {
        const { edges } = contrast;
        expect(data.a).toEqual(Array.from(edges.regionA));
        expect(data.b).toEqual(Array.from(edges.regionB));
        const c = data.contrasts[k];
        expect(c.statistic).toBe(contrast.summary.statistic === "F" ? "F" : "t");
        for (let e = 0; e < edges.statistic.length; e++) {
          for (const [values, column] of [
            [c.t, edges.statistic],
            [c.estimate, edges.estimate],
            [c.p, edges.pUncorrected],
            [c.q, edges.qFdr],
          ] as const) {
            const v = column[e];
            expect(values[e]).toBe(Number.isFinite(v) ? Number(v.toPrecision(4)) : null);
          }
        }
      });
    }
    expect(reportData(fdr.results, fdr.content).contrasts.some((c) => c.statistic === "F")).toBe(true);
  });

  it("lists each significant subnetwork with exactly its edges (as many as its extent); none under method fdr", () => {
    const data = reportData(components.results, components.content);
    let listed = 0;
    data.contrasts.forEach((c, k) => {
      const { edges } = components.results.contrasts[k];
      for (const s of c.subnetworks) {
        expect(s.edges.length).toBe(s.extent);
        expect(s.edges.every((e) => edges.component[e] === s.id)).toBe(true);
        listed += s.edges.length;
      }
      expect(c.subnetworks.map((s) => s.id)).toEqual(components.content.contrasts[k].finding.components.map((s) => s.id));
    });
    expect(listed).toBeGreaterThan(0);
    for (const c of reportData(fdr.results, fdr.content).contrasts) expect(c.subnetworks).toEqual([]);
  });
});

describe("report.html's attributes for the script", () => {
  it("marks each printed edge row and each network edge with an edge of the finding", () => {
    for (const run of [components, fdr]) {
      const finding = new Set(run.content.contrasts.flatMap((c) => c.finding.edges));
      const rows = attributeValues(run.html, /<tr data-edge="(\d+)">/g);
      expect(rows.length).toBe(run.content.contrasts.reduce((sum, c) => sum + Math.min(c.finding.edges.length, 50), 0));
      const paths = attributeValues(run.html, /<path [^>]*data-edge="(\d+)"/g);
      expect(paths.length).toBeGreaterThan(0);
      for (const e of [...rows, ...paths]) expect(finding.has(e)).toBe(true);
      expect(run.html).toContain(`data-cells="${run.results.regions.length}"`);
    }
  });

  it("marks the subnetworks table's rows with their contrast and component", () => {
    const marked = [...components.html.matchAll(/<tr data-contrast="(\d+)" data-component="(\d+)">/g)].map((m) => [Number(m[1]), Number(m[2])]);
    const expected = components.content.contrasts.flatMap((c, k) => c.finding.components.map((s) => [k, s.id]));
    expect(marked).toEqual(expected);
    expect(fdr.html).not.toContain("data-component=");
  });
});
