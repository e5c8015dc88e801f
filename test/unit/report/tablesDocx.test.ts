// tables.docx opened as Word opens it: a zip package (unzipped with fflate) whose
// word/document.xml (checked well-formed with fast-xml-parser) holds one <w:tbl> per print
// table. Every cell of every table is compared with the TSV twins under tables/ (the
// printed number must be the TSV's full-precision value rounded to the digits printed),
// every caption with "Table n. title", every note with the table's notes. tables.md is
// checked as plain text: no HTML entity, no backslash before an underscore inside a word.
import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parseTsv } from "../../../src/io/tsv.js";
import { loadResults } from "../../../src/output/report/loadResults.js";
import { reportContent, type ReportContent } from "../../../src/output/report/reportContent.js";
import { allReportFiles } from "../../../src/output/report/writeReport.js";
import { escapeMarkdown } from "../../../src/output/report/escapeMarkdown.js";
import { expectRounded, numbers, readTables } from "../../helpers/docxTables.js";
import { analysedCohort, FORMULA_ID, FORMULA_SITE, GOLDEN_DESIGN, HTML_LABEL, type AnalysedCohort } from "./reportCohort.js";

const FDR_DESIGN = [
  "model: group + age + sex + site",
  "levels:",
  "  group: [control, patient]",
  "contrasts:",
  "  patient_gt_control: group[patient] - group[control]",
  "transform: fisher-z",
  "inference:",
  "  method: fdr",
  "  alpha: 0.05",
  "",
].join("\n");

interface Opened {
  files: Map<string, string | Uint8Array>;
  content: ReportContent;
  /** Each table of document.xml: the paragraph text before it (the caption), its rows of cell texts, the paragraphs after it up to the next caption. */
  tables: { caption: string; rows: string[][]; after: string[] }[];
  tsv: (name: string) => { header: string[]; rows: string[][] };
}

