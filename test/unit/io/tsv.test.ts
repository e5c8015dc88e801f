import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parseTsv, readTsv } from "../../../src/io/tsv.js";
import { expectInputError, parsesOrInputError, resultOrInputError } from "./inputErrorAssertions.js";

describe("parseTsv", () => {
  it("parseTsv(text) returns the header, the rows and each row's file line", () => {
    const table = parseTsv("a\tb\tc\n1\t2\t3\n4\t5\t6\n", "t.tsv");
    expect(table).toMatchObject({
      file: "t.tsv",
      header: ["a", "b", "c"],
      rows: [
        ["1", "2", "3"],
        ["4", "5", "6"],
      ],
      lines: [2, 3],
      headerLine: 1,
    });
  });

  it("tolerates a byte-order mark, CRLF, spaces at line ends and blank lines, keeping true line numbers", () => {
    const text = "\uFEFF\r\nid\tage  \r\n\r\nsub-1\t30 \r\n   \r\n\t\nsub-2\tn/a\r\n\r\n\n";
    const table = parseTsv(text, "t.tsv");
    expect(table.header).toEqual(["id", "age"]);
    expect(table.headerLine).toBe(2);
    expect(table.rows).toEqual([
      ["sub-1", "30"],
      ["sub-2", "n/a"],
    ]);
    expect(table.lines).toEqual([4, 7]);
  });

  it("keeps empty cells between tabs", () => {
    expect(parseTsv("a\tb\tc\n\t\tx\n", "t.tsv").rows).toEqual([["", "", "x"]]);
  });

  it("a row with fewer fields than the header is an error naming the line and both counts", () => {
    expectInputError(() => parseTsv("a\tb\tc\n1\t2\t3\n4\t5\n", "t.tsv"), {
      file: "t.tsv",
      line: 3,
      message: ["expected 3", "found 2"],
    });
  });

  it("a trailing tab makes an extra empty field, and the hint says so", () => {
    expectInputError(() => parseTsv("a\tb\n1\t2\t\n", "t.tsv"), {
      file: "t.tsv",
      line: 2,
      message: ["expected 2", "found 3"],
      hint: /tab at the end/,
    });
  });

  it("an empty or blank file has no header", () => {
    expectInputError(() => parseTsv("", "e.tsv"), { file: "e.tsv", line: 1, message: ["empty file"] });
    expectInputError(() => parseTsv("\uFEFF\n \r\n\t\n", "e.tsv"), { file: "e.tsv", line: 1, message: ["header"] });
  });

  it("a repeated column name is an error naming its line and column", () => {
    expectInputError(() => parseTsv("\nid\tage\tage\n", "d.tsv"), {
      file: "d.tsv",
      line: 2,
      column: 3,
      message: ["duplicate column name 'age'", "column 2"],
    });
  });

  it("a column name with a control character is an error naming its column, printed escaped", () => {
    const error = expectInputError(() => parseTsv("id\tag\u001b[8me\n", "d.tsv"), { file: "d.tsv", line: 1, column: 2, message: ["'ag\\x1b[8me' has a control character"] });
    expect(error.message).not.toContain("\u001b");
  });

  it("an empty column name is an error naming its column", () => {
    expectInputError(() => parseTsv("id\t\tage\n", "d.tsv"), { file: "d.tsv", line: 1, column: 2 });
  });

  it("random text from a TSV-like alphabet either parses into consistent rows or raises an InputError", () => {
    const alphabet = fc.constantFrom("a", "b", "x", "\t", "\t", "\n", "\n", "\r", " ", "\uFEFF", "n/a", "1", "é");
    fc.assert(
      fc.property(fc.string({ unit: alphabet, maxLength: 80 }), (text) => {
        const table = resultOrInputError(() => parseTsv(text, "f.tsv"));
        if (table === undefined) return true;
        for (const row of table.rows) expect(row.length).toBe(table.header.length);
        for (let k = 1; k < table.lines.length; k++) expect(table.lines[k]).toBeGreaterThan(table.lines[k - 1]);
        return true;
      }),
      { numRuns: 5000 },
    );
  });

  it("arbitrary Unicode text never raises anything but an InputError", () => {
    fc.assert(
      fc.property(fc.string({ unit: "binary", maxLength: 200 }), (text) => parsesOrInputError(() => parseTsv(text, "f.tsv"))),
      { numRuns: 3000 },
    );
  });
});

describe("readTsv", () => {
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), "plexus-io-tsv-"));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it("reads a file and names it as the table's file", () => {
    const path = join(dir, "ok.tsv");
    writeFileSync(path, "a\tb\n1\t2\n");
    expect(readTsv(path)).toMatchObject({ file: path, header: ["a", "b"], rows: [["1", "2"]] });
  });

  it("a missing file is an InputError saying 'cannot read' with the system's reason and no stack", () => {
    const path = join(dir, "missing.tsv");
    const error = expectInputError(() => readTsv(path), { file: path, message: ["cannot read", "no such file or directory"] });
    expect(error.format()).toBe(`${path}: ${error.message}`);
  });

  it("a directory is an InputError naming it", () => {
    expectInputError(() => readTsv(dir), { file: dir, message: ["cannot read", "directory"] });
  });

  it("errors inside a read file name the path", () => {
    const path = join(dir, "bad.tsv");
    writeFileSync(path, "a\tb\n1\n");
    expectInputError(() => readTsv(path), { file: path, line: 2 });
  });
});
