// The anatomical figures (network and nodal) and their geometry. The convex hull is checked
// against SciPy's Qhull (test/fixtures/geometry/convex_hull.py wrote the fixture); the outline,
// the name columns and the left/right placement are checked against their definitions
// (containment, distances, the sign of x in the coordinate convention of the README), not
// against numbers of plexus's own. Text boxes are estimated with textWidth (an upper bound for
// DejaVu Sans); the browser test measures the rendered ones.
import { readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { readRegions, type Region } from "../../../src/io/regions.js";
import type { ContrastResults } from "../../../src/output/report/loadResults.js";
import { anatomyLayout } from "../../../src/output/report/figures/anatomyLayout.js";
import { placeMarginLabels, spreadPositions } from "../../../src/output/report/figures/marginLabels.js";
import { networkFigure } from "../../../src/output/report/figures/networkFigure.js";
import { nodalFigure, type NodalValues } from "../../../src/output/report/figures/nodalFigure.js";
import { convexHull, insideConvex, roundedHull, type Point } from "../../../src/output/report/figures/outlineHull.js";
import { MIN_FONT_PT, PRINT_WIDTHS, type PrintWidth } from "../../../src/output/report/figures/printSize.js";
import { textWidth } from "../../../src/output/report/figures/textWidth.js";
import type { SignificantEdges } from "../../../src/output/report/significantEdges.js";

const ROOT = join(dirname(fileURLToPath(import.meta.url)), "..", "..", "..");
const demo = readRegions(join(ROOT, "demo-cohort", "regions.tsv"));
const hulls = JSON.parse(readFileSync(join(ROOT, "test", "fixtures", "geometry", "convex_hull.json"), "utf8")) as {
  cases: Record<string, { points: [number, number][]; hull_vertices: number[] }>;
};

/** Distance from a point to the segment a–b. */
function segmentDistance(p: Point, a: Point, b: Point): number {
  const [dx, dy] = [b[0] - a[0], b[1] - a[1]];
  const t = Math.max(0, Math.min(1, ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / (dx * dx + dy * dy || 1)));
  return Math.hypot(p[0] - a[0] - t * dx, p[1] - a[1] - t * dy);
}

describe("outline geometry", () => {
  for (const [name, { points, hull_vertices }] of Object.entries(hulls.cases)) {
    it(`the convex hull of ${name} has the vertices SciPy's Qhull finds`, () => {
      const hull = convexHull(points);
      const indices = hull.map((v) => points.findIndex((p) => p[0] === v[0] && p[1] === v[1])).sort((a, b) => a - b);
      expect(indices).toEqual(hull_vertices);
    });

    it(`the rounded hull of ${name} holds every point, each at least the margin inside`, () => {
      const margin = 4.5;
      const outline = roundedHull(points, margin);
      for (const p of points) {
        expect(insideConvex(outline, p)).toBe(true);
        let nearest = Infinity;
        for (let k = 0; k < outline.length; k++) nearest = Math.min(nearest, segmentDistance(p, outline[k], outline[(k + 1) % outline.length]));
        // Arcs are sampled as chords, which cut inside a circle of radius m by m(1 − cos(step/2)) at most.
        expect(nearest).toBeGreaterThanOrEqual(margin * Math.cos(Math.PI / 36) - 1e-9);
      }
    });
  }

  it("a single point gives a disc and two points a capsule around them", () => {
    expect(roundedHull([[1, 2]], 3).every((p) => Math.abs(Math.hypot(p[0] - 1, p[1] - 2) - 3) < 1e-9)).toBe(true);
    const capsule = roundedHull(
      [
        [0, 0],
        [10, 0],
      ],
      2,
    );
    expect(Math.min(...capsule.map((p) => p[0]))).toBeCloseTo(-2, 9);
    expect(Math.max(...capsule.map((p) => p[0]))).toBeCloseTo(12, 9);
    expect(Math.max(...capsule.map((p) => p[1]))).toBeCloseTo(2, 9);
  });
});

describe("name columns", () => {
  it("keep wished positions that are far enough apart, and space crowded ones exactly one pitch apart inside the bounds", () => {
    expect(spreadPositions([10, 30, 50], 8, 0, 100)).toEqual([10, 30, 50]);
    // Three wishes at 50 spread symmetrically: the least-squares placement is 42, 50, 58.
    expect(spreadPositions([50, 50, 50], 8, 0, 100)).toEqual([42, 50, 58]);
    const crowded = spreadPositions([1, 1, 2, 3, 99, 99.5], 8, 0, 100);
    for (let k = 1; k < crowded.length; k++) expect(crowded[k] - crowded[k - 1]).toBeGreaterThanOrEqual(8 - 1e-9);
    expect(crowded[0]).toBeGreaterThanOrEqual(0);
    expect(crowded[crowded.length - 1]).toBeLessThanOrEqual(100 + 1e-9);
  });

  it("set the most important names when there are more than slots, and report the rest", () => {
    const labels = Array.from({ length: 12 }, (_, k) => ({ label: `region ${k}`, at: [50, 20] as const, rank: k }));
    const placed = placeMarginLabels(labels, { side: "left", edge: 40, width: 38, top: 10, bottom: 40, size: 7 });
    expect(placed.names.length).toBe(4);
    expect(placed.leftOut.map((l) => l.rank)).toEqual([4, 5, 6, 7, 8, 9, 10, 11]);
    for (const [x, , w] of placed.boxes) expect(x + w).toBeLessThanOrEqual(40 + 1e-9);
  });
});

describe("the plan and elevation follow the coordinate convention (x to the right, y to the front, z up)", () => {
  for (const width of PRINT_WIDTHS) {
    it(`at ${width} width: left regions on the left, the front at the top of the plan, up at the top of the elevation, L left of R`, () => {
      const layout = anatomyLayout(demo, width, 30, demo.map((_, i) => i));
      const [plan, elevation] = layout.views;
      expect(plan.kind).toBe("plan");
      expect(elevation.kind).toBe("elevation");
      demo.forEach((region, i) => {
        expect(layout.sideOf(i)).toBe(region.x! < 0 ? "left" : "right");
        const [px] = plan.place(i);
        const [ex] = elevation.place(i);
        const planMiddle = plan.box[0] + plan.box[2] / 2;
        expect(Math.sign(px - planMiddle)).toBe(Math.sign(region.x!));
        // The elevation has the plan's x scale (aligned under it on one column, beside it on two).
        expect(ex - elevation.box[0]).toBeCloseTo(px - plan.box[0], 9);
      });
      const byY = demo.map((_, i) => i).sort((a, b) => demo[a].y! - demo[b].y!);
      expect(plan.place(byY[byY.length - 1])[1]).toBeLessThan(plan.place(byY[0])[1]);
      const byZ = demo.map((_, i) => i).sort((a, b) => demo[a].z! - demo[b].z!);
      expect(elevation.place(byZ[byZ.length - 1])[1]).toBeLessThan(elevation.place(byZ[0])[1]);
      for (const view of layout.views) {
        const marks = view.backdrop.filter((e) => /^<text[^>]*>[LR]<\/text>$/.test(e));
        expect(marks.map((e) => e.replace(/<[^>]+>/g, ""))).toEqual(["L", "R"]);
        const xs = marks.map((e) => Number(/ x="([-\d.]+)"/.exec(e)![1]));
        expect(xs[0]).toBeLessThan(xs[1]);
      }
      if (width === "single") expect(elevation.box[1]).toBeGreaterThan(plan.box[1] + plan.box[3]);
      else expect(elevation.box[0]).toBeGreaterThan(plan.box[0] + plan.box[2]);
    });
  }
});

describe("without coordinates, the ring puts the left hemisphere on the left and mirrors the right", () => {
  const ring: Region[] = demo.map(({ label, hemisphere, system }) => ({ label, hemisphere, system }));
  for (const width of PRINT_WIDTHS) {
    it(`at ${width} width`, () => {
      const layout = anatomyLayout(ring, width, 30, []);
      expect(layout.views.map((v) => v.kind)).toEqual(["ring"]);
      const [view] = layout.views;
      const centre = view.box[0] + view.box[2] / 2;
      ring.forEach((region, i) => {
        expect(layout.sideOf(i)).toBe(region.hemisphere);
        // Each left demo region L-x-k has a homologue R-x-k in the same position of its hemisphere's order: mirror images.
        if (region.hemisphere === "left") {
          const twin = ring.findIndex((r) => r.label === `R${region.label.slice(1)}`);
          const [lx, ly] = view.place(i);
          const [rx, ry] = view.place(twin);
          expect(rx - centre).toBeCloseTo(centre - lx, 9);
          expect(ry).toBeCloseTo(ly, 9);
        }
      });
    });
  }
});

/** The text elements of an SVG with estimated boxes; sizes inherit the root's font-size. */
function textBoxes(svg: string) {
  const rootSize = Number(/<svg [^>]*font-size="([\d.]+)"/.exec(svg)![1]);
  const viewBox = /viewBox="0 0 ([\d.]+) ([\d.]+)"/.exec(svg)!.slice(1).map(Number);
  const boxes = [...svg.matchAll(/<text ([^>]*)>([^<]*)<\/text>/g)].map((m) => {
    const attribute = (name: string) => new RegExp(`(?:^| )${name}="([^"]*)"`).exec(m[1])?.[1];
    const content = m[2].replace(/&lt;/g, "<").replace(/&gt;/g, ">").replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&amp;/g, "&");
    const size = Number(attribute("font-size") ?? rootSize);
    const width = textWidth(content, size, attribute("font-weight") === "bold");
    const x = Number(attribute("x"));
    const anchor = attribute("text-anchor") ?? "start";
    const left = anchor === "start" ? x : anchor === "end" ? x - width : x - width / 2;
    const y = Number(attribute("y"));
    return { content, size, left, right: left + width, top: y - 0.93 * size, bottom: y + 0.24 * size };
  });
  return { boxes, viewBox };
}

