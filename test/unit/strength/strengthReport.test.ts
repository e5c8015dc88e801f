// The text and report of `plexus strength` (methods.md, the draft results paragraphs in
// results.md, report.html): every number in the results text is the value of nodes.tsv or
// measures.tsv (full precision) rounded as printed, counts agree with summary.json, directions are
// said in the words of the contrast, singular and plural are right, no code formatting; report.html
// is self-contained and keeps a hostile region label inert. The statistics themselves are checked
// against outside references in test/cli/strength.test.ts; here the text is checked against the TSVs.
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { fixed, pValue, significant } from "../../../src/output/report/printNumbers.js";
import { plainMarkdown } from "../../../src/output/report/methodsText.js";
import { escapeHtml } from "../../../src/output/report/escapeHtml.js";
import { printSvgDocument } from "../../../src/output/report/figures/printSize.js";
import { prepareAnalysis } from "../../../src/run/prepareAnalysis.js";
import { analyzeStrength } from "../../../src/strength/strengthAnalysis.js";
import { strengthReportContent, strengthReportFiles, type NodalDrawing } from "../../../src/strength/strengthReport.js";
import { NAMED_REGIONS, strengthResultsText } from "../../../src/strength/strengthResultsText.js";
import { segmentsMarkdown } from "../../../src/output/report/methodsText.js";
import { numberColumn, readTable, runCli, writeDesignFile, writeSimulatedCohort, groupDesignLines } from "./strengthTestFiles.js";

/** A region label that closes the data script element and opens another; it must stay text. */
const HOSTILE = "</script><script>document.title='owned'</script>";
const REGIONS = 16;
const ALPHA = 0.05;

let root = "";
let design = "";

/** The results folder of one run of `plexus strength` on the design, with extra flags. */
async function strength(name: string, flags: string[] = [], file = design): Promise<string> {
  const out = path.join(root, name);
  const result = await runCli(["strength", file, "--out", out, "-q", "--threads", "1", ...flags]);
  expect(result.code, result.stderr).toBe(0);
  return out;
}

const read = (out: string, file: string) => readFileSync(path.join(out, file), "utf8");
/** A printed number in prose: the typographic minus in place of the hyphen. */
const prose = (text: string) => (text.startsWith("-") ? `−${text.slice(1)}` : text);
const pIs = (label: string, p: number) => (pValue(p).startsWith("<") ? `${label} ${pValue(p)}` : `${label} = ${pValue(p)}`);
const WORDS = ["zero", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten"];
/** The results paragraph of a contrast in results.md. */
const paragraph = (markdown: string, contrast: string) => markdown.split("\n").find((line) => line.startsWith(`For the contrast ${contrast} `)) ?? "";

/** Count words and nouns that disagree: "1 regions", "one contrasts", "2 region ", "1 degrees". */
function pluralMistakes(text: string): string[] {
  const nouns = "regions?|participants?|columns?|contrasts?|edges?|subnetworks?|measures?|blocks?|degrees?|relabelings?";
  const one = text.match(new RegExp(`\\b(1|one) (${nouns.replace(/\?/g, "")}s)\\b`, "gi")) ?? [];
  // "120 edge weights" is a plural noun phrase.
  const many = (text.match(new RegExp(`\\b([2-9]|[1-9]\\d+|two|three|four|five|six|seven|eight|nine|ten) (${nouns})\\b(?! weights)`, "gi")) ?? []).filter((m) => !/s$/i.test(m));
  return [...one, ...many];
}

beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-strength-report-"));
  const cohort = path.join(root, "cohort");
  writeSimulatedCohort(cohort, { regions: REGIONS, patients: 12, controls: 12, kind: "correlation", effect: { regions: 5, size: 2 }, covariates: true }, 8);
  // The hostile label replaces the first region's label.
  const regionsFile = path.join(cohort, "regions.tsv");
  const [header, first, ...rest] = readFileSync(regionsFile, "utf8").trimEnd().split("\n");
  const label = header.split("\t").indexOf("label");
  writeFileSync(regionsFile, [header, first.split("\t").map((cell, k) => (k === label ? HOSTILE : cell)).join("\t"), ...rest, ""].join("\n"));
  design = writeDesignFile(
    path.join(root, "design.yaml"),
    groupDesignLines({
      cohort: "cohort",
      regions: true,
      model: "group + age + sex",
      contrasts: ["patient_gt_control: group[patient] - group[control]", "age_down: -age"],
      inference: ["method: max-t", "permutations: 199", "seed: 4", `alpha: ${ALPHA}`],
    }),
  );
});

afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

describe("nodal strength: methods.md, results.md and report.html", () => {
  let out = "";
  beforeAll(async () => {
    out = await strength("nodal");
  });

  it("writes methods.md and report.html beside the tables, all recorded in plexus-files.json", () => {
    const files = readdirSync(out);
    for (const file of ["methods.md", "report.html", "results.md", "tables.tex", "tables.docx", "summary.json"]) expect(files).toContain(file);
    const record = read(out, "plexus-files.json");
    expect(record).toContain("methods.md");
    expect(record).toContain("report.html");
    // figures/nodalFigure.ts draws nothing yet on this branch: then there is no figure and no folder for it.
    if (!existsSync(path.join(out, "figures"))) expect(read(out, "report.html")).not.toContain("<figure");
  });

  it("methods.md: plain text with the counts of summary.json, the tests, the correction and full references", () => {
    const methods = read(out, "methods.md");
    const summary = JSON.parse(read(out, "summary.json"));
    expect(methods).not.toContain("`");
    expect(pluralMistakes(methods)).toEqual([]);
    expect(methods).toContain(`Connectivity matrices of ${summary.subjects.used} participants were analysed`);
    expect(methods).toContain(`Each matrix described ${summary.regions} regions and ${summary.edges} edges.`);
    expect(methods).toContain("the strength of each region was computed as the sum of its edge weights (weighted degree; Rubinov & Sporns 2010)");
    expect(methods).toContain(`leaving ${summary.df} residual degrees of freedom`);
    expect(methods).toContain("Each contrast's estimate was thus adjusted for the model's other terms (for patient_gt_control: age and sex; for age_down: group and sex).");
    expect(methods).toContain("Two contrasts were tested with a t-statistic for each region: patient_gt_control (group[patient] - group[control], c = [0, 1, 0, 0]) and age_down (-age, c = [0, 0, -1, 0]).");
    expect(methods).toContain(`Family-wise error across the ${REGIONS} regions was controlled by the maximum statistic (Westfall & Young 1993)`);
    expect(methods).toContain(`Monte Carlo; K = ${summary.contrasts[0].permutations}, seed ${summary.options.inference.seed}`);
    expect(methods).toContain(`Each of the two contrasts was tested at α = ${ALPHA} on its own, without correction across contrasts.`);
    // Every reference: authors (year). Title. Journal or publisher, with volume and pages where a journal.
    const references = methods.split("### References")[1].trim().split("\n");
    expect(references.length).toBeGreaterThanOrEqual(6);
    for (const reference of references) {
      expect(reference).toMatch(/^- [A-Z][^()]+ \((19|20)\d\d\)\. .+\. .+(\d+:\d+–\d+|Wiley|article \d+)\.$/);
      const [, authors, year] = /^- (\S+)[^(]* \((\d{4})\)/.exec(reference)!;
      expect(methods.split("### References")[0], `${authors} ${year} is cited in the text`).toMatch(new RegExp(`${authors.replace(/,$/, "")}[^()]*${year}`));
    }
  });

  it("results.md: a paragraph per contrast above the tables, its regions, β, t, p and p_FWE those of nodes.tsv, directions in words", () => {
    const markdown = read(out, "results.md");
    const summary = JSON.parse(read(out, "summary.json"));
    expect(markdown).not.toContain("`");
    expect(markdown.indexOf("## Results (draft)")).toBeLessThan(markdown.indexOf("**Table 1. "));
    const directions: Record<string, string> = {
      patient_gt_control: "strength was greater in the patient group than in the control group",
      age_down: "strength decreased with age",
    };
    let named = 0;
    summary.contrasts.forEach((contrast: { name: string; df: number; significant_fwe: number; significant_fdr: number }) => {
      const text = paragraph(markdown, contrast.name);
      expect(text, contrast.name).not.toBe("");
      expect(pluralMistakes(text)).toEqual([]);
      expect(text).not.toMatch(/\b(positive|negative)\b/);
      expect(text).toContain("in this sample");
      const nodes = readTable(path.join(out, contrast.name, "nodes.tsv"));
      const pFwe = numberColumn(nodes, "p_fwe");
      const hits = nodes.rows.map((_, i) => i).filter((i) => pFwe[i] <= ALPHA);
      expect(hits.length, "summary.json's significant_fwe").toBe(contrast.significant_fwe);
      if (hits.length === 0) {
        expect(text).toContain(`no region's strength reached p_FWE ≤ ${ALPHA} in this sample`);
      } else {
        expect(text).toContain(`${WORDS[hits.length] ?? hits.length} of the ${REGIONS} regions reached p_FWE ≤ ${ALPHA} in this sample`);
        expect(text).toContain(directions[contrast.name]);
      }
      for (const i of hits) {
        const cell = (column: string) => numberColumn(nodes, column)[i];
        const numbers = `β = ${prose(significant(cell("estimate")))}, t(${contrast.df}) = ${prose(fixed(cell("statistic"), 2))}, ${pIs("p", cell("p_unc"))}, ${pIs("p_FWE", cell("p_fwe"))}`;
        expect(text, `${contrast.name} ${nodes.rows[i][0]}`).toContain(`${plainMarkdown(nodes.rows[i][0])} (${numbers})`);
        named += 1;
      }
      const fdr = numberColumn(nodes, "q_fdr").filter((q) => q <= ALPHA).length;
      expect(fdr).toBe(contrast.significant_fdr);
      expect(text).toContain(`Region by region, ${fdr === 0 ? "no region" : fdr === 1 ? "1 region" : `${fdr} regions`} had q_FDR ≤ ${ALPHA} (false discovery rate).`);
    });
    // The planted effect makes at least one region significant, so the listing above was exercised.
    expect(named).toBeGreaterThan(0);
    expect(markdown).toContain("These are associations in this sample, not evidence of cause.");
  });

  it("report.html is self-contained: no URL but the SVG namespaces, no external src or href, a policy that forbids requests", () => {
    const html = read(out, "report.html");
    const urls = html.match(/https?:\/\/[^\s"'<>)]+/g) ?? [];
    expect(urls.filter((url) => url !== "http://www.w3.org/2000/svg" && url !== "http://www.w3.org/1999/xlink")).toEqual([]);
    expect(html).not.toMatch(/\ssrc\s*=/i);
    expect((html.match(/\shref\s*=\s*"([^"]*)"/gi) ?? []).filter((href) => !/href="#/.test(href))).toEqual([]);
    expect(html).not.toMatch(/<link\b|@import|url\(/i);
    expect(html).toContain(`content="default-src 'none'; style-src 'unsafe-inline'; img-src data:; script-src 'sha256-`);
    expect(html).toContain("Research use only.");
    expect(html).toContain("ethics approval");
  });

  it("report.html keeps the hostile region label inert: escaped in markup, JSON-escaped in the one data element", () => {
    const html = read(out, "report.html");
    expect(html).not.toContain(HOSTILE);
    expect(html.match(/<script\b/g)).toHaveLength(2);
    expect(html.match(/<\/script>/g)).toHaveLength(2);
    const data = /<script type="application\/json" id="plexus-data">([^<]*)<\/script>/.exec(html);
    expect(data).not.toBeNull();
    expect(JSON.parse(data![1]).regions).toContain(HOSTILE);
    expect(html).toContain("&lt;/script&gt;&lt;script&gt;document.title=&#39;owned&#39;&lt;/script&gt;");
  });

  it("report.html shows the same results paragraphs, methods and tables as the Markdown files", () => {
    const html = read(out, "report.html");
    const markdown = read(out, "results.md");
    for (const name of ["patient_gt_control", "age_down"]) {
      const opening = paragraph(markdown, name).slice(0, 60);
      expect(html).toContain(escapeHtml(opening));
    }
    expect(html).toContain("<h2>Methods</h2>");
    expect(html).toContain("Rubinov M, Sporns O (2010). Complex network measures of brain connectivity");
    expect(html.match(/<caption>Table \d+\. Nodal strength, /g)).toHaveLength(2);
  });
});

describe("singular and plural, a single measure, an excluded participant, one contrast", () => {
  it("global strength: one contrast, one excluded participant, the numbers of measures.tsv", async () => {
    const cohort = path.join(root, "cohort");
    const participants = path.join(root, "participants-one-missing.tsv");
    const [header, first, ...rest] = readFileSync(path.join(cohort, "participants.tsv"), "utf8").trimEnd().split("\n");
    const age = header.split("\t").indexOf("age");
    writeFileSync(participants, [header, first.split("\t").map((cell, k) => (k === age ? "n/a" : cell)).join("\t"), ...rest, ""].join("\n"));
    const file = writeDesignFile(
      path.join(root, "one-contrast.yaml"),
      groupDesignLines({
        cohort: "cohort",
        regions: true,
        model: "group + age",
        contrasts: ["patient_gt_control: group[patient] - group[control]"],
        inference: ["method: max-t", "permutations: 99", "seed: 5"],
      }).map((line) => (line.startsWith("subjects:") ? "subjects: participants-one-missing.tsv" : line)),
    );
    const out = await strength("global-one", ["--measure", "global"], file);
    const methods = read(out, "methods.md");
    const summary = JSON.parse(read(out, "summary.json"));
    expect(pluralMistakes(methods)).toEqual([]);
    expect(methods).not.toContain("`");
    expect(methods).toContain(`(1 of the ${summary.subjects.in_table} participants listed was excluded for missing values: missing age)`);
    expect(methods).toContain("One contrast was tested with a t-statistic for global strength");
    expect(methods).toContain("The contrast's estimate was thus adjusted for age.");
    expect(methods).toContain("a single measure, so no correction across measures was needed");
    expect(methods).not.toContain("without correction across contrasts");
    const measures = readTable(path.join(out, "patient_gt_control", "measures.tsv"));
    const cell = (column: string) => numberColumn(measures, column)[0];
    const text = paragraph(read(out, "results.md"), "patient_gt_control");
    expect(pluralMistakes(text)).toEqual([]);
    const numbers = `β = ${prose(significant(cell("beta")))}, t(${cell("df")}) = ${prose(fixed(cell("t"), 2))}, ${pIs("p", cell("p_unc"))}, ${pIs("p_FWE", cell("p_fwe"))}`;
    expect(text).toContain(`(${numbers})`);
    expect(text).toMatch(cell("p_fwe") <= 0.05 ? /global strength was greater in the patient group than in the control group in this sample/ : /global strength did not reach p_FWE ≤ 0\.05 in this sample/);
    // The report of a global measure: no figure, one table.
    const html = read(out, "report.html");
    expect(html).not.toContain("<figure");
    expect(html.match(/<caption>Table \d+\. Global strength, /g)).toHaveLength(1);
  });

  it("subnetwork strength: every measure's numbers as measures.tsv prints them", async () => {
    const out = await strength("subnetworks", ["--system", readTable(path.join(root, "cohort", "regions.tsv")).rows[1][readTable(path.join(root, "cohort", "regions.tsv")).header.indexOf("system")], "--pairs", path.join(root, "cohort", "planted.tsv")]);
    const markdown = read(out, "results.md");
    const methods = read(out, "methods.md");
    expect(pluralMistakes(methods)).toEqual([]);
    expect(methods).toContain("the strength of two subnetworks was computed as the mean of the edge weights over each one's edges");
    for (const name of ["patient_gt_control", "age_down"]) {
      const text = paragraph(markdown, name);
      expect(pluralMistakes(text)).toEqual([]);
      const measures = readTable(path.join(out, name, "measures.tsv"));
      measures.rows.forEach((row, m) => {
        const cell = (column: string) => numberColumn(measures, column)[m];
        const numbers = `t(${cell("df")}) = ${prose(fixed(cell("t"), 2))}, ${pIs("p", cell("p_unc"))}, ${pIs("p_FWE", cell("p_fwe"))}`;
        const edges = `${row[measures.header.indexOf("edges")]} edges`;
        // A significant measure: its name and edges, the direction, then β and the rest; any other: all in one parenthesis.
        if (cell("p_fwe") <= ALPHA) {
          expect(text).toMatch(new RegExp(`In ${plainMarkdown(row[0])} \\(${edges}\\), mean connectivity (was greater|decreased|increased) `));
          expect(text).toContain(`(β = ${prose(significant(cell("beta")))}, ${numbers})`);
        } else {
          expect(text).toContain(`${plainMarkdown(row[0])} (${edges}; ${numbers})`);
        }
      });
    }
  });
});

describe("the nodal figure, when figures/nodalFigure.ts draws one", () => {
  it("is written at both widths as SVG and PNG and shown in report.html, drawn from the nodes.tsv statistics", async () => {
    const prepared = prepareAnalysis(design);
    const analysis = await analyzeStrength(prepared, { measure: "nodal", positiveOnly: false, mean: false, sets: [] }, { threads: 1, chunkSize: 250 });
    const seen: { statistic: number[]; significant: boolean[] }[] = [];
    // A stand-in drawing: one text line per region, at the width asked for.
    const standIn: NodalDrawing = (regions, values, title, width) => {
      seen.push({ statistic: Array.from(values.statistic), significant: Array.from(values.significant) });
      return printSvgDocument(width, 40 + 10 * regions.length, title, [`<text x="10" y="20" font-size="8">${width}</text>`]);
    };
    const input = { prepared, analysis, warnings: [], inputs: [], command: null };
    const content = strengthReportContent(input, standIn);
    const files = strengthReportFiles(input, content);
    for (const name of ["patient_gt_control", "age_down"]) {
      for (const suffix of ["-180mm.svg", "-85mm.svg"]) expect(String(files.get(`figures/${name}-nodal${suffix}`))).toContain("<svg");
      for (const suffix of ["-180mm.png", "-85mm.png"]) expect(Array.from((files.get(`figures/${name}-nodal${suffix}`) as Uint8Array).slice(1, 4))).toEqual([0x50, 0x4e, 0x47]);
    }
    expect(String(files.get("figures/patient_gt_control-nodal-180mm.svg"))).toContain(">double<");
    expect(String(files.get("figures/patient_gt_control-nodal-85mm.svg"))).toContain(">single<");
    const html = String(files.get("report.html"));
    expect(html.match(/<figure data-contrast="\d" data-figure="nodal">/g)).toHaveLength(2);
    expect(html).toContain("figures/age_down-nodal-180mm.svg; also at 85 mm, and as PNG");
    // The values drawn are the analysis' statistics, the marked regions those with p_FWE ≤ alpha.
    analysis.contrasts.forEach((result, k) => {
      expect(seen[2 * k].statistic).toEqual(Array.from(result.statistics.statistic));
      expect(seen[2 * k].significant).toEqual(Array.from(result.familywise!.pFwe, (p) => p <= ALPHA));
    });
  });
});

describe("the nodal paragraph's wording for both directions and many regions", () => {
  it("groups the regions by direction in words, names at most NAMED_REGIONS and counts the rest", async () => {
    const prepared = prepareAnalysis(design);
    const analysis = await analyzeStrength(prepared, { measure: "nodal", positiveOnly: false, mean: false, sets: [] }, { threads: 1, chunkSize: 250 });
    const result = analysis.contrasts[0];
    // Stand-in results (the wording is under test, not the statistics): 12 regions at p_FWE ≤ alpha,
    // the first 9 with a positive t, the next 3 with a negative t, the t falling with the region index.
    const statistic = Float64Array.from(result.statistics.statistic, (_, i) => (i < 9 ? 6 - 0.1 * i : i < 12 ? -(6 - 0.1 * i) : 0.5));
    const p = Float64Array.from(statistic, (t) => (Math.abs(t) > 1 ? 0.001 : 0.6));
    const changed = { ...result, statistics: { ...result.statistics, statistic }, pUncorrected: p, qFdr: p, familywise: { ...result.familywise!, pFwe: p } };
    const text = strengthResultsText(prepared, { ...analysis, contrasts: [changed, analysis.contrasts[1]] });
    const paragraph = segmentsMarkdown(text.paragraphs[0]);
    const label = (i: number) => plainMarkdown(prepared.regions[i].label);
    expect(paragraph).toContain("12 of the 16 regions reached p_FWE ≤ 0.05 in this sample.");
    expect(paragraph).toContain(" In nine, strength was greater in the patient group than in the control group: ");
    expect(paragraph).toContain(" In three, strength was greater in the control group than in the patient group: ");
    expect(paragraph).not.toMatch(/\b(positive|negative)\b/);
    // The first NAMED_REGIONS in order of p are named (nine up, then one down), the other two counted.
    expect(NAMED_REGIONS).toBe(10);
    for (let i = 0; i < 10; i++) expect(paragraph, `region ${i}`).toContain(`${label(i)} (β = `);
    for (const i of [10, 11]) expect(paragraph).not.toContain(`${label(i)} (β = `);
    expect(paragraph).toContain(`${label(9)} (β = ${prose(significant(result.statistics.estimate[9]))}, t(${result.statistics.df}) = −5.10, p = 0.001, p_FWE = 0.001); 2 more are listed in Table 1.`);
    expect(paragraph).toContain("Region by region, 12 regions had q_FDR ≤ 0.05 (false discovery rate).");
  });
});
