// Edge lists (src/strength/readPairsFile.ts) and the sample-overlap check behind the
// double-dipping warning (src/strength/sampleOverlap.ts). Edge indices are checked against the
// i < j row-major order written out by hand for 4 regions: (1,2)=0, (1,3)=1, (1,4)=2, (2,3)=3,
// (2,4)=4, (3,4)=5. Every user mistake is an InputError naming the file, line and column.
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { InputError } from "../../../src/errors.js";
import type { ResultsSummary } from "../../../src/output/report/loadResults.js";
import { readPairsFile } from "../../../src/strength/readPairsFile.js";
import { circularityWarning, sampleOverlap } from "../../../src/strength/sampleOverlap.js";

const dir = mkdtempSync(path.join(tmpdir(), "plexus-edge-lists-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const regions = ["alpha", "beta", "gamma", "delta"].map((label) => ({ label }));

function file(name: string, text: string): string {
  const full = path.join(dir, name);
  writeFileSync(full, text);
  return full;
}

function located(run: () => unknown): InputError {
  try {
    run();
  } catch (error) {
    if (error instanceof InputError) return error;
    throw error;
  }
  throw new Error("expected an InputError");
}

describe("readPairsFile", () => {
  it("maps label pairs, in either order, to ascending edge indices; other columns are ignored", () => {
    const edges = readPairsFile(file("ok.tsv", "weight\tregion_b\tregion_a\n1\tdelta\tgamma\n2\talpha\tbeta\n3\tbeta\tdelta\n"), regions);
    expect(Array.from(edges)).toEqual([0, 4, 5]);
  });

  it("an unknown label names the file, line and column and suggests the nearest label", () => {
    const error = located(() => readPairsFile(file("unknown.tsv", "region_a\tregion_b\nalpha\tbeta\ngama\tdelta\n"), regions));
    expect(error.location).toMatchObject({ line: 3, column: 1 });
    expect(error.format()).toContain("did you mean 'gamma'?");
  });

  it("a region paired with itself, a repeated pair, a missing column and an empty list are located errors", () => {
    expect(located(() => readPairsFile(file("self.tsv", "region_a\tregion_b\nbeta\tbeta\n"), regions)).location).toMatchObject({ line: 2 });
    const repeated = located(() => readPairsFile(file("twice.tsv", "region_a\tregion_b\nalpha\tbeta\nbeta\talpha\n"), regions));
    expect(repeated.location).toMatchObject({ line: 3 });
    expect(repeated.message).toContain("line 2");
    expect(located(() => readPairsFile(file("columns.tsv", "from\tto\nalpha\tbeta\n"), regions)).message).toContain("region_a and region_b");
    expect(located(() => readPairsFile(file("empty.tsv", "region_a\tregion_b\n"), regions)).message).toContain("no rows");
  });
});

describe("sampleOverlap and the double-dipping warning", () => {
  const summary = {
    inputs: [
      { role: "design", path: "d.yaml", sha256: "d" },
      { role: "connectome", path: "a.tsv", sha256: "h1" },
      { role: "connectome", path: "b.tsv", sha256: "h2" },
    ],
    subjects: { in_table: 2, used: 2, used_ids: ["sub-1", "sub-2"], excluded: [] },
  } as unknown as ResultsSummary;

  it("the same files: a warning that says it is circular and what would be valid", () => {
    const overlap = sampleOverlap(summary, [{ role: "connectome", path: "x", sha256: "h2" }], ["sub-2", "sub-9"]);
    expect(overlap).toEqual({ sharedFiles: 1, sharedParticipants: 1, usedThere: 2, usedHere: 2 });
    const warning = circularityWarning(overlap, "results/x");
    expect(warning).toContain("circular (double dipping)");
    expect(warning).toContain("an independent sample");
    expect(warning).toContain("cross-validation");
  });

  it("other files, shared IDs: a conditional warning; neither: none", () => {
    const shared = sampleOverlap(summary, [{ role: "connectome", path: "x", sha256: "h9" }], ["sub-1"]);
    expect(circularityWarning(shared, "results/x")).toContain("If they are the same people");
    const independent = sampleOverlap(summary, [{ role: "connectome", path: "x", sha256: "h9" }], ["rep-1"]);
    expect(circularityWarning(independent, "results/x")).toBeUndefined();
  });
});
