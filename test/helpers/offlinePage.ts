import { chromium, type BrowserContext, type Page } from "playwright-core";

/** Debian's Chromium, which the browser tests drive through playwright-core. */
export const CHROMIUM = "/usr/bin/chromium";

/** What a page did that a test checks afterwards. */
export interface PageRecord {
  consoleErrors: string[];
  pageErrors: string[];
  dialogs: string[];
  /** Requests for anything but a local file: refused, and recorded here. */
  outsideRequests: string[];
}

/**
 * Opens `url` (a file: URL) in headless Chromium with a fresh profile, every
 * request that is not for a local file refused and recorded, and console
 * errors, page errors and dialogs recorded in `record`.
 */
export async function openOffline(profile: string, url: string, record: PageRecord): Promise<{ context: BrowserContext; page: Page }> {
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
    viewport: { width: 1100, height: 900 },
  });
  await context.route("**/*", (route) => {
    const requested = route.request().url();
    if (requested.startsWith("file:")) return route.continue();
    record.outsideRequests.push(requested);
    return route.abort();
  });
  const page = context.pages()[0] ?? (await context.newPage());
  page.on("console", (message) => {
    if (message.type() === "error") record.consoleErrors.push(message.text());
  });
  page.on("pageerror", (error) => record.pageErrors.push(error.message));
  page.on("dialog", (dialog) => {
    record.dialogs.push(dialog.message());
    void dialog.dismiss();
  });
  await page.goto(url, { waitUntil: "load" });
  return { context, page };
}
