// The print figures' PNGs (src/output/report/figures/rasterise.ts). The PNG layout is checked
// against the PNG specification (W3C, Portable Network Graphics Specification, 2nd ed., 2003,
// §5.2 signature, §11.2.2 IHDR: width and height as 4-byte big-endian integers after the chunk
// type); the width in pixels is 85 mm at 300 dpi, 85 / 25.4 × 300 = 1003.9, rounded: 1004.
import { describe, expect, it } from "vitest";
import { rasterise, rasteriseInBackground } from "../../../src/output/report/figures/rasterise.js";

const SVG =
  '<svg xmlns="http://www.w3.org/2000/svg" width="85mm" height="40mm" viewBox="0 0 85 40">' +
  '<rect x="5" y="5" width="30" height="20" fill="#3b6ea5"/><text x="40" y="20" font-size="6">invented label</text></svg>';

describe("rasterise", () => {
  it("draws the same PNG bytes on the thread pool as on the main thread, 1,004 pixels wide at 85 mm", async () => {
    const direct = rasterise(SVG, "single");
    const pooled = await Promise.all([rasteriseInBackground(SVG, "single"), rasteriseInBackground(SVG, "single")]);
    for (const png of pooled) expect(Buffer.compare(Buffer.from(png), Buffer.from(direct))).toBe(0);
    expect(Array.from(direct.subarray(0, 8))).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);
    expect(Buffer.from(direct.subarray(12, 16)).toString("latin1")).toBe("IHDR");
    expect(Buffer.from(direct).readUInt32BE(16)).toBe(1004);
  });
});