function expectPrintable(svg: string) {
  const { boxes, viewBox } = textBoxes(svg);
  expect(boxes.length).toBeGreaterThan(0);
  for (const b of boxes) {
    expect(b.size, b.content).toBeGreaterThanOrEqual(MIN_FONT_PT);
    expect(b.left, b.content).toBeGreaterThanOrEqual(0);
    expect(b.top, b.content).toBeGreaterThanOrEqual(0);
    expect(b.right, b.content).toBeLessThanOrEqual(viewBox[0]);
    expect(b.bottom, b.content).toBeLessThanOrEqual(viewBox[1]);
  }
  for (let i = 0; i < boxes.length; i++) {
    for (let j = i + 1; j < boxes.length; j++) {
      const [a, b] = [boxes[i], boxes[j]];
      const overlap = a.left < b.right && b.left < a.right && a.top < b.bottom && b.top < a.bottom;
      expect(overlap, `"${a.content}" overlaps "${b.content}"`).toBe(false);
    }
  }
  return boxes;
}

/** A contrast whose finding is the given edges (t values), over the regions. */
function contrastOf(regionCount: number, finding: [number, number, number][], statistic = "t"): { contrast: ContrastResults; finding: SignificantEdges } {
  const pairs: [number, number][] = [];
  for (let a = 0; a < regionCount; a++) for (let b = a + 1; b < regionCount; b++) pairs.push([a, b]);
  const t = new Float64Array(pairs.length).fill(0.3);
  const chosen: number[] = [];
  for (const [a, b, value] of finding) {
    const e = pairs.findIndex(([p, q]) => p === Math.min(a, b) && q === Math.max(a, b));
    t[e] = value;
    chosen.push(e);
  }
  const edges = { regionA: Uint32Array.from(pairs.map((p) => p[0])), regionB: Uint32Array.from(pairs.map((p) => p[1])), statistic: t };
  const contrast = { summary: { name: "patient_gt_control", statistic }, edges, components: [] } as unknown as ContrastResults;
  return { contrast, finding: { kind: "components", components: [], edges: chosen } };
}

