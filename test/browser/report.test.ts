// report.html in a real browser: Debian's Chromium (/usr/bin/chromium), driven headless by
// playwright-core with a fresh profile and every non-file request refused. The page must
// render with no console error, show every figure and table, show a region label that is
// HTML as text (and run nothing but the report's own script), and its interactions work:
// a tooltip over an edge of the matrix and of the network figure, highlighting a
// subnetwork by a click on its row, sorting a table by a click on a header. A screenshot
// of each state is kept in test-output/report/ (not committed).
// Without /usr/bin/chromium the test is skipped with a message, except under CI (CI set),
// where .ci/run installs Chromium and the test must run.
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import type { BrowserContext, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CHROMIUM, openOffline } from "../helpers/offlinePage.js";
import { loadResults } from "../../src/output/report/loadResults.js";
import { reportContent } from "../../src/output/report/reportContent.js";
import { regionOrder } from "../../src/output/report/figures/regionOrder.js";
import { fixed } from "../../src/output/report/printNumbers.js";
import { RESEARCH_NOTICE } from "../../src/output/report/reportHtml.js";
import { writeReport } from "../../src/output/report/writeReport.js";
import { analysedCohort, GOLDEN_DESIGN, HTML_LABEL, type AnalysedCohort } from "../unit/report/reportCohort.js";

const available = existsSync(CHROMIUM);
const mustRun = Boolean(process.env.CI);
const OUTPUT = join(dirname(fileURLToPath(import.meta.url)), "..", "..", "test-output", "report");

if (!available && !mustRun) {
  console.warn(`report browser test skipped: ${CHROMIUM} is missing (install it with: apt-get install -y chromium); under CI it is required`);
}

