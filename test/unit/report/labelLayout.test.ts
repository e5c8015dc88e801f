import { describe, expect, it } from "vitest";
import { clipToWidth, spreadLabels, wrapText } from "../../../src/output/report/figures/labelLayout.js";
import { textWidth } from "../../../src/output/report/figures/textWidth.js";

// The label layout is checked against its definition on hand-made cases: spread labels keep
// their order, stay a pitch apart and inside the range, and sit where they were wished when
// nothing pushes them; shortened and wrapped texts fit the width asked for.

describe("label layout", () => {
  it("leaves labels that do not touch where they were wished", () => {
    expect(spreadLabels([10, 30, 50], 8, 0, 100)).toEqual([10, 30, 50]);
  });

  it("spreads a crowded run around the mean of its wishes, a pitch apart, in order", () => {
    const placed = spreadLabels([50, 50, 50], 10, 0, 100)!;
    expect(placed).toEqual([40, 50, 60]);
    const crowded = spreadLabels([1, 2, 3, 60, 61], 9, 0, 100)!;
    for (let k = 1; k < crowded.length; k++) expect(crowded[k] - crowded[k - 1]).toBeGreaterThanOrEqual(9 - 1e-9);
    expect(crowded[0]).toBeGreaterThanOrEqual(0);
    expect(crowded[crowded.length - 1]).toBeLessThanOrEqual(100);
  });

  it("keeps a run inside the range and says when the labels cannot all fit", () => {
    expect(spreadLabels([98, 99, 100], 10, 0, 100)).toEqual([80, 90, 100]);
    expect(spreadLabels([0, 0, 0], 10, 0, 100)).toEqual([0, 10, 20]);
    expect(spreadLabels([1, 2, 3], 60, 0, 100)).toBeNull();
    expect(spreadLabels([], 10, 0, 100)).toEqual([]);
  });

  it("shortens a text with an ellipsis to the width and wraps at spaces, not at no-break spaces", () => {
    const long = "a very long region label that cannot fit";
    const clipped = clipToWidth(long, 60, 7);
    expect(clipped.endsWith("…")).toBe(true);
    expect(textWidth(clipped, 7)).toBeLessThanOrEqual(60);
    expect(clipToWidth("short", 60, 7)).toBe("short");
    const lines = wrapText("one two three four five six seven α\u00a0=\u00a00.05", 50, 8);
    for (const line of lines) expect(textWidth(line, 8)).toBeLessThanOrEqual(50);
    expect(lines.some((line) => line.includes("α\u00a0=\u00a00.05"))).toBe(true);
    expect(lines.join(" ")).toBe("one two three four five six seven α\u00a0=\u00a00.05");
  });

  it("measures DejaVu Sans advance widths from the font's own tables (values in the font's 2048 units)", () => {
    // DejaVuSans.ttf 2.37: 'M' 1767/2048, 'i' 569/2048, digits 1303/2048 (read by scripts/font-metrics.mjs;
    // the browser test checks the sums against Chromium's own setting of the font).
    expect(textWidth("M", 2048)).toBeCloseTo(1767, -1);
    expect(textWidth("i", 2048)).toBeCloseTo(569, -1);
    expect(textWidth("0", 2048)).toBeCloseTo(1303, -1);
    expect(textWidth("\u4e00", 10)).toBe(10);
  });
});