describe("network figure", () => {
  const effect: [number, number, number][] = [
    [5, 6, 4.1],
    [6, 8, 3.6],
    [5, 8, -3.2],
    [16, 46, 3.9],
    [46, 47, 5.2],
    [0, 30, 3.3],
    [12, 42, 4.4],
  ];
  const noCoordinates: Region[] = demo.map(({ label, hemisphere, system }) => ({ label, hemisphere, system }));
  for (const width of PRINT_WIDTHS) {
    for (const [name, regions] of [
      ["demo regions", demo],
      ["demo regions without coordinates", noCoordinates],
    ] as const) {
      it(`${name}, ${width} width: every text at least 7 pt, inside the figure and clear of every other; each region of the finding named on its side`, () => {
        const { contrast, finding } = contrastOf(regions.length, effect);
        const svg = networkFigure(contrast, [...regions], finding, 0.05, width as PrintWidth)!;
        const boxes = expectPrintable(svg);
        const involved = [...new Set(effect.flatMap(([a, b]) => [a, b]))];
        for (const region of involved) {
          const box = boxes.find((b) => b.content === regions[region].label);
          expect(box, regions[region].label).toBeDefined();
          const L = boxes.find((b) => b.content === "L")!;
          const R = boxes.find((b) => b.content === "R")!;
          // Left-hemisphere names stand left of the L mark's right edge; right ones right of R's left edge.
          if (regions[region].hemisphere === "left") expect(box!.right).toBeLessThanOrEqual(L.right);
          else expect(box!.left).toBeGreaterThanOrEqual(R.left);
        }
        // One coloured path and one casing per edge and view, each carrying the edge's row.
        const views = regions === demo ? 2 : 1;
        expect([...svg.matchAll(/<path [^>]*data-edge="(\d+)" data-casing=""/g)].length).toBe(finding.edges.length * views);
        expect([...svg.matchAll(/<path [^>]*data-edge="(\d+)"\/>/g)].map((m) => Number(m[1])).sort()).toEqual(
          [...finding.edges, ...(views === 2 ? finding.edges : [])].sort(),
        );
        expect(svg).toContain(`width="${width === "single" ? 85 : 180}mm"`);
      });
    }
  }

  it("names as many regions of a large finding as fit, and says how many more there are", () => {
    const many: [number, number, number][] = [];
    for (let a = 0; a < 60; a += 1) many.push([a, (a + 7) % 60, 3.5 + (a % 5) / 10]);
    const long = demo.map((r) => ({ ...r, label: `${r.label.slice(0, 2)}long-invented-name-${r.label.slice(2)}` }));
    for (const width of PRINT_WIDTHS) {
      const { contrast, finding } = contrastOf(60, many);
      const svg = networkFigure(contrast, long, finding, 0.05, width)!;
      const boxes = expectPrintable(svg);
      // Shortened in the middle, so the names keep their distinguishing ends and stay unique.
      const shortened = boxes.filter((b) => b.content.includes("…")).map((b) => b.content);
      expect(shortened.length).toBeGreaterThan(0);
      expect(new Set(shortened).size).toBe(shortened.length);
      for (const name of shortened) expect(long.some((r) => r.label.endsWith(name.split("…")[1]) && r.label.startsWith(name.split("…")[0]))).toBe(true);
      const named = boxes.filter((b) => b.content.startsWith("L-") || b.content.startsWith("R-")).length;
      const allText = boxes.map((b) => b.content).join(" ");
      expect(named).toBeLessThan(60);
      expect(allText).toContain(`${60 - named} more regions of the finding not named`);
    }
  });

  it("draws nothing without a finding", () => {
    const { contrast } = contrastOf(demo.length, []);
    expect(networkFigure(contrast, demo, { kind: "components", components: [], edges: [] }, 0.05, "single")).toBeNull();
  });
});