describe.skipIf(!available && !mustRun)("report.html in headless Chromium", () => {
  let cohort: AnalysedCohort;
  let profile: string;
  let context: BrowserContext;
  let page: Page;
  const consoleErrors: string[] = [];
  const pageErrors: string[] = [];
  const dialogs: string[] = [];
  const outsideRequests: string[] = [];

  beforeAll(async () => {
    if (!available) throw new Error(`${CHROMIUM} is missing: CI must install Chromium (see .ci/run)`);
    cohort = await analysedCohort({ design: GOLDEN_DESIGN });
    // Systems alternating along the matrix order, so the figures' drawing order differs from the
    // matrix order and the tooltips must map positions back to regions (labels and values unchanged).
    const regionsFile = join(cohort.results, "regions.tsv");
    const [header, ...lines] = readFileSync(regionsFile, "utf8").trimEnd().split("\n");
    const system = header.split("\t").indexOf("system");
    expect(system).toBeGreaterThanOrEqual(0);
    const relabelled = lines.map((line, i) => line.split("\t").map((cell, k) => (k === system ? (i % 2 === 0 ? "even" : "odd") : cell)).join("\t"));
    writeFileSync(regionsFile, [header, ...relabelled, ""].join("\n"));
    await writeReport(cohort.results, (path, text) => {
      mkdirSync(dirname(join(cohort.results, path)), { recursive: true });
      writeFileSync(join(cohort.results, path), text);
    });
    profile = mkdtempSync(join(tmpdir(), "plexus-chromium-profile-"));
    ({ context, page } = await openOffline(profile, pathToFileURL(join(cohort.results, "report.html")).href, { consoleErrors, pageErrors, dialogs, outsideRequests }));
  });

  afterAll(async () => {
    await context?.close();
    if (profile) rmSync(profile, { recursive: true, force: true });
    cohort?.remove();
  });

  it("renders with no console error, no page error, no dialog and no request leaving the file", () => {
    expect(consoleErrors).toEqual([]);
    expect(pageErrors).toEqual([]);
    expect(dialogs).toEqual([]);
    expect(outsideRequests).toEqual([]);
  });

  it("gives every element id once (anchors and table ids are unique)", async () => {
    // A string expression runs in the page (this project's TypeScript has no DOM types).
    const ids = (await page.evaluate("Array.from(document.querySelectorAll('[id]'), (element) => element.id)")) as string[];
    expect(ids.length).toBeGreaterThan(0);
    expect(new Set(ids).size).toBe(ids.length);
  });

  it("shows every figure as an inline SVG with a size, and one per file under figures/", async () => {
    const files = readdirSync(join(cohort.results, "figures")).filter((name) => name.endsWith("-180mm.svg"));
    const figures = page.locator("figure .svg > svg");
    expect(await figures.count()).toBe(files.length);
    for (let k = 0; k < files.length; k++) {
      const box = await figures.nth(k).boundingBox();
      expect(box?.width ?? 0).toBeGreaterThan(100);
      expect(box?.height ?? 0).toBeGreaterThan(100);
    }
    const captions = await page.locator("figcaption").allInnerTexts();
    for (const file of files) expect(captions.some((c) => c.includes(`figures/${file}`)), file).toBe(true);
  });

  it("shows every table, numbered and titled as in tables.md", async () => {
    const content = reportContent(loadResults(cohort.results));
    const expected = content.tables.map(({ number, table }) => `Table ${number}. ${table.title}`);
    const captions = await page.locator("table caption").allInnerTexts();
    expect(captions).toEqual(expected);
    for (const { table } of content.tables) {
      const rows = page.locator(`#table-${table.id} tbody tr`);
      expect(await rows.count(), table.id).toBe(table.rows.length);
    }
  });

  it("shows the HTML region label as text and runs only the report's own script, whose JSON holds the label as data", async () => {
    const cells = await page.locator("td").allInnerTexts();
    expect(cells).toContain(HTML_LABEL);
    expect(await page.locator("script").count()).toBe(2);
    expect(await page.locator('script[type="application/json"]').count()).toBe(1);
    const labels = (await page.evaluate("JSON.parse(document.getElementById('plexus-data').textContent).regions")) as string[];
    expect(labels).toContain(HTML_LABEL);
    const svgText = await page.locator("figure svg text").allTextContents();
    expect(svgText.some((t) => t.includes("<script>"))).toBe(true);
    expect(dialogs).toEqual([]);
  });

  /** The tooltip's text after moving the mouse to (x, y). */
  const tooltipAt = async (x: number, y: number) => {
    await page.mouse.move(x, y);
    const tip = page.locator("#plexus-tooltip");
    await tip.waitFor({ state: "visible" });
    return tip.innerText();
  };
  const screenshot = async (name: string) => {
    mkdirSync(OUTPUT, { recursive: true });
    await page.screenshot({ path: join(OUTPUT, name) });
    expect(existsSync(join(OUTPUT, name))).toBe(true);
  };

  it("shows an edge's regions, t, estimate, p and q over the matrix figure, the HTML label as text", async () => {
    const results = loadResults(cohort.results);
    const content = reportContent(results);
    const k = content.contrasts.findIndex((c) => c.finding.edges.length > 0);
    const { edges } = results.contrasts[k];
    const { order, position } = regionOrder(results.regions);
    expect(order).not.toEqual(order.map((_, k) => k));
    // An edge of the finding that touches the region labelled with HTML.
    const hostile = results.regions.findIndex((r) => r.label === HTML_LABEL);
    const edge = content.contrasts[k].finding.edges.find((e) => edges.regionA[e] === hostile || edges.regionB[e] === hostile)!;
    expect(edge).toBeDefined();
    const grid = page.locator(`figure[data-contrast="${k}"][data-figure="matrix"] g[data-cells]`);
    await grid.scrollIntoViewIfNeeded();
    const box = (await grid.boundingBox())!;
    const cell = box.width / results.regions.length;
    const row = position[edges.regionA[edge]];
    const column = position[edges.regionB[edge]];
    const text = await tooltipAt(box.x + (column + 0.5) * cell, box.y + (row + 0.5) * cell);
    expect(text).toContain(`${results.regions[edges.regionA[edge]].label} – ${results.regions[edges.regionB[edge]].label}`);
    expect(text).toContain(HTML_LABEL);
    expect(text).toContain(`t = ${fixed(edges.statistic[edge], 2)}`);
    expect(text).toMatch(/estimate = .*p \(unc\.\) (= \d|< 0\.001).*q_FDR (= \d|< 0\.001)/s);
    await screenshot("report-tooltip-matrix.png");
    // The mirror cell shows the same edge; the diagonal shows nothing.
    expect(await tooltipAt(box.x + (row + 0.5) * cell, box.y + (column + 0.5) * cell)).toContain(`t = ${fixed(edges.statistic[edge], 2)}`);
    await page.mouse.move(box.x + (row + 0.5) * cell, box.y + (row + 0.5) * cell);
    await page.locator("#plexus-tooltip").waitFor({ state: "hidden" });
    expect(dialogs).toEqual([]);
  });

  it("shows an edge's regions and t over the network figure", async () => {
    const results = loadResults(cohort.results);
    const k = Number(await page.locator('figure[data-figure="network"]').first().getAttribute("data-contrast"));
    const { edges } = results.contrasts[k];
    // The last edge drawn is on top of the other edges.
    const path = page.locator(`figure[data-figure="network"][data-contrast="${k}"] path[data-edge]:not([data-casing])`).last();
    const edge = Number(await path.getAttribute("data-edge"));
    await path.scrollIntoViewIfNeeded();
    // Edges are arcs, so the centre of a path's bounding box may lie off its stroke: point at the curve's midpoint.
    type Curve = { getTotalLength(): number; getPointAtLength(at: number): { x: number; y: number }; getScreenCTM(): { a: number; b: number; c: number; d: number; e: number; f: number } };
    const middle = await path.evaluate((element: Curve) => {
      const p = element.getPointAtLength(element.getTotalLength() / 2);
      const m = element.getScreenCTM();
      return { x: m.a * p.x + m.c * p.y + m.e, y: m.b * p.x + m.d * p.y + m.f };
    });
    await page.mouse.move(middle.x, middle.y);
    const tip = page.locator("#plexus-tooltip");
    await tip.waitFor({ state: "visible" });
    const text = await tip.innerText();
    expect(text).toContain(`${results.regions[edges.regionA[edge]].label} – ${results.regions[edges.regionB[edge]].label}`);
    expect(text).toContain(`t = ${fixed(edges.statistic[edge], 2)}`);
    await screenshot("report-tooltip-network.png");
  });

  it("highlights a subnetwork's edges in the matrix, the network and the edge table on a click of its row", async () => {
    const results = loadResults(cohort.results);
    const content = reportContent(results);
    const row = page.locator("tr[data-component]").first();
    const k = Number(await row.getAttribute("data-contrast"));
    const id = Number(await row.getAttribute("data-component"));
    const component = results.contrasts[k].components.find((c) => c.id === id)!;
    await row.scrollIntoViewIfNeeded();
    await row.click();
    expect(await row.getAttribute("class")).toContain("plx-on");
    expect(await page.locator("#plexus-subnetwork").inputValue()).not.toBe("");
    const network = page.locator(`figure[data-figure="network"][data-contrast="${k}"]`);
    const litPaths = network.locator("path.plx-on:not([data-casing])");
    const lit: (string | null)[] = [];
    for (let i = 0; i < (await litPaths.count()); i++) lit.push(await litPaths.nth(i).getAttribute("data-edge"));
    expect(new Set(lit).size).toBe(component.extent);
    const marks = page.locator(`figure[data-figure="matrix"][data-contrast="${k}"] rect.plx-mark`);
    expect(await marks.count()).toBe(2 * component.extent);
    const edges = results.contrasts[k].edges;
    const shown = content.contrasts[k].finding.edges.slice(0, 50).filter((e) => edges.component[e] === id);
    expect(await page.locator(`section[data-contrast="${k}"] tr[data-edge].plx-on`).count()).toBe(shown.length);
    expect(shown.length).toBe(Math.min(component.extent, 50));
    await network.scrollIntoViewIfNeeded();
    await screenshot("report-highlight.png");
    // Choosing "none" in the control clears it everywhere.
    await page.selectOption("#plexus-subnetwork", "");
    expect(await page.locator(".plx-on").count()).toBe(0);
    expect(await page.locator("rect.plx-mark").count()).toBe(0);
  });

  it("sorts a table by a numeric column on a click (or Enter) of its header button, with an indicator", async () => {
    const content = reportContent(loadResults(cohort.results));
    const k = content.contrasts.findIndex((c) => c.finding.edges.length > 1);
    const table = page.locator(`#table-edges-${content.contrasts[k].name} table`);
    const headers = await table.locator("thead th").allInnerTexts();
    const column = headers.findIndex((h) => h.replace(/[↕▲▼]/g, "").trim() === "t");
    expect(column).toBeGreaterThanOrEqual(0);
    const values = async () => (await table.locator(`tbody tr td:nth-child(${column + 1})`).allInnerTexts()).map((v) => Number(v.replace("−", "-")));
    const before = await values();
    const button = table.locator(`thead th:nth-child(${column + 1}) button`);
    await button.scrollIntoViewIfNeeded();
    await button.click();
    const ascending = await values();
    expect(ascending).toEqual([...before].sort((a, b) => a - b));
    expect(await table.locator(`thead th:nth-child(${column + 1})`).getAttribute("aria-sort")).toBe("ascending");
    expect(await button.innerText()).toContain("▲");
    await screenshot("report-sorted.png");
    await button.focus();
    await page.keyboard.press("Enter");
    expect(await values()).toEqual([...before].sort((a, b) => b - a));
    expect(await table.locator(`thead th:nth-child(${column + 1})`).getAttribute("aria-sort")).toBe("descending");
    await page.keyboard.press("Enter");
    expect(await values()).toEqual(before);
  });

  it("logged no console error and opened no dialog while interacting", () => {
    expect(consoleErrors).toEqual([]);
    expect(pageErrors).toEqual([]);
    expect(dialogs).toEqual([]);
    expect(outsideRequests).toEqual([]);
  });

  it("states that plexus is a research tool, not a diagnostic device", async () => {
    const notice = await page.locator("aside.notice").innerText();
    expect(notice).toContain("Research use only.");
    expect(notice).toContain(RESEARCH_NOTICE.slice(0, 60));
    expect(await page.locator("aside.notice").isVisible()).toBe(true);
  });

  it("saves a full-page screenshot to test-output/report/report.png", async () => {
    mkdirSync(OUTPUT, { recursive: true });
    const file = join(OUTPUT, "report.png");
    await page.screenshot({ path: file, fullPage: true });
    expect(existsSync(file)).toBe(true);
  });
});