async function open(cohort: AnalysedCohort): Promise<Opened> {
  const results = loadResults(cohort.results);
  const files = await allReportFiles(results);
  const docx = files.get("tables.docx");
  expect(docx).toBeInstanceOf(Uint8Array);
  const tables = readTables(docx as Uint8Array);
  const tsv = (name: string) => {
    const table = parseTsv(files.get(`tables/${name}.tsv`) as string, `${name}.tsv`);
    // A cell that a spreadsheet would run as a formula is written with a leading apostrophe.
    const plain = (cell: string) => (/^'[=+\-@]/.test(cell) ? cell.slice(1) : cell);
    return { header: table.header, rows: table.rows.map((row) => row.map(plain)) };
  };
  return { files, content: reportContent(results), tables, tsv };
}


function checkEdges(opened: Opened, contrast: string, table: Opened["tables"][number]): number {
  const twin = opened.tsv("subnetwork_edges");
  const col = (name: string) => twin.header.indexOf(name);
  const rows = twin.rows.filter((row) => row[col("contrast")] === contrast);
  const [header, ...body] = table.rows;
  // Which TSV columns each printed column shows, number by number.
  const sources: Record<string, string[]> = {
    Subnetwork: ["component"],
    t: ["statistic"],
    F: ["statistic"],
    "Estimate [95% CI]": ["estimate", "ci_low", "ci_high"],
    Estimate: ["estimate"],
    "Cohen's d [95% CI]": ["cohens_d", "cohens_d_ci_low", "cohens_d_ci_high"],
    "Partial r": ["partial_r"],
    "Partial η²": ["partial_eta_squared"],
    "p (unc.)": ["p_unc"],
    q_FDR: ["q_fdr"],
    "p_FWE (edge)": ["p_fwe"],
  };
  const text: Record<string, string> = { "Region A": "region_a", "Region B": "region_b", "System A": "system_a", "System B": "system_b" };
  let checked = 0;
  body.forEach((cells, r) => {
    header.forEach((name, k) => {
      const label = `${contrast} edge ${r + 1}, ${name}`;
      if (text[name]) expect(cells[k], label).toBe(rows[r][col(text[name])]);
      else if (name.startsWith("r: ")) numbers(cells[k]).forEach((n, i) => expectRounded(n, rows[r][col(i === 0 ? "r_level_1" : "r_level_2")], label));
      else {
        expect(sources[name], `${name} has a TSV source`).toBeDefined();
        const printed = numbers(cells[k]);
        expect(printed.length, label).toBe(printed[0] === "—" ? 1 : sources[name].length);
        printed.forEach((n, i) => expectRounded(n, rows[r][col(sources[name][i])], label));
      }
      checked++;
    });
  });
  return checked;
}

function checkHubs(opened: Opened, contrast: string, table: Opened["tables"][number]): number {
  const twin = opened.tsv("hubs");
  const col = (name: string) => twin.header.indexOf(name);
  const rows = twin.rows.filter((row) => row[col("contrast")] === contrast);
  const [header, ...body] = table.rows;
  const names: Record<string, string> = { Subnetwork: "component", Region: "region", Hemisphere: "hemisphere", System: "system", Degree: "degree" };
  let checked = 0;
  body.forEach((cells, r) =>
    header.forEach((name, k) => {
      const label = `${contrast} hub ${r + 1}, ${name}`;
      if (name.startsWith("Σ|")) expectRounded(cells[k], rows[r][col("strength")], label);
      else expect(cells[k], label).toBe(rows[r][col(names[name])]);
      checked++;
    }),
  );
  return checked;
}

function checkSubnetworks(opened: Opened, table: Opened["tables"][number]): number {
  const twin = opened.tsv("subnetworks");
  const col = (name: string) => twin.header.indexOf(name);
  const [header, ...body] = table.rows;
  let checked = 0;
  for (const cells of body.filter((row) => row[1] !== "none")) {
    const at = (name: string) => cells[header.indexOf(name)];
    const row = twin.rows.find((r) => r[col("contrast")] === at("Contrast") && (r[col("direction")] === "" ? `${r[col("component")]}` : `${r[col("component")]} (${r[col("direction")]})`) === at("Subnetwork"));
    expect(row, `subnetwork ${at("Contrast")} ${at("Subnetwork")} in subnetworks.tsv`).toBeDefined();
    expect(at("Threshold")).toContain(row![col("threshold")]);
    expect(at("Size measure")).toBe(row![col("size_measure")]);
    expect(at("Extent")).toBe(row![col("extent")]);
    expect(at("Nodes")).toBe(row![col("nodes")]);
    expectRounded(at("Mass"), row![col("mass")], "mass");
    const p = numbers(at("p_FWE"));
    ["p_fwe", "p_fwe_low", "p_fwe_high"].slice(0, p.length).forEach((name, i) => expectRounded(p[i], row![col(name)], name));
    expect(at("Permutations")).toContain(row![col("permutations")]);
    checked += header.length;
  }
  return checked;
}

function checkCohort(opened: Opened, table: Opened["tables"][number]): number {
  const twin = opened.tsv("cohort");
  const tests = opened.tsv("cohort_tests");
  const col = (name: string) => twin.header.indexOf(name);
  const testCol = (name: string) => tests.header.indexOf(name);
  const [header, ...body] = table.rows;
  const groups = header.slice(1, -2).map((h) => h.replace(/ \(n = \d+\)$/, ""));
  header.slice(1, -2).forEach((h, g) => {
    const row = twin.rows.find((r) => r[col("variable")] === "participants" && r[col("group")] === groups[g])!;
    expect(h).toBe(`${groups[g]} (n = ${row[col("n")]})`);
  });
  let variable = "";
  let checked = 0;
  for (const cells of body) {
    const indented = opened.content.tables[0].table.rows.find((row) => row.cells[0] === cells[0])?.indent === true;
    if (!indented) variable = cells[0].split(",")[0];
    groups.forEach((group, g) => {
      const cell = cells[1 + g];
      const label = `cohort ${cells[0]}, ${group}`;
      if (variable === "Participants") {
        expect(cell).toBe(twin.rows.find((r) => r[col("variable")] === "participants" && r[col("group")] === group)![col("n")]);
      } else if (indented) {
        const row = twin.rows.find((r) => r[col("variable")] === variable && r[col("level")] === cells[0] && r[col("group")] === group)!;
        const [count, percent] = numbers(cell);
        expect(count, label).toBe(row[col("count")]);
        expectRounded(percent, row[col("percent")], label);
      } else if (cell !== "") {
        const row = twin.rows.find((r) => r[col("variable")] === variable && r[col("group")] === group)!;
        const [mean, sd] = numbers(cell);
        expectRounded(mean, row[col("mean")], `${label} mean`);
        expectRounded(sd, row[col("sd")], `${label} sd`);
      }
      checked++;
    });
    const test = tests.rows.find((r) => r[testCol("variable")] === variable);
    if (!indented && test) {
      const p = cells[cells.length - 1];
      expectRounded(p, test[testCol("p_value")], `${variable} p`);
      const stat = cells[cells.length - 2].match(/= (-?[\d.]+), df = ([\d.]+)/);
      if (stat) {
        expectRounded(stat[1], test[testCol("statistic")], `${variable} statistic`);
        expectRounded(stat[2], test[testCol("df")], `${variable} df`);
      }
      checked += 2;
    }
  }
  return checked;
}

function checkExcluded(opened: Opened, table: Opened["tables"][number]): number {
  const twin = opened.tsv("excluded");
  expect(table.rows.slice(1)).toEqual(twin.rows);
  return twin.rows.flat().length;
}

describe.each([
  ["components (golden design)", GOLDEN_DESIGN],
  ["FDR", FDR_DESIGN],
])("tables.docx against the TSV twins: %s", (_, design) => {
  let cohort: AnalysedCohort;
  let opened: Opened;
  beforeAll(async () => {
    cohort = await analysedCohort({ design });
    opened = await open(cohort);
  });
  afterAll(() => cohort?.remove());

  it("holds every print table, in order, with its caption, header, cells and notes as the report builds them", () => {
    expect(opened.tables.length).toBe(opened.content.tables.length);
    opened.content.tables.forEach(({ table, number }, k) => {
      const word = opened.tables[k];
      expect(word.caption).toBe(`Table ${number}. ${table.title}`);
      expect(word.rows[0]).toEqual(table.columns.map((c) => c.header));
      expect(word.rows.slice(1)).toEqual(table.rows.map((row) => row.cells));
      expect(word.after).toEqual(table.notes);
    });
  });

  it("every cell agrees with the full-precision TSV twin, rounded as printed", () => {
    let checked = 0;
    opened.content.tables.forEach(({ table, contrast }, k) => {
      const word = opened.tables[k];
      if (table.id === "cohort") checked += checkCohort(opened, word);
      else if (table.id === "excluded") checked += checkExcluded(opened, word);
      else if (table.id === "subnetworks") checked += checkSubnetworks(opened, word);
      else if (table.id.startsWith("edges-")) checked += checkEdges(opened, contrast!, word);
      else if (table.id.startsWith("hubs-")) checked += checkHubs(opened, contrast!, word);
      else throw new Error(`no TSV check for table ${table.id}`);
    });
    expect(checked).toBeGreaterThan(50);
  });

  it("keeps hostile labels as plain text (XML-escaped in the package, shown as written)", () => {
    const text = opened.tables.flatMap((t) => t.rows.flat()).join("\n");
    if (design === GOLDEN_DESIGN) {
      expect(text).toContain(HTML_LABEL);
      expect(text).toContain(FORMULA_ID);
      expect(text).toContain(FORMULA_SITE);
    }
  });

  it("is the same bytes when written again (fixed timestamps, no clock)", async () => {
    const again = await allReportFiles(loadResults(cohort.results));
    expect(Buffer.from(again.get("tables.docx") as Uint8Array).equals(Buffer.from(opened.files.get("tables.docx") as Uint8Array))).toBe(true);
  });

  it("tables.md reads as plain text: no HTML entity, no backslash before an underscore inside a word, levels indented by an em space", () => {
    const md = opened.files.get("tables.md") as string;
    expect(md).not.toMatch(/&(#\d+|#x[0-9a-f]+|[a-z]+);/i);
    expect(md).not.toMatch(/[\p{L}\p{N}]\\_[\p{L}\p{N}]/u);
    expect(md).not.toContain("\\[");
    if (design === GOLDEN_DESIGN) {
      expect(md).toContain("| \u2003F |");
      expect(md).toContain("p_FWE");
      expect(md).toContain("| < 0.001 |");
    } else {
      expect(md).toContain("q_FDR");
    }
  });
});

describe("the golden tables.docx read by python-docx (test/fixtures/docx/read_tables_docx.py, Debian python3-docx)", () => {
  const here = dirname(fileURLToPath(import.meta.url));
  const golden = readFileSync(join(here, "..", "..", "golden", "report", "tables.docx"));
  const reference = JSON.parse(readFileSync(join(here, "..", "..", "fixtures", "docx", "golden_tables_docx.json"), "utf8")) as {
    sha256: string;
    created: string;
    modified: string;
    captions: string[];
    tables: string[][][];
  };

  it("the fixture was read from the golden file as it is now (else rerun the script)", () => {
    expect(createHash("sha256").update(golden).digest("hex"), "rerun /usr/bin/python3 test/fixtures/docx/read_tables_docx.py").toBe(reference.sha256);
  });

  it("python-docx opens it and finds the same captions and every cell this test's zip + XML reader finds; the dates are the fixed ones", () => {
    const ours = readTables(golden);
    expect(ours.map((t) => t.caption)).toEqual(reference.captions);
    expect(ours.map((t) => t.rows)).toEqual(reference.tables);
    expect(reference.created).toBe("1980-01-01T00:00:00");
    expect(reference.modified).toBe("1980-01-01T00:00:00");
  });
});

describe("escapeMarkdown escapes only what Markdown reads as markup", () => {
  it.each([
    ["L_Cont_1", "cell", "L_Cont_1"],
    ["_lead and trail_", "cell", "\\_lead and trail\\_"],
    ["t > 3, p < 0.001, ≤ ≥", "cell", "t > 3, p < 0.001, ≤ ≥"],
    [HTML_LABEL, "cell", "\\<script>alert(1)\\</script>"],
    ["a | b", "cell", "a \\| b"],
    ["a | b", "paragraph", "a | b"],
    ["0.002 [0, 0.0092]", "cell", "0.002 [0, 0.0092]"],
    ["[x](y)", "cell", "[x\\](y)"],
    ["Σ|t| * 2, a*b*", "paragraph", "Σ|t| * 2, a\\*b\\*"],
    ["`code` $x$", "cell", "\\`code\\` \\$x\\$"],
    ["&amp; & co", "cell", "\\&amp; & co"],
    ["C:\\data\\*", "cell", "C:\\data\\\\\\*"],
    ["* At least one", "paragraph", "\\* At least one"],
    ["- item", "paragraph", "\\- item"],
    ["-0.82 and # 1", "paragraph", "-0.82 and # 1"],
    ["# heading", "paragraph", "\\# heading"],
    ["> quote", "paragraph", "\\> quote"],
    ["1. first", "paragraph", "1\\. first"],
    ["=cmd", "cell", "=cmd"],
    ["two\nlines", "cell", "two lines"],
  ] as const)("%j (%s) → %j", (text, where, expected) => {
    expect(escapeMarkdown(text, where)).toBe(expected);
  });
});
