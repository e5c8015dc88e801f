import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { defaultRegions, parseRegions, readRegions } from "../../../src/io/regions.js";
import { expectInputError, resultOrInputError } from "./inputErrorAssertions.js";

// Invented labels and coordinates.
const TABLE = [
  "label\tx\ty\tz\themisphere\tsystem\tnote",
  "brim-A\t-31.5\t12\t4e1\tleft\tsignal\tanything",
  "brim-B\t30\t-8.25\t0\tright\tn/a\t",
  "core\t0\t0\t-12\tn/a\tsignal\tx",
].join("\n");

describe("parseRegions", () => {
  it("reads labels, coordinates, hemisphere and system, ignoring extra columns", () => {
    expect(parseRegions(TABLE, "regions.tsv")).toEqual([
      { label: "brim-A", x: -31.5, y: 12, z: 40, hemisphere: "left", system: "signal" },
      { label: "brim-B", x: 30, y: -8.25, z: 0, hemisphere: "right" },
      { label: "core", x: 0, y: 0, z: -12, system: "signal" },
    ]);
  });

  it("needs only a label column, in any position", () => {
    expect(parseRegions("note\tlabel\nfoo\tr1\n\tr2\n", "r.tsv")).toEqual([{ label: "r1" }, { label: "r2" }]);
  });

  it("accepts a row count equal to the expected count", () => {
    expect(parseRegions(TABLE, "regions.tsv", 3)).toHaveLength(3);
  });

  it("a table without a label column is an error on the header line", () => {
    expectInputError(() => parseRegions("name\tx\na\t1\n", "r.tsv"), { file: "r.tsv", line: 1, message: ["'label'"] });
  });

  it("x, y and z come all three or none", () => {
    expectInputError(() => parseRegions("label\tx\ty\na\t1\t2\n", "r.tsv"), { file: "r.tsv", line: 1, message: ["missing z"] });
  });

  it.each(["abc", "n/a", "", "1,5", "Infinity", "1e999", "0x10"])("the coordinate '%s' is an error naming line and column", (cell) => {
    expectInputError(() => parseRegions(`label\tx\ty\tz\na\t1\t${cell}\t3\n`, "r.tsv"), {
      file: "r.tsv",
      line: 2,
      column: 3,
      message: ["coordinate y", "'a'"],
    });
  });

  it("a repeated label is an error naming both lines", () => {
    expectInputError(() => parseRegions("label\nr1\nr2\n\nr1\n", "r.tsv"), {
      file: "r.tsv",
      line: 5,
      column: 1,
      message: ["duplicate region label 'r1'", "lines 2 and 5"],
    });
  });

  it("an empty or n/a label is an error", () => {
    expectInputError(() => parseRegions("x\ty\tz\tlabel\n1\t2\t3\tn/a\n", "r.tsv"), { file: "r.tsv", line: 2, column: 4 });
  });

  it("a control character in a label, hemisphere or system is an error at file:line:column, every such cell at once", () => {
    const text = "label\themisphere\tsystem\nA\u001b[2J\tL\tvis\nB\tR\u0000\tvis\nC\tL\tdm\r\u0085\n";
    const error = expectInputError(() => parseRegions(text, "r.tsv"), { file: "r.tsv", line: 2, column: 1, message: ["label 'A\\x1b[2J' has a control character"] });
    expect(error.problems.map((p) => [p.location.line, p.location.column])).toEqual([
      [2, 1],
      [3, 2],
      [4, 3],
    ]);
  });

  it("reports a repeated label and a bad coordinate of later rows together", () => {
    const error = expectInputError(() => parseRegions("label\tx\ty\tz\nA\t1\t2\t3\nA\t1\t2\t3\nB\t1\tq\t3\n", "r.tsv"), { file: "r.tsv", line: 3, column: 1 });
    expect(error.problems.map((p) => p.location.line)).toEqual([3, 4]);
  });

  it("a row count other than the expected count names both counts", () => {
    expectInputError(() => parseRegions(TABLE, "regions.tsv", 4), {
      file: "regions.tsv",
      line: 4,
      message: ["3 rows", "4 regions"],
    });
    expectInputError(() => parseRegions(TABLE, "regions.tsv", 2), {
      file: "regions.tsv",
      line: 4,
      message: ["3 rows", "2 regions"],
    });
  });

  it("a table without rows is an error", () => {
    expectInputError(() => parseRegions("label\n", "r.tsv"), { file: "r.tsv", line: 1, message: ["no rows"] });
  });

  it("random tables either parse into unique labels or raise an InputError", () => {
    const cell = fc.constantFrom("", "n/a", "r1", "r2", "label", "x", "y", "z", "1.5", "-2", "abc", "left");
    const line = fc.array(cell, { maxLength: 5 }).map((cells) => cells.join("\t"));
    fc.assert(
      fc.property(fc.array(line, { maxLength: 6 }), fc.option(fc.nat(6)), (lines, count) => {
        const regions = resultOrInputError(() => parseRegions(lines.join("\n"), "r.tsv", count ?? undefined));
        if (regions === undefined) return true;
        expect(new Set(regions.map((r) => r.label)).size).toBe(regions.length);
        if (count !== null) expect(regions.length).toBe(count);
        for (const r of regions) expect([r.x, r.y, r.z].every((v) => v === undefined || Number.isFinite(v))).toBe(true);
        return true;
      }),
      { numRuns: 5000 },
    );
  });
});

describe("readRegions", () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), "plexus-io-regions-"));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it("reads a file and checks the expected count against it", () => {
    const path = join(dir, "regions.tsv");
    writeFileSync(path, TABLE);
    expect(readRegions(path, 3).map((r) => r.label)).toEqual(["brim-A", "brim-B", "core"]);
    expectInputError(() => readRegions(path, 5), { file: path, line: 4, message: ["3 rows", "5 regions"] });
  });

  it("a missing file is an InputError naming it", () => {
    const path = join(dir, "none.tsv");
    expectInputError(() => readRegions(path), { file: path, message: ["cannot read"] });
  });
});

describe("defaultRegions", () => {
  it("defaultRegions(n) labels regions '1' … 'n'", () => {
    expect(defaultRegions(3)).toEqual([{ label: "1" }, { label: "2" }, { label: "3" }]);
    expect(defaultRegions(0)).toEqual([]);
  });
});
