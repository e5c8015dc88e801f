// Reading with `edges.missing: drop` and `transform: log1p`: NaN cells pass as missing edges
// (NaN in the data, left out later by the edge rules) in matrices (every binary reader goes
// through writeMatrixEdges) and in participants × edges tables (empty, NA, nan); log(1 + x) is
// Math.log1p (ECMA-262), checked here against values from memory of the natural logarithm:
// log(2) = 0.6931471805599453, log(11) = 2.3978952727983707.
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { edgePairs } from "../../../src/edges/edgeIndex.js";
import { isInputError } from "../../../src/errors.js";
import { writeMatrixEdges } from "../../../src/io/connectomeEdges.js";
import { loadEdgeTable } from "../../../src/io/edgeTable.js";
import { parseMatrixText } from "../../../src/io/matrixText.js";

const root = mkdtempSync(path.join(tmpdir(), "plexus-missing-edges-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));

const pairs = edgePairs(3);
const matrix = (a: number, b: number, c: number) => Float64Array.from([0, a, b, a, 0, c, b, c, 0]);
const edges = (m: Float64Array, options: Parameters<typeof writeMatrixEdges>[5]) => {
  const out = new Float64Array(3);
  writeMatrixEdges(m, 0, pairs, out, 0, options, { file: "m.tsv" });
  return [...out];
};
const base = { symmetrize: false, asymmetryTolerance: 1e-6 } as const;

describe("matrices", () => {
  it("a NaN cell is an error by default and a missing edge with missing: drop (either triangle, also when symmetrizing)", () => {
    expect(() => edges(matrix(1, NaN, 2), { ...base, transform: "none" })).toThrow(/must be finite/);
    expect(edges(matrix(1, NaN, 2), { ...base, transform: "none", missing: "drop" })).toEqual([1, NaN, 2]);
    const lowerOnly = Float64Array.from([0, 1, 5, 1, 0, 2, NaN, 2, 0]);
    expect(edges(lowerOnly, { ...base, symmetrize: true, transform: "none", missing: "drop" })).toEqual([1, NaN, 2]);
    // ±Inf stays an error with missing: drop.
    expect(() => edges(matrix(1, Infinity, 2), { ...base, transform: "none", missing: "drop" })).toThrow(/must be finite/);
  });

  it("log1p: log(1 + x), and a cell ≤ −1 is an InputError naming the file and the cell", () => {
    expect(edges(matrix(1, 10, 0), { ...base, transform: "log1p" })).toEqual([0.6931471805599453, 2.3978952727983707, 0]);
    try {
      edges(matrix(1, -1, 0), { ...base, transform: "log1p" });
      expect.unreachable();
    } catch (error) {
      expect(isInputError(error)).toBe(true);
      expect((error as Error).message).toMatch(/row 1, column 3 is -1; log1p/);
    }
  });

  it("text matrices take nan (any case) off the diagonal only with allowMissing; NA and empty cells stay errors", () => {
    const text = "0\tNaN\t1\nnan\t0\t2\n1\t2\t0\n";
    expect(() => parseMatrixText(text, "m.tsv", { allowNonFiniteDiagonal: true })).toThrow(/not finite/);
    const parsed = parseMatrixText(text, "m.tsv", { allowNonFiniteDiagonal: true, allowMissing: true });
    expect([...parsed.values]).toEqual([0, NaN, 1, NaN, 0, 2, 1, 2, 0]);
    expect(() => parseMatrixText("0\t1\t1\n1\t0\tNA\n1\tNA\t0\n", "m.tsv", { allowMissing: true })).toThrow(/not a number/);
  });
});

describe("participants × edges tables", () => {
  const subjects = [{ id: "a" }, { id: "b" }];
  const table = (rows: string) => {
    const file = path.join(root, `table-${Math.random().toString(36).slice(2)}.tsv`);
    writeFileSync(file, `participant_id\t1-2\t1-3\t2-3\n${rows}`);
    return file;
  };

  it("empty, NA and nan cells are missing edges with missing: drop, errors otherwise", () => {
    const file = table("a\t\tNA\tnan\nb\t1\t2\t3\n");
    expect(() => loadEdgeTable(file, subjects, { ...base, transform: "none" })).toThrow(/is empty/);
    const loaded = loadEdgeTable(file, subjects, { ...base, transform: "none", missing: "drop" });
    // Edge-major: data[e·S + s].
    expect([...loaded.data]).toEqual([NaN, 1, NaN, 2, NaN, 3]);
  });

  it("log1p maps x to log(1 + x) and refuses x ≤ −1 at its cell", () => {
    const loaded = loadEdgeTable(table("a\t1\t10\t0\nb\t0\t0\t0\n"), subjects, { ...base, transform: "log1p" });
    expect([...loaded.data]).toEqual([0.6931471805599453, 0, 2.3978952727983707, 0, 0, 0]);
    expect(() => loadEdgeTable(table("a\t-1\t0\t0\nb\t0\t0\t0\n"), subjects, { ...base, transform: "log1p" })).toThrow(/:2:2.*above -1|above -1/);
  });
});
