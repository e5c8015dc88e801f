import { escapeHtml } from "./escapeHtml.js";
import type { ReportFigure } from "./reportContent.js";
import { scriptJson } from "./reportData.js";
import { REPORT_SCRIPT, REPORT_SCRIPT_STYLE, reportScriptSource } from "./reportScript.js";
import { REPORT_STYLE } from "./reportStyle.js";

/**
 * The frame every report page shares (the run's report.html and plexus
 * strength's): the document head with its Content-Security-Policy (only the
 * report's own script runs; no request of any kind), the stylesheet, the
 * research-use footer, the data as JSON escaped for a script element, and the
 * script; and the pieces both pages show the same way (a figure, the inputs).
 */
export const RESEARCH_NOTICE =
  "plexus is a research tool for group statistics on brain networks. It is not a medical device: its results describe groups and must not be used to diagnose, treat or make decisions about any individual. Use it, and share this report, only as your ethics approval, data-protection rules and local practice allow.";

/** A whole page: `body` is the markup between <body> and the footer (escaped by the caller); `title` is plain text. */
export function reportPage(title: string, data: unknown, body: readonly string[]): string {
  return [
    "<!DOCTYPE html>",
    '<html lang="en">',
    "<head>",
    '<meta charset="utf-8">',
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:; script-src ${reportScriptSource()}">`,
    `<title>${escapeHtml(title)}</title>`,
    `<style>\n${REPORT_STYLE}${REPORT_SCRIPT_STYLE}</style>`,
    "</head>",
    "<body>",
    ...body,
    `<footer>${escapeHtml(RESEARCH_NOTICE)}</footer>`,
    `<script type="application/json" id="plexus-data">${scriptJson(data)}</script>`,
    `<script>${REPORT_SCRIPT}</script>`,
    "</body>",
    "</html>",
    "",
  ].join("\n");
}

/** A figure of contrast k as numbered in the page: its two-column drawing inline, the caption and its files. */
export function figureHtml(k: number, figure: ReportFigure, number: number): string[] {
  const h = escapeHtml;
  return [
    `<figure data-contrast="${k}" data-figure="${h(figure.kind)}">`,
    `<div class="svg">${figure.svg.double.trim()}</div>`,
    `<figcaption><strong>Figure ${number}.</strong> ${h(figure.caption)} <span class="file">(${h(figure.file)}-180mm.svg; also at 85 mm, and as PNG)</span></figcaption>`,
    `</figure>`,
  ];
}

/** summary.json's inputs as tables: the design, participants and regions in view, the connectome files folded away. */
export function inputsHtml(inputs: readonly { role: string; path: string; sha256: string }[]): string[] {
  const h = escapeHtml;
  const table = (list: typeof inputs) =>
    `<div class="table-wrap"><table><thead><tr><th>Role</th><th>Path (relative to the design file)</th><th>SHA-256</th></tr></thead><tbody>\n${list
      .map((i) => `<tr><td>${h(i.role)}</td><td><code>${h(i.path)}</code></td><td class="hash"><code>${h(i.sha256)}</code></td></tr>`)
      .join("\n")}\n</tbody></table></div>`;
  const connectomes = inputs.filter((i) => i.role === "connectome");
  return [
    table(inputs.filter((i) => i.role !== "connectome")),
    connectomes.length > 0 ? `<details><summary>${connectomes.length} connectome file${connectomes.length > 1 ? "s" : ""} with their SHA-256</summary>${table(connectomes)}</details>` : "",
  ];
}
