import { describe, expect, it } from "vitest";
import { robustnessFigure } from "../../../src/output/report/figures/robustnessFigure.js";
import type { ContrastResults } from "../../../src/output/report/loadResults.js";

// The figure is checked against its definition (a filled cell where the edge is significant
// at that threshold, most robust rows first) on a table written out by hand.

function contrast(rows: { regionA: string; regionB: string; statistic: number; significant: boolean[] }[]): ContrastResults {
  return { summary: { name: "up" }, robustness: { thresholds: [2.5, 3, 3.5], rows } } as unknown as ContrastResults;
}

describe("threshold robustness figure", () => {
  it("draws one filled square per significant (edge, threshold), most robust edges first", () => {
    const svg = robustnessFigure(
      contrast([
        { regionA: "a", regionB: "b", statistic: 2.7, significant: [true, false, false] },
        { regionA: "c", regionB: "d", statistic: 4.1, significant: [true, true, true] },
      ]),
      "double",
    )!;
    expect((svg.match(/fill="#1f2a44"/g) ?? []).length).toBe(4);
    expect(svg.indexOf("c – d")).toBeLessThan(svg.indexOf("a – b"));
    expect(svg).toContain("3/3");
    expect(svg).toContain("1/3");
  });

  it("escapes region labels and draws nothing without a sweep", () => {
    const svg = robustnessFigure(contrast([{ regionA: "<script>x</script>", regionB: "b", statistic: 3, significant: [true, true, false] }]), "double")!;
    expect(svg).not.toContain("<script>");
    expect(svg).toContain("&lt;script&gt;");
    expect(robustnessFigure({ summary: { name: "up" } } as unknown as ContrastResults, "double")).toBeNull();
  });
});
