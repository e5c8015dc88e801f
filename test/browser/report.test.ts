// report.html in a real browser: Debian's Chromium (/usr/bin/chromium), driven headless by
// playwright-core with a fresh profile and every non-file request refused. The page must
// render with no console error, show every figure and table, show a region label that is
// HTML as text (and run nothing), and a screenshot is kept in test-output/report/.
// Without /usr/bin/chromium the test is skipped with a message, except under CI (CI set),
// where .ci/run installs Chromium and the test must run.
import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { loadResults } from "../../src/output/report/loadResults.js";
import { reportContent } from "../../src/output/report/reportContent.js";
import { RESEARCH_NOTICE } from "../../src/output/report/reportHtml.js";
import { writeReport } from "../../src/output/report/writeReport.js";
import { analysedCohort, GOLDEN_DESIGN, HTML_LABEL, type AnalysedCohort } from "../unit/report/reportCohort.js";

const CHROMIUM = "/usr/bin/chromium";
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
    await writeReport(cohort.results, (path, text) => {
      mkdirSync(dirname(join(cohort.results, path)), { recursive: true });
      writeFileSync(join(cohort.results, path), text);
    });
    profile = mkdtempSync(join(tmpdir(), "plexus-chromium-profile-"));
    context = await chromium.launchPersistentContext(profile, {
      executablePath: CHROMIUM,
      headless: true,
      args: [
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
      ],
      viewport: { width: 1100, height: 900 },
    });
    await context.route("**/*", (route) => {
      const url = route.request().url();
      if (url.startsWith("file:")) return route.continue();
      outsideRequests.push(url);
      return route.abort();
    });
    page = context.pages()[0] ?? (await context.newPage());
    page.on("console", (message) => {
      if (message.type() === "error") consoleErrors.push(message.text());
    });
    page.on("pageerror", (error) => pageErrors.push(error.message));
    page.on("dialog", (dialog) => {
      dialogs.push(dialog.message());
      void dialog.dismiss();
    });
    await page.goto(pathToFileURL(join(cohort.results, "report.html")).href, { waitUntil: "load" });
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
    const files = readdirSync(join(cohort.results, "figures")).filter((name) => name.endsWith(".svg"));
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

  it("shows the HTML region label as text and runs no script", async () => {
    const cells = await page.locator("td").allInnerTexts();
    expect(cells).toContain(HTML_LABEL);
    expect(await page.locator("script").count()).toBe(0);
    const svgText = await page.locator("figure svg text").allTextContents();
    expect(svgText.some((t) => t.includes("<script>"))).toBe(true);
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
