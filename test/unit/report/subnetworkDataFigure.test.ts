// The data figure (src/output/report/figures/subnetworkDataFigure.ts) drawn from values written out
// here: every kind of view at both print widths, with long and hostile level names. Checked against
// the print rules of src/output/report/figures/printSize.ts with the text measure of textWidth.ts
// (the browser test measures the rendered boxes): no text below 7 pt, every text inside the
// viewBox, no two texts overlapping; and one point per row.
import { describe, expect, it } from "vitest";
import { subnetworkDataFigure, type DataFigureContext } from "../../../src/output/report/figures/subnetworkDataFigure.js";
import { textHeight, textWidth } from "../../../src/output/report/figures/textWidth.js";
import type { PrintWidth } from "../../../src/output/report/figures/printSize.js";
import type { SubnetworkValues } from "../../../src/output/subnetworkValues.js";

function values(plot: SubnetworkValues["plot"], levels: string[], rows: number): SubnetworkValues {
  const ids = Array.from({ length: rows }, (_, i) => `sub-${i + 1}`);
  const covariate = Float64Array.from(ids, (_, i) => 1000 + 37 * ((i * 7) % rows));
  const adjusted = Float64Array.from(ids, (_, i) => 0.3 + 0.01 * ((i * 13) % 17) + (plot === "groups" ? 0.1 * (i % levels.length) : 0));
  const fitted = Float64Array.from(ids, (_, i) => (plot === "covariate" ? 0.3 + 0.0001 * covariate[i] : 0.35 + (plot === "groups" ? 0.1 * (i % levels.length) : 0)));
  return {
    plot,
    variable: plot === "mean" ? null : plot === "groups" ? "diagnosis" : "symptom_score",
    levels: plot === "groups" ? levels : [],
    adjustedFor: ["age", "sex", "site", "scanner"],
    selection: "components p_fwe",
    level: 0.95,
    ids,
    groups: ids.map((_, i) => (plot === "groups" ? levels[i % levels.length] : "")),
    covariate: plot === "covariate" ? covariate : new Float64Array(rows).fill(NaN),
    subnetworks: [{ id: 1, edges: 12, mean: adjusted, adjusted, fitted, lower: fitted.map((f) => f - 0.02), upper: fitted.map((f) => f + 0.02) }],
  };
}

interface Box {
  text: string;
  left: number;
  right: number;
  top: number;
  bottom: number;
  size: number;
}

function textBoxes(svg: string): Box[] {
  return [...svg.matchAll(/<text ([^>]*)>([^<]*)<\/text>/g)].map(([, attributes, content]) => {
    const attribute = (name: string) => new RegExp(`${name}="([^"]*)"`).exec(attributes)?.[1];
    const size = Number(attribute("font-size") ?? 8);
    const x = Number(attribute("x"));
    const y = Number(attribute("y"));
    const shown = content.replaceAll("&#39;", "'").replaceAll("&lt;", "<").replaceAll("&gt;", ">").replaceAll("&amp;", "&").replaceAll("&quot;", '"');
    const width = textWidth(shown, size);
    const anchor = attribute("text-anchor") ?? "start";
    const left = anchor === "middle" ? x - width / 2 : anchor === "end" ? x - width : x;
    return { text: shown, left, right: left + width, top: y - size * 0.93, bottom: y - size * 0.93 + textHeight(size), size };
  });
}

function expectPrintable(svg: string, label: string) {
  const [, , w, h] = /viewBox="([^"]*)"/.exec(svg)![1].split(" ").map(Number);
  const boxes = textBoxes(svg);
  for (const box of boxes) {
    expect(box.size, `${label}: "${box.text}" size`).toBeGreaterThanOrEqual(7);
    expect(box.left >= 0 && box.right <= w && box.top >= 0 && box.bottom <= h, `${label}: "${box.text}" inside 0..${w} × 0..${h}`).toBe(true);
  }
  for (let a = 0; a < boxes.length; a++) {
    for (let b = a + 1; b < boxes.length; b++) {
      const [p, q] = [boxes[a], boxes[b]];
      const overlap = p.left < q.right && q.left < p.right && p.top < q.bottom && q.top < p.bottom;
      expect(overlap, `${label}: "${p.text}" overlaps "${q.text}"`).toBe(false);
    }
  }
}

const WIDTHS: PrintWidth[] = ["single", "double"];
const CONTEXT: DataFigureContext = { transform: "fisher-z" };

describe("data figure of a subnetwork", () => {
  for (const width of WIDTHS) {
    it(`${width}: groups, covariate and mean views keep the print rules (long and hostile level names, six levels)`, () => {
      const cases: [string, SubnetworkValues, DataFigureContext][] = [
        ["two groups", values("groups", ["control", "patient"], 60), CONTEXT],
        ["six long levels", values("groups", ["healthy control volunteers", "<b>mild</b> & early", "moderate", "severe cognitive impairment", "unknown", "other"], 48), CONTEXT],
        ["covariate", values("covariate", [], 40), CONTEXT],
        ["paired mean", values("mean", [], 19), { transform: "fisher-z", difference: "post - pre" }],
        ["repeated", values("groups", ["baseline", "week6", "week12"], 45), { transform: "none", person: "person", scans: true }],
      ];
      for (const [label, v, context] of cases) {
        const svg = subnetworkDataFigure(v, 0, context, width)!;
        expectPrintable(svg, `${width} ${label}`);
        expect(svg).not.toContain("<b>");
      }
    });
  }

  it("draws one point per row and says what was adjusted for", () => {
    const v = values("groups", ["control", "patient"], 10);
    const svg = subnetworkDataFigure(v, 0, CONTEXT, "double")!;
    // One participant point per row plus the key's sample point.
    expect((svg.match(/<circle /g) ?? []).length).toBe(11);
    expect(svg).toContain("Mean Fisher z over the subnetwork&#39;s 12 edges, adjusted for age, sex, site and scanner");
    expect(svg).toContain("n = 5");
    expect(subnetworkDataFigure(v, 3, CONTEXT, "double")).toBeNull();
  });
});
