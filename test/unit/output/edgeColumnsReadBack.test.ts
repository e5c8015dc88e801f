// A report made right after a run takes each contrast's edge columns from memory
// (src/output/resultTables.ts edgeColumnsReadBack) instead of parsing the edges.tsv just
// written. The reference is the report's own reader of a results folder on disk
// (src/output/report/loadResults.ts): for the same columns, written by edgesTable and read back,
// the values must be the same bit for bit (tolerance: none; -0 and 0 count as different).
import fc from "fast-check";
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { edgePairs } from "../../../src/edges/edgeIndex.js";
import { componentsTable, edgeColumnsReadBack, edgesTable, regionsTable, type ExtraEdgeColumn } from "../../../src/output/resultTables.js";
import { formatTsv } from "../../../src/output/tsvWriter.js";
import type { EdgeColumns } from "../../../src/output/edgeColumns.js";
import { loadResults } from "../../../src/output/report/loadResults.js";

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "plexus-edge-readback-"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const LABELS = ["1", '"quoted"', "=formula", "-left", "Région α", "R6"];

/** A minimal results folder with one contrast whose edges.tsv is edgesTable's text for these columns. */
function writeFolder(name: string, columns: Parameters<typeof edgesTable>): string {
  const folder = join(dir, name);
  mkdirSync(join(folder, "c1"), { recursive: true });
  const [pairs, regions] = columns;
  const summary = {
    tool: { name: "plexus", version: "test" },
    command: null,
    inputs: [],
    subjects: { in_table: 0, used: 0, used_ids: [], excluded: [] },
    regions: regions.length,
    edges: pairs.edgeCount,
    design: { model: "x", intercept: true, columns: ["(Intercept)", "x"], coding: "", levels: {}, centered: {}, rank: 2 },
    df: 10,
    contrasts: [{ name: "c1", expression: "x", vector: [0, 1], df: 10, mode: null }],
    options: { inference: { method: "fdr", threshold: 3, size: "extent", tail: "upper", fdr: "bh", alpha: 0.05 } },
    warnings: [],
  };
  writeFileSync(join(folder, "summary.json"), JSON.stringify(summary));
  writeFileSync(join(folder, "regions.tsv"), regionsTable(regions));
  writeFileSync(join(folder, "subjects.tsv"), formatTsv(["participant_id", "included", "exclusion_reason"], []));
  writeFileSync(join(folder, "c1", "components.tsv"), componentsTable([], {}));
  writeFileSync(join(folder, "c1", "edges.tsv"), edgesTable(...columns));
  return folder;
}

function expectSameBits(actual: ArrayLike<number>, expected: ArrayLike<number>, label: string, inputs: unknown): void {
  expect(actual.length, `${label}: length`).toBe(expected.length);
  for (let e = 0; e < expected.length; e++) {
    if (!Object.is(actual[e], expected[e])) {
      throw new Error(
        [
          `${label}: edge ${e} differs (tolerance: 0, bit for bit)`,
          `  expected (read from edges.tsv): ${Object.is(expected[e], -0) ? "-0" : expected[e]}`,
          `  actual (from memory):          ${Object.is(actual[e], -0) ? "-0" : actual[e]}`,
          `  difference: ${actual[e] - expected[e]}`,
          `  inputs: ${JSON.stringify(inputs, (_, v) => (typeof v === "number" && !Number.isFinite(v) ? String(v) : v))}`,
        ].join("\n"),
      );
    }
  }
}

