/** The report's stylesheet, inlined in report.html (system fonts only; prints on A4 or Letter). */
export const REPORT_STYLE = `
:root { color-scheme: light; }
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial, sans-serif; color: #1a1a1a; background: #ffffff; margin: 0 auto; max-width: 1000px; padding: 24px 28px 48px; line-height: 1.45; }
h1 { font-size: 1.7rem; margin: 0 0 4px; }
h2 { font-size: 1.3rem; margin: 2.2rem 0 0.6rem; padding-bottom: 4px; border-bottom: 2px solid #d9d9d9; }
h3 { font-size: 1.05rem; margin: 1.4rem 0 0.4rem; }
.subtitle { color: #4d4d4d; margin: 0; }
.notice { border: 2px solid #1a1a1a; border-radius: 6px; padding: 10px 14px; margin: 18px 0; background: #f5f5f5; }
nav ol { columns: 2; margin: 0; }
nav h2 { border: none; margin-top: 1rem; }
dl { display: grid; grid-template-columns: max-content 1fr; gap: 4px 18px; margin: 0; }
dt { font-weight: 600; }
dd { margin: 0; }
code { font-family: ui-monospace, "SFMono-Regular", Menlo, Consolas, monospace; font-size: 0.88em; background: #f0f0f0; padding: 0 3px; border-radius: 3px; overflow-wrap: anywhere; }
.table-wrap { overflow-x: auto; margin: 1rem 0 1.4rem; }
table { border-collapse: collapse; font-size: 0.88rem; font-variant-numeric: tabular-nums; }
caption { caption-side: top; text-align: left; font-weight: 600; padding-bottom: 6px; }
thead th { border-top: 2px solid #1a1a1a; border-bottom: 1px solid #1a1a1a; text-align: left; padding: 4px 10px; }
tbody tr:last-child td { border-bottom: 2px solid #1a1a1a; }
td { padding: 3px 10px; vertical-align: top; }
th.num, td.num { text-align: right; white-space: nowrap; }
td.indent { padding-left: 26px; }
td.hash code { font-size: 0.78em; }
.note { font-size: 0.82rem; color: #4d4d4d; margin: 4px 0; max-width: 60rem; }
figure { margin: 1.2rem 0 1.8rem; }
figure .svg svg { width: 100%; height: auto; display: block; }
figcaption { font-size: 0.86rem; color: #333333; margin-top: 6px; max-width: 60rem; }
figcaption .file, .hint { color: #666666; font-size: 0.85rem; }
.none { font-style: italic; }
details { margin: 6px 0; }
summary { cursor: pointer; }
ul.references li { margin-bottom: 3px; }
footer { margin-top: 3rem; padding-top: 10px; border-top: 1px solid #d9d9d9; font-size: 0.82rem; color: #4d4d4d; }
@media print { body { max-width: none; padding: 0; } nav { display: none; } figure, .table-wrap { break-inside: avoid; } }
`;
