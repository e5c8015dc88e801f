// Writes the README's screenshots of report.html (docs/report-*.png): runs the worked design
// designs/clinic-contrast.yaml on the invented demo cohort into a temporary folder, opens its
// report in headless Chromium (/usr/bin/chromium through playwright-core, every non-file request
// refused) and captures the tooltip, a highlighted subnetwork, a sorted table and the data figure;
// then runs designs/strength-clinic.yaml and captures the nodal figure of its report.html.
// Run after `npm run build`:  node docs/report-screenshots.mjs
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { chromium } from "playwright-core";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const work = mkdtempSync(join(tmpdir(), "plexus-screenshots-"));
const browser = await chromium.launch({ executablePath: "/usr/bin/chromium", headless: true, args: ["--no-sandbox", "--disable-gpu"] });
try {
  const out = join(work, "results");
  execFileSync(process.execPath, [join(root, "bin", "plexus.js"), "run", join(root, "designs", "clinic-contrast.yaml"), "--out", out, "--threads", "1", "--quiet"], { stdio: "inherit" });
  const page = await browser.newPage({ viewport: { width: 1100, height: 1400 } });
  await page.route("**/*", (route) => (route.request().url().startsWith("file:") ? route.continue() : route.abort()));
  await page.goto(pathToFileURL(join(out, "report.html")).href);

  // The tooltip over the strongest edge of the network figure.
  const figure = page.locator('figure[data-figure="network"]').first();
  await figure.scrollIntoViewIfNeeded();
  const paths = figure.locator("path[data-edge]:not([data-casing])");
  const lengths = await paths.evaluateAll((list) => list.map((path) => path.getTotalLength()));
  // Edges are arcs: point at the middle of the curve (the centre of its box may lie off the stroke).
  const middle = await paths.nth(lengths.indexOf(Math.max(...lengths))).evaluate((path) => {
    const p = path.getPointAtLength(path.getTotalLength() / 2);
    const m = path.getScreenCTM();
    return { x: m.a * p.x + m.c * p.y + m.e, y: m.b * p.x + m.d * p.y + m.f };
  });
  await page.mouse.move(middle.x, middle.y);
  await page.locator("#plexus-tooltip").waitFor({ state: "visible" });
  await figure.screenshot({ path: join(root, "docs", "report-tooltip.png") });

  // The first significant subnetwork, chosen by a click on its row, marked in the matrix.
  await page.mouse.move(0, 0);
  await page.locator("tr[data-component]").first().click();
  const matrix = page.locator('figure[data-figure="matrix"]').first();
  // Scroll the figure to just below the sticky subnetwork bar, so the bar does not cover it.
  await matrix.evaluate((element) => window.scrollTo(0, element.getBoundingClientRect().top + window.scrollY - 80));
  await matrix.screenshot({ path: join(root, "docs", "report-highlight.png") });

  // The first contrast's edge table sorted by t, descending (two clicks on its header).
  const table = page.locator('section[data-contrast] .table-wrap[id^="table-edges-"]').first();
  const t = table.locator("thead th button").filter({ hasText: /^t\s*[↕▲▼]$/ });
  await t.click();
  await t.click();
  await table.scrollIntoViewIfNeeded();
  await table.screenshot({ path: join(root, "docs", "report-sorted.png") });

  // The data behind the first significant subnetwork, as drawn in the report.
  const data = page.locator('figure[data-figure="data"]').first();
  await data.scrollIntoViewIfNeeded();
  await data.screenshot({ path: join(root, "docs", "report-data.png") });

  // plexus strength's report: the nodal figure of its first contrast.
  const strengthOut = join(work, "strength");
  execFileSync(process.execPath, [join(root, "bin", "plexus.js"), "strength", join(root, "designs", "strength-clinic.yaml"), "--out", strengthOut, "--threads", "1", "--quiet"], { stdio: "inherit" });
  await page.goto(pathToFileURL(join(strengthOut, "report.html")).href);
  const nodal = page.locator('figure[data-figure="nodal"]').first();
  await nodal.scrollIntoViewIfNeeded();
  await nodal.screenshot({ path: join(root, "docs", "strength-nodal.png") });
} finally {
  await browser.close();
  rmSync(work, { recursive: true, force: true });
}
