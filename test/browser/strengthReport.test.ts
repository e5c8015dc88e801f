// report.html of `plexus strength` in a real browser: Debian's Chromium (/usr/bin/chromium),
// driven headless by playwright-core with a fresh profile and every non-file request refused,
// as test/browser/report.test.ts does for the run's report. The page renders with no console
// error; a region label that closes the script element stays text (and runs nothing); sorting a
// table by a click on a header reorders its rows; screenshots go to a temporary folder.
// Without /usr/bin/chromium the test is skipped with a message, except under CI (CI set).
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import type { BrowserContext, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CHROMIUM, openOffline } from "../helpers/offlinePage.js";
import { RESEARCH_NOTICE } from "../../src/output/report/reportHtml.js";
import { groupDesignLines, numberColumn, readTable, runCli, writeDesignFile, writeSimulatedCohort } from "../unit/strength/strengthTestFiles.js";

const available = existsSync(CHROMIUM);
const mustRun = Boolean(process.env.CI);
/** Closes the data element and opens a script that would leave a mark on the page. */
const HOSTILE = "</script><script>window.strengthOwned=1;document.title='owned'</script>";

if (!available && !mustRun) {
  console.warn(`strength report browser test skipped: ${CHROMIUM} is missing (install it with: apt-get install -y chromium); under CI it is required`);
}

describe.skipIf(!available && !mustRun)("plexus strength's report.html in headless Chromium", () => {
  let root = "";
  let out = "";
  let shots = "";
  let profile = "";
  let context: BrowserContext;
  let page: Page;
  const consoleErrors: string[] = [];
  const pageErrors: string[] = [];
  const dialogs: string[] = [];
  const outsideRequests: string[] = [];

  beforeAll(async () => {
    if (!available) throw new Error(`${CHROMIUM} is missing: CI must install Chromium (see .ci/run)`);
    root = mkdtempSync(join(tmpdir(), "plexus-strength-browser-"));
    shots = mkdtempSync(join(tmpdir(), "plexus-strength-shots-"));
    const cohort = join(root, "cohort");
    writeSimulatedCohort(cohort, { regions: 16, patients: 12, controls: 12, kind: "correlation", effect: { regions: 5, size: 2 }, covariates: true }, 8);
    const regionsFile = join(cohort, "regions.tsv");
    const [header, first, ...rest] = readFileSync(regionsFile, "utf8").trimEnd().split("\n");
    const label = header.split("\t").indexOf("label");
    writeFileSync(regionsFile, [header, first.split("\t").map((cell, k) => (k === label ? HOSTILE : cell)).join("\t"), ...rest, ""].join("\n"));
    const design = writeDesignFile(
      join(root, "design.yaml"),
      groupDesignLines({
        cohort: "cohort",
        regions: true,
        model: "group + age + sex",
        contrasts: ["patient_gt_control: group[patient] - group[control]", "age_down: -age"],
        inference: ["method: max-t", "permutations: 199", "seed: 4"],
      }),
    );
    out = join(root, "strength");
    const result = await runCli(["strength", design, "--out", out, "-q", "--threads", "1"]);
    expect(result.code, result.stderr).toBe(0);

    profile = mkdtempSync(join(tmpdir(), "plexus-chromium-profile-"));
    ({ context, page } = await openOffline(profile, pathToFileURL(join(out, "report.html")).href, { consoleErrors, pageErrors, dialogs, outsideRequests }));
  });

  afterAll(async () => {
    await context?.close();
    for (const dir of [profile, root, shots]) if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it("renders with no console error, no page error, no dialog and no request leaving the file", () => {
    expect(consoleErrors).toEqual([]);
    expect(pageErrors).toEqual([]);
    expect(dialogs).toEqual([]);
    expect(outsideRequests).toEqual([]);
  });

  it("shows the hostile region label as text, runs only the report's own script, and the JSON holds the label as data", async () => {
    const cells = await page.locator("td").allInnerTexts();
    expect(cells).toContain(HOSTILE);
    expect(await page.locator("script").count()).toBe(2);
    expect(await page.locator('script[type="application/json"]').count()).toBe(1);
    const labels = (await page.evaluate("JSON.parse(document.getElementById('plexus-data').textContent).regions")) as string[];
    expect(labels).toContain(HOSTILE);
    expect(await page.evaluate("window.strengthOwned === undefined")).toBe(true);
    expect(await page.title()).not.toBe("owned");
  });

  it("shows the draft results, the methods, the notice, and a table per contrast with every region", async () => {
    expect(await page.locator("#results-text p:not(.hint)").first().innerText()).toMatch(/^For the contrast patient_gt_control /);
    expect(await page.locator("#methods").innerText()).toContain("Rubinov M, Sporns O (2010).");
    expect(await page.locator("aside.notice").innerText()).toContain(RESEARCH_NOTICE.slice(0, 60));
    expect(await page.locator("table caption").allInnerTexts()).toEqual([
      "Table 1. Nodal strength, patient_gt_control (group[patient] - group[control])",
      "Table 2. Nodal strength, age_down (-age)",
    ]);
    for (const name of ["patient_gt_control", "age_down"]) expect(await page.locator(`#table-strength-${name} tbody tr`).count()).toBe(16);
  });

  it("sorts a table by t on a click of its header button, and back to the printed order (by p)", async () => {
    const table = page.locator("#table-strength-patient_gt_control table");
    const headers = await table.locator("thead th").allInnerTexts();
    const column = headers.findIndex((h) => h.replace(/[↕▲▼]/g, "").trim() === "t");
    expect(column).toBeGreaterThanOrEqual(0);
    const values = async () => (await table.locator(`tbody tr td:nth-child(${column + 1})`).allInnerTexts()).map((v) => Number(v.replace("−", "-")));
    const regions = async () => table.locator("tbody tr td:nth-child(1)").allInnerTexts();
    const before = await values();
    const printed = await regions();
    // The printed order is by p (one-sided, upper tail): t descending.
    const nodes = readTable(join(out, "patient_gt_control", "nodes.tsv"));
    const p = numberColumn(nodes, "p_unc");
    expect(printed).toEqual(nodes.rows.map((_, i) => i).sort((a, b) => p[a] - p[b] || a - b).map((i) => nodes.rows[i][0]));
    const button = table.locator(`thead th:nth-child(${column + 1}) button`);
    await button.scrollIntoViewIfNeeded();
    await button.click();
    const ascending = await values();
    expect(ascending).toEqual([...before].sort((a, b) => a - b));
    expect(ascending).not.toEqual(before);
    expect(await table.locator(`thead th:nth-child(${column + 1})`).getAttribute("aria-sort")).toBe("ascending");
    await page.screenshot({ path: join(shots, "strength-sorted.png") });
    expect(existsSync(join(shots, "strength-sorted.png"))).toBe(true);
    await button.click();
    await button.click();
    expect(await regions()).toEqual(printed);
  });

  it("logged no console error while interacting, and saves a full-page screenshot", async () => {
    expect(consoleErrors).toEqual([]);
    expect(pageErrors).toEqual([]);
    expect(dialogs).toEqual([]);
    expect(outsideRequests).toEqual([]);
    await page.screenshot({ path: join(shots, "strength-report.png"), fullPage: true });
    expect(existsSync(join(shots, "strength-report.png"))).toBe(true);
  });
});