function compare(read: EdgeColumns, memory: EdgeColumns, inputs: unknown): void {
  for (const key of ["regionA", "regionB", "statistic", "estimate", "pUncorrected", "qFdr", "component", "partialR", "standardError", "partialEtaSquared"] as const) {
    expectSameBits(memory[key], read[key], key, inputs);
  }
  expect(memory.pFwe === undefined, "pFwe present in one and not the other").toBe(read.pFwe === undefined);
  if (read.pFwe) expectSameBits(memory.pFwe!, read.pFwe, "pFwe", inputs);
  expect(memory.effects === undefined, "effect sizes present in one and not the other").toBe(read.effects === undefined);
  if (read.effects && memory.effects) {
    for (const key of ["ciLow", "ciHigh", "cohensD", "cohensDLow", "cohensDHigh"] as const) expectSameBits(memory.effects[key], read.effects[key], key, inputs);
    expect(memory.effects.means?.levels).toEqual(read.effects.means?.levels);
    if (read.effects.means) {
      expectSameBits(memory.effects.means!.first, read.effects.means.first, "means.first", inputs);
      expectSameBits(memory.effects.means!.second, read.effects.means.second, "means.second", inputs);
    }
  }
}

const specialNumbers = fc.constantFrom(0, -0, NaN, Infinity, -Infinity, 5e-324, -1e21, 1e-7, 1.7976931348623157e308);
const edges = 15; // 6 regions
const column = fc.array(fc.oneof(fc.double(), specialNumbers), { minLength: edges, maxLength: edges }).map((v) => Float64Array.from(v));
const ids = fc.array(fc.integer({ min: -3, max: 20 }), { minLength: edges, maxLength: edges }).map((v) => Int32Array.from(v));
const extraKinds: ((a: Float64Array, b: Float64Array, c: Float64Array) => ExtraEdgeColumn[])[] = [
  (a, b) => [
    { name: "partial_r", values: a },
    { name: "standard_error", values: b },
  ],
  (a) => [{ name: "partial_eta_squared", values: a }],
  (a, b, c) => [
    { name: "p_fwe", values: c },
    { name: "partial_r", values: a },
    { name: "standard_error", values: b },
  ],
  (a, b, c) => [
    { name: "enhanced", values: b },
    { name: "p_fwe", values: c },
    { name: "partial_eta_squared", values: a },
  ],
  // A t contrast with effect sizes (output/effectSizeColumns.ts), with and without the levels' means.
  (a, b, c) => [
    { name: "partial_r", values: a },
    { name: "standard_error", values: b },
    { name: "ci_low", values: c },
    { name: "ci_high", values: a },
    { name: "cohens_d", values: b },
    { name: "cohens_d_ci_low", values: c },
    { name: "cohens_d_ci_high", values: a },
  ],
  (a, b, c) => [
    { name: "p_fwe", values: c },
    { name: "partial_r", values: a },
    { name: "standard_error", values: b },
    { name: "ci_low", values: c },
    { name: "ci_high", values: a },
    { name: "cohens_d", values: b },
    { name: "cohens_d_ci_low", values: c },
    { name: "cohens_d_ci_high", values: a },
    { name: "r_Région α", values: b },
    { name: "r_control", values: c },
  ],
];

describe("edgeColumnsReadBack equals what loadResults reads from edgesTable's text", () => {
  it("on random columns with -0, NaN, infinities and subnormals (fast-check, 100 runs per layout)", () => {
    const regions = LABELS.map((label) => ({ label }));
    const pairs = edgePairs(regions.length);
    let run = 0;
    for (const [k, extraOf] of extraKinds.entries()) {
      fc.assert(
        fc.property(column, column, column, column, ids, column, column, column, (t, b, p, q, id, x1, x2, x3) => {
          const extra = extraOf(x1, x2, x3);
          const columns: Parameters<typeof edgesTable> = [pairs, regions, t, b, p, q, id, extra];
          const folder = writeFolder(`run-${run++}`, columns);
          const read = loadResults(folder).contrasts[0].edges;
          const memory = edgeColumnsReadBack(pairs, t, b, p, q, id, extra);
          compare(read, memory, { layout: k, t: [...t], estimate: [...b], p: [...p], q: [...q], id: [...id], extra: extra.map((c) => c.name) });
        }),
        { numRuns: 100 },
      );
    }
  });
});
