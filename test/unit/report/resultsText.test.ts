// The text builders of methods.md and results.md. The numbers in results.md are compared with
// the results folder's own files (components.tsv, edges.tsv, summary.json), whose values are
// checked against R elsewhere (test/cli/effectSizes.test.ts, test/unit/run/repeatedDesigns.test.ts,
// the golden test); here the check is that the text repeats them exactly, in print form.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parseTsv } from "../../../src/io/tsv.js";
import { loadResults, type ContrastSummary, type LoadedResults, type ResultsSummary } from "../../../src/output/report/loadResults.js";
import { methodsMarkdown, methodsText, plainMarkdown, segmentsMarkdown } from "../../../src/output/report/methodsText.js";
import { pValue, significant } from "../../../src/output/report/printNumbers.js";
import { resultsMarkdown, resultsText } from "../../../src/output/report/resultsText.js";
import { contrastDirection } from "../../../src/output/report/contrastDirection.js";
import { reportFiles } from "../../../src/output/report/writeReport.js";
import { analysedCohort, GOLDEN_DESIGN, HTML_LABEL, type AnalysedCohort } from "./reportCohort.js";

let cohort: AnalysedCohort;
let results: LoadedResults;

beforeAll(async () => {
  cohort = await analysedCohort({ design: GOLDEN_DESIGN });
  results = loadResults(cohort.results);
});
afterAll(() => cohort?.remove());

const words = (direction: ReturnType<typeof contrastDirection>, sign: "positive" | "negative") =>
  direction ? segmentsMarkdown(direction[sign]) : null;

/** A summary with the given design and one t contrast (only what contrastDirection reads). */
function designOf(columns: string[], levels: Record<string, string[]>, vector: number[], repeated?: ResultsSummary["repeated"]) {
  const summary = {
    design: { model: "", intercept: true, columns, coding: "treatment", levels, centered: {}, rank: columns.length },
    repeated,
  } as unknown as ResultsSummary;
  const contrast = { name: "c", expression: "e", statistic: "t", vector } as unknown as ContrastSummary;
  return contrastDirection(summary, contrast);
}

describe("direction of a contrast in words", () => {
  it("two levels of a factor: against the reference level, and one level minus another", () => {
    const levels = { group: ["control", "patient"], sex: ["F", "M"] };
    const columns = ["intercept", "group[patient]", "age", "sex[M]"];
    expect(words(designOf(columns, levels, [0, 1, 0, 0]), "positive")).toBe("connectivity was greater in the patient group than in the control group");
    expect(words(designOf(columns, levels, [0, 1, 0, 0]), "negative")).toBe("connectivity was greater in the control group than in the patient group");
    expect(words(designOf(columns, levels, [0, -1, 0, 0]), "positive")).toBe("connectivity was greater in the control group than in the patient group");
    const three = { site: ["a", "b", "c"] };
    expect(words(designOf(["intercept", "site[b]", "site[c]"], three, [0, -1, 1]), "positive")).toBe("connectivity was greater in the c group than in the b group");
  });

  it("a numeric covariate: increased or decreased with it", () => {
    const columns = ["intercept", "age", "recall_score"];
    expect(words(designOf(columns, {}, [0, 1, 0]), "positive")).toBe("connectivity increased with age");
    expect(words(designOf(columns, {}, [0, 1, 0]), "negative")).toBe("connectivity decreased with age");
    expect(words(designOf(columns, {}, [0, 0, -1]), "positive")).toBe("connectivity decreased with recall_score");
  });

  it("one-sample, paired differences and a within-person factor", () => {
    expect(words(designOf(["intercept"], {}, [1]), "positive")).toBe("connectivity was greater than zero");
    const repeated = { participant: "person", within: "session", levels: ["pre", "post"], design: "paired differences" } as ResultsSummary["repeated"];
    const change = ["session[post] - session[pre]", "arm[treated]", "age"];
    const levels = { session: ["pre", "post"], arm: ["waitlist", "treated"] };
    expect(words(designOf(change, levels, [1, 0, 0], repeated), "positive")).toBe("connectivity was greater at post than at pre");
    expect(words(designOf(change, levels, [0, 1, 0], repeated), "positive")).toBe(
      "the change in connectivity from pre to post was greater in the treated group than in the waitlist group",
    );
    const sessions = { participant: "person", within: "session", levels: ["baseline", "week6"], design: "repeated measures" } as ResultsSummary["repeated"];
    expect(words(designOf(["person[t01]", "person[t02]", "session[week6]"], { session: ["baseline", "week6"] }, [0, 0, 1], sessions), "positive")).toBe(
      "connectivity was greater at week6 than at baseline",
    );
  });

  it("an F contrast has no direction; another form is said by its sign", () => {
    const summary = { design: { columns: ["intercept", "a:b"], levels: {}, coding: "treatment" } } as unknown as ResultsSummary;
    expect(contrastDirection(summary, { name: "f", expression: "x", statistic: "F", vector: [[0, 1]] } as unknown as ContrastSummary)).toBeNull();
    expect(words(designOf(["intercept", "a:b"], {}, [0, 1]), "positive")).toBe("the contrast e was positive");
  });
});

