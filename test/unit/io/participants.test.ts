import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parseParticipants, readParticipants } from "../../../src/io/participants.js";
import { expectInputError, parsesOrInputError, resultOrInputError } from "./inputErrorAssertions.js";

const TABLE = [
  "participant_id\tgroup\tage\tsite",
  "sub-ash01\tpatient\t34\tnorth",
  "sub-ash02\tcontrol\tn/a\t",
  "sub-ash03\tcontrol\t29\tsouth",
].join("\n");

describe("parseParticipants", () => {
  it("returns the IDs, every column by name (participant_id included) and the file lines", () => {
    const table = parseParticipants(TABLE, "participants.tsv");
    expect(table.ids).toEqual(["sub-ash01", "sub-ash02", "sub-ash03"]);
    expect(table.header).toEqual(["participant_id", "group", "age", "site"]);
    expect(table.lines).toEqual([2, 3, 4]);
    expect([...table.columns.keys()]).toEqual(table.header);
    expect(table.columns.get("participant_id")).toEqual(table.ids);
    expect(table.columns.get("group")).toEqual(["patient", "control", "control"]);
  });

  it("reads n/a and empty cells as null (the BIDS missing-value marker)", () => {
    const table = parseParticipants(TABLE, "participants.tsv");
    expect(table.columns.get("age")).toEqual(["34", null, "29"]);
    expect(table.columns.get("site")).toEqual(["north", null, "south"]);
  });

  it("a first column other than participant_id is an error on line 1, column 1", () => {
    expectInputError(() => parseParticipants("subject\tage\ns1\t3\n", "p.tsv"), {
      file: "p.tsv",
      line: 1,
      column: 1,
      message: ["participant_id", "'subject'"],
    });
  });

  it("a repeated participant_id is an error naming both lines", () => {
    expectInputError(() => parseParticipants("participant_id\tage\ns1\t3\ns2\t4\n\ns1\t5\n", "p.tsv"), {
      file: "p.tsv",
      line: 5,
      column: 1,
      message: ["duplicate participant_id 's1'", "lines 2 and 5"],
    });
  });

  it("an empty or n/a participant_id is an error naming the line", () => {
    expectInputError(() => parseParticipants("participant_id\tage\n\t3\n", "p.tsv"), { file: "p.tsv", line: 2, column: 1 });
    expectInputError(() => parseParticipants("participant_id\tage\ns1\t3\nn/a\t4\n", "p.tsv"), {
      file: "p.tsv",
      line: 3,
      column: 1,
    });
  });

  it("reads every default missing-value code as null: empty, n/a, N/A, NA, NaN, nan (and nothing else)", () => {
    const text = "participant_id\tage\ns1\t\ns2\tn/a\ns3\tN/A\ns4\tNA\ns5\tNaN\ns6\tnan\ns7\tna\ns8\tNULL\ns9\t41\n";
    const table = parseParticipants(text, "p.tsv");
    expect(table.columns.get("age")).toEqual([null, null, null, null, null, null, "na", "NULL", "41"]);
  });

  it("takes the missing-value codes as a parameter (the design's missing_values)", () => {
    const text = "participant_id\tage\ns1\t-999\ns2\tNA\ns3\t\n";
    expect(parseParticipants(text, "p.tsv", ["-999"]).columns.get("age")).toEqual([null, "NA", null]);
    expect(parseParticipants(text, "p.tsv", []).columns.get("age")).toEqual(["-999", "NA", null]);
  });

  it("an empty cell is missing whatever the codes (an empty category or number means nothing)", () => {
    const text = "participant_id\tsex\ns1\tF\ns2\t\ns3\t  \ns4\tM\n";
    expect(parseParticipants(text, "p.tsv", ["-999"]).columns.get("sex")).toEqual(["F", null, null, "M"]);
    expect(parseParticipants(text, "p.tsv", []).columns.get("sex")).toEqual(["F", null, null, "M"]);
  });

  it("reports every ID problem in one error, in line order: empty, missing-value code, repeated", () => {
    const text = "participant_id\tage\ns1\t3\n\t4\ns1\t5\nNA\t6\ns2\t7\ns2\t8\n";
    const error = expectInputError(() => parseParticipants(text, "p.tsv"), { file: "p.tsv", line: 3, column: 1, message: ["empty participant_id"] });
    expect(error.problems.map((p) => [p.location.line, p.message])).toEqual([
      [3, "empty participant_id: every row needs an ID"],
      [4, "duplicate participant_id 's1' on lines 2 and 4"],
      [5, "missing participant_id ('NA' is a missing-value code): every row needs an ID"],
      [7, "duplicate participant_id 's2' on lines 6 and 7"],
    ]);
  });

  it("a participant_id that is a missing-value code is an error naming the line", () => {
    expectInputError(() => parseParticipants("participant_id\tage\ns1\t3\nNA\t4\n", "p.tsv"), {
      file: "p.tsv",
      line: 3,
      column: 1,
      message: ["missing participant_id ('NA' is a missing-value code)"],
    });
    expect(parseParticipants("participant_id\tage\nNA\t4\n", "p.tsv", ["n/a"]).ids).toEqual(["NA"]);
  });

  it("an ID with a control character is refused at its line and column, and printed escaped", () => {
    const error = expectInputError(() => parseParticipants("participant_id\tage\ns\u001b[31m\t3\ns\u001b[31m\t4\ns\u0007\t5\n", "p.tsv"), {
      file: "p.tsv",
      line: 2,
      column: 1,
      message: ["participant_id 's\\x1b[31m' has a control character"],
    });
    expect(error.problems.map((p) => p.location.line)).toEqual([2, 3, 3, 4]); // line 3: control character and duplicate
    expect(error.format()).toContain("duplicate participant_id 's\\x1b[31m' on lines 2 and 3");
    expect(error.format()).toContain("'s\\x07' has a control character");
    expect(error.format()).not.toMatch(/[\u0000-\u0009\u000b-\u001f]/);
  });

  it("a header without rows is an 'empty participants table'", () => {
    expectInputError(() => parseParticipants("participant_id\tage\n\n", "p.tsv"), {
      file: "p.tsv",
      line: 1,
      message: ["empty participants table"],
    });
  });

  it("field-count errors of the underlying TSV keep their line", () => {
    expectInputError(() => parseParticipants("participant_id\tage\ns1\n", "p.tsv"), { file: "p.tsv", line: 2 });
  });

  it("random tables either parse into consistent columns or raise an InputError", () => {
    const cell = fc.constantFrom("", "n/a", "s1", "s2", "participant_id", "x y", "7");
    const line = fc.array(cell, { minLength: 0, maxLength: 4 }).map((cells) => cells.join("\t"));
    const text = fc
      .tuple(fc.boolean(), fc.array(line, { maxLength: 6 }), fc.constantFrom("\n", "\r\n"))
      .map(([bom, lines, eol]) => (bom ? "\uFEFF" : "") + lines.join(eol));
    fc.assert(
      fc.property(text, (t) => {
        const table = resultOrInputError(() => parseParticipants(t, "p.tsv"));
        if (table === undefined) return true;
        expect(table.header[0]).toBe("participant_id");
        expect(new Set(table.ids).size).toBe(table.ids.length);
        for (const values of table.columns.values()) expect(values.length).toBe(table.ids.length);
        return true;
      }),
      { numRuns: 5000 },
    );
  });

  it("arbitrary text never raises anything but an InputError", () => {
    const unit = fc.constantFrom("participant_id", "\t", "\n", "\r", " ", "n/a", "a", "\uFEFF");
    fc.assert(
      fc.property(fc.string({ unit, maxLength: 60 }), (t) => parsesOrInputError(() => parseParticipants(t, "p.tsv"))),
      { numRuns: 5000 },
    );
  });
});

describe("readParticipants", () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), "plexus-io-participants-"));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it("reads a participants file", () => {
    const path = join(dir, "participants.tsv");
    writeFileSync(path, TABLE);
    expect(readParticipants(path)).toMatchObject({ file: path, ids: ["sub-ash01", "sub-ash02", "sub-ash03"] });
  });

  it("a missing participants file is an InputError naming it", () => {
    const path = join(dir, "nope.tsv");
    expectInputError(() => readParticipants(path), { file: path, message: ["cannot read"] });
  });
});