describe("nodal figure on the demo regions", () => {
  const t = demo.map((_, i) => 4 * Math.sin(i * 0.37));
  const values: NodalValues = { measure: "nodal strength", statisticName: "t", statistic: Float64Array.from(t), significant: t.map((v) => Math.abs(v) > 3.5) };
  for (const width of PRINT_WIDTHS) {
    it(`${width} width: every significant region named on its side, one disc per region in each view, texts printable`, () => {
      const svg = nodalFigure(demo, values, "Nodal strength: patient_gt_control", width)!;
      const boxes = expectPrintable(svg);
      const significant = demo.filter((_, i) => values.significant[i]);
      expect(significant.length).toBeGreaterThan(3);
      const L = boxes.find((b) => b.content === "L")!;
      for (const region of significant) {
        const box = boxes.find((b) => b.content === region.label);
        expect(box, region.label).toBeDefined();
        if (region.x! < 0) expect(box!.right).toBeLessThanOrEqual(L.right);
      }
      for (const region of demo.filter((_, i) => !values.significant[i])) expect(boxes.some((b) => b.content === region.label)).toBe(false);
      // Discs: one per region per view, ringed in black exactly for the significant ones.
      expect([...svg.matchAll(/<circle [^>]*stroke="#000000" stroke-width="1.1"/g)].length).toBe(2 * significant.length + 1);
      expect(svg).toContain("23 of 60 regions significant".replace("23", String(significant.length)));
    });
  }

  it("marks regions without a value, and draws nothing when no region has one", () => {
    const gaps = { ...values, statistic: Float64Array.from(t.map((v, i) => (i % 10 === 0 ? Number.NaN : v))) };
    expect(nodalFigure(demo, gaps, "gaps", "single")).toContain("no value");
    const none = { ...values, statistic: new Float64Array(demo.length).fill(Number.NaN) };
    expect(nodalFigure(demo, none, "nothing", "double")).toBeNull();
  });

  it("uses the cividis scale from 0 for an F statistic", () => {
    const f = { measure: "nodal strength", statisticName: "F", statistic: Float64Array.from(t.map((v) => v * v)), significant: t.map((v) => v * v > 12) };
    const svg = nodalFigure(demo, f, "F", "double")!;
    expectPrintable(svg);
    expect(svg).toContain("F (colour; disc area grows with F)");
  });
});