describe("results.md on the golden cohort", () => {
  it("repeats components.tsv's extent, nodes and p_FWE with its interval for every significant subnetwork", () => {
    const text = resultsMarkdown(resultsText(results));
    let checked = 0;
    for (const contrast of results.summary.contrasts) {
      const table = parseTsv(readFileSync(join(cohort.results, contrast.name, "components.tsv"), "utf8"), "components.tsv");
      const column = (name: string) => table.header.indexOf(name);
      for (const row of table.rows) {
        const p = Number(row[column("p_fwe")]);
        if (!(p <= results.summary.options.inference.alpha)) continue;
        const extent = Number(row[column("extent")]);
        const nodes = Number(row[column("nodes")]);
        const interval = `${significant(Number(row[column("p_fwe_low")]), 2)} to ${significant(Number(row[column("p_fwe_high")]), 2)}`;
        expect(text).toContain(`(${extent} edges among ${nodes} regions; p_FWE = ${pValue(p)}, 95% interval ${interval})`);
        checked += 1;
      }
    }
    expect(checked).toBeGreaterThan(0);
  });

  it("gives each contrast's FDR count as summary.json and edges.tsv have it, the direction in words, and cautious wording", () => {
    const text = resultsMarkdown(resultsText(results));
    const summary = JSON.parse(readFileSync(join(cohort.results, "summary.json"), "utf8")) as ResultsSummary;
    for (const contrast of summary.contrasts) {
      const edges = parseTsv(readFileSync(join(cohort.results, contrast.name, "edges.tsv"), "utf8"), "edges.tsv");
      const q = edges.header.indexOf("q_fdr");
      const count = edges.rows.filter((row) => row[q] !== "" && Number(row[q]) <= summary.options.inference.alpha).length;
      expect(contrast.significant_edges_fdr).toBe(count);
      const paragraph = text.split("\n\n").find((p) => p.startsWith(`For the contrast ${contrast.name} `))!;
      expect(paragraph).toContain(count === 0 ? "no edge had q_FDR ≤ 0.05" : `${count} edge${count === 1 ? "" : "s"} had q_FDR ≤ 0.05`);
    }
    expect(text).toContain("connectivity was greater in the patient group than in the control group");
    expect(text).toContain("in this sample");
    expect(text).toContain("not evidence of cause");
    expect(text).not.toMatch(/\b(caus(es|ed)|leads? to|drives?)\b/);
  });

  it("names the regions with most edges, with the hostile label escaped, and no code formatting anywhere", () => {
    const files = reportFiles(results);
    const text = files.get("results.md")!;
    expect(text).toMatch(/the regions? with most edges in it (was|were) /);
    expect(text).toMatch(/belonged to the .* systems?|spanned \d+ systems/);
    expect(text).not.toContain(HTML_LABEL);
    for (const name of ["results.md", "methods.md"]) expect(files.get(name), name).not.toContain("`");
    expect(files.get("report.html")).toContain('<section id="results-text">');
    const html = files.get("report.html")!;
    const methods = html.slice(html.indexOf('<section id="methods">'), html.indexOf('<section id="provenance">'));
    expect(methods).not.toContain("<code>");
  });
});

describe("methods text: singular and plural, references", () => {
  it("says 1 column, 1 participant was excluded, 1 residual degree of freedom", () => {
    const one = structuredClone({ ...results, dir: results.dir }) as LoadedResults;
    one.summary.design.columns = ["intercept"];
    one.summary.design.rank = 1;
    one.summary.design.levels = {};
    one.summary.df = 1;
    one.summary.subjects.excluded = one.summary.subjects.excluded.slice(0, 1);
    const text = methodsMarkdown(methodsText(one));
    expect(text).toContain("The design matrix had 1 column (intercept), leaving 1 residual degree of freedom.");
    expect(text).toMatch(/\(1 of the \d+ participants listed was excluded: [^)]+\)/);
    expect(text).not.toMatch(/\b1 (columns|edges|participants were|regions)\b/);
  });

  it("gives every reference a title: authors (year). Title. Journal volume:pages, or a book's publisher (and a chapter's pages)", () => {
    const { references } = methodsText(results);
    expect(references.length).toBeGreaterThan(3);
    for (const reference of references) {
      expect(reference, reference).toMatch(/^[^()]+ \(\d{4}\)\. [^.]+[.?] .+(\d+:(\d+–\d+|\s?article \d+)|: [A-Z][A-Za-z ]+|, \d+–\d+)\.$/);
    }
  });

  it("escapes only what Markdown acts on in user text", () => {
    expect(plainMarkdown("recall_score")).toBe("recall_score");
    expect(plainMarkdown("group[patient] - group[control]")).toBe("group[patient] - group[control]");
    expect(plainMarkdown("_a*b`<x>")).toBe("\\_a\\*b\\`\\<x\\>");
  });
});
