// The results tables (src/output/tsvWriter.ts, src/output/resultTables.ts) are written without
// csv-stringify now; their text must be what csv-stringify 6.9.0 (a general-purpose CSV library,
// a dependency of plexus) wrote with the options plexus used: delimiter tab, record delimiter "\n",
// quoted_match /[\t\n\r"]/. That library is the reference here, run on the same cells; every
// comparison is exact (tolerance: none, byte for byte).
import { stringify } from "csv-stringify/sync";
import fc from "fast-check";
import { Buffer } from "node:buffer";
import { describe, expect, it } from "vitest";
import { edgePairs } from "../../../src/edges/edgeIndex.js";
import type { Region } from "../../../src/io/regions.js";
import { EDGE_COLUMNS, edgesTable, type ExtraEdgeColumn } from "../../../src/output/resultTables.js";
import { formatNumber, formatTsv, neutralizeText, NumberTexts, type Cell } from "../../../src/output/tsvWriter.js";

/** The cell formatting plexus did before csv-stringify quoted the cells (unchanged in tsvWriter.ts). */
function referenceCell(cell: Cell): string {
  if (cell === null || cell === undefined) return "";
  if (typeof cell === "number") return formatNumber(cell);
  return neutralizeText(cell);
}

/** The reference: csv-stringify with the options plexus passed it. */
function referenceTsv(header: string[], rows: Cell[][]): string {
  return stringify([header, ...rows.map((row) => row.map(referenceCell))], {
    delimiter: "\t",
    record_delimiter: "\n",
    quoted_match: /[\t\n\r"]/,
  });
}

/** Text cells made of the characters that matter: separators, quotes, formula starts, non-ASCII, a lone surrogate. */
const hostileText = fc
  .array(fc.constantFrom("a", "Z", "0", "9", ".", "e", "\t", "\n", "\r", '"', "'", "=", "+", "-", "@", " ", "é", "α", "😀", "\ud800", ","), {
    maxLength: 8,
  })
  .map((parts) => parts.join(""));
const specialNumbers = fc.constantFrom(0, -0, NaN, Infinity, -Infinity, 5e-324, 1e21, -1e-7, 1.7976931348623157e308, 123456789012345680000);
const cell: fc.Arbitrary<Cell> = fc.oneof(hostileText, fc.double(), specialNumbers, fc.integer(), fc.constant(null), fc.constant(undefined));

describe("formatTsv gives csv-stringify's text (reference: csv-stringify 6.9.0 with plexus's options)", () => {
  it("on hand-picked cells: quotes, tabs, newlines, formulas, numbers and empty rows", () => {
    const header = ["name", 'a"b', "tab\there", "plain"];
    const rows: Cell[][] = [
      ['say "hi"', "=SUM(A1)", "-3", "line\nbreak"],
      ["\r", -0, NaN, Infinity],
      [],
      ["", null, undefined, "é—😀"],
      ["+1", "@x", "-x", "'=y"],
    ];
    expect(formatTsv(header, rows)).toBe(referenceTsv(header, rows));
  });

  it("on random tables (fast-check, 500 runs)", () => {
    fc.assert(
      fc.property(fc.array(hostileText, { maxLength: 5 }), fc.array(fc.array(cell, { maxLength: 6 }), { maxLength: 6 }), (header, rows) => {
        expect(formatTsv(header, rows)).toBe(referenceTsv(header, rows));
      }),
      { numRuns: 500 },
    );
  });
});

describe("NumberTexts gives formatNumber's text for every value", () => {
  it("including -0 after 0 and NaN, and past its limit", () => {
    const texts = new NumberTexts(3);
    const values = [0, -0, NaN, 1.5, -0, 0.1 + 0.2, Infinity, 1.5, 7e-300, 0];
    for (const value of values) expect(texts.text(value), `value ${value}`).toBe(formatNumber(value));
  });
});

/** The edges.tsv rows as src/output/resultTables.ts built them before it wrote bytes directly. */
function referenceEdges(
  regions: Region[],
  statistic: Float64Array,
  estimate: Float64Array,
  p: Float64Array,
  q: Float64Array,
  labels: Int32Array,
  extra: ExtraEdgeColumn[],
): Buffer {
  const pairs = edgePairs(regions.length);
  const rows: Cell[][] = [];
  for (let e = 0; e < pairs.edgeCount; e++) {
    const finite = Number.isFinite(statistic[e]);
    rows.push([
      regions[pairs.regionA[e]].label,
      regions[pairs.regionB[e]].label,
      finite ? statistic[e] : null,
      estimate[e],
      finite ? p[e] : null,
      finite ? q[e] : null,
      labels[e] > 0 ? labels[e] : null,
      ...extra.map((c) => c.values[e]),
    ]);
  }
  return Buffer.from(referenceTsv([...EDGE_COLUMNS, ...extra.map((c) => c.name)], rows), "utf8");
}

describe("edgesTable writes the UTF-8 bytes of csv-stringify's text for the same rows", () => {
  const labelSets: string[][] = [
    ["1", "2", "3", "4", "5", "6"],
    ['say "hi"', "=HYPERLINK()", "-left", "Région α", "tab\tin", "😀\ud800"],
  ];
  for (const labels of labelSets) {
    it(`regions ${JSON.stringify(labels)}, random columns with -0, NaN and infinities (fast-check, 200 runs)`, () => {
      const regions = labels.map((label) => ({ label }));
      const edges = (regions.length * (regions.length - 1)) / 2;
      const column = fc.array(fc.oneof(fc.double(), specialNumbers), { minLength: edges, maxLength: edges }).map((v) => Float64Array.from(v));
      const ids = fc.array(fc.integer({ min: -2, max: 40 }), { minLength: edges, maxLength: edges }).map((v) => Int32Array.from(v));
      fc.assert(
        fc.property(column, column, column, column, ids, column, column, fc.boolean(), (t, b, p, q, id, x1, x2, twoExtra) => {
          const extra: ExtraEdgeColumn[] = twoExtra
            ? [
                { name: "partial_r", values: x1 },
                { name: "standard_error", values: x2 },
              ]
            : [{ name: "partial_eta_squared", values: x1 }];
          const actual = Buffer.from(edgesTable(edgePairs(regions.length), regions, t, b, p, q, id, extra));
          const expected = referenceEdges(regions, t, b, p, q, id, extra);
          if (!actual.equals(expected)) {
            // Show the first differing line (tolerance: none).
            const a = actual.toString("utf8").split("\n");
            const e = expected.toString("utf8").split("\n");
            const line = a.findIndex((text, k) => text !== e[k]);
            throw new Error(`edges.tsv differs at line ${line + 1}:\n  expected ${JSON.stringify(e[line])}\n  actual   ${JSON.stringify(a[line])}`);
          }
        }),
        { numRuns: 200 },
      );
    });
  }

  it("for a table of 400 regions (79,800 rows; the buffer grows past its first guess)", () => {
    const regions = Array.from({ length: 400 }, (_, k) => ({ label: `R-${k + 1}-${"x".repeat(k % 40)}` }));
    const pairs = edgePairs(400);
    const n = pairs.edgeCount;
    const t = new Float64Array(n).map((_, e) => (e % 997 === 0 ? NaN : Math.sin(e) * 7.123456789));
    const b = new Float64Array(n).map((_, e) => Math.cos(e) / 3e-5);
    const p = new Float64Array(n).map((_, e) => Math.abs(Math.sin(e * 1.1)) * 1e-9);
    const q = new Float64Array(n).map((_, e) => Math.round(Math.abs(Math.sin(e)) * 200) / 201);
    const id = new Int32Array(n).map((_, e) => (e % 5 === 0 ? e % 37 : 0));
    const extra: ExtraEdgeColumn[] = [{ name: "p_fwe", values: new Float64Array(n).map((_, e) => -Math.sin(e) * 1e-310) }];
    const actual = Buffer.from(edgesTable(pairs, regions, t, b, p, q, id, extra));
    const expected = referenceEdges(regions, t, b, p, q, id, extra);
    expect(actual.length).toBe(expected.length);
    expect(actual.equals(expected)).toBe(true);
  });
});
