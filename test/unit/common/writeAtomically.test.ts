// common/writeAtomically.ts: every file is written to a temporary sibling and renamed into place,
// so a reader sees the old file or the whole new one; a failed write leaves no temporary behind.
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { writeAtomically, writeFilesAtomically } from "../../../src/common/writeAtomically.js";

const scratch = (): string => mkdtempSync(join(tmpdir(), "plexus-atomic-"));

describe("writeAtomically", () => {
  it("replaces a file's content and leaves only the file", () => {
    const dir = scratch();
    const file = join(dir, "a.json");
    writeFileSync(file, "old");
    writeAtomically(file, "new");
    expect(readFileSync(file, "utf8")).toBe("new");
    expect(readdirSync(dir)).toEqual(["a.json"]);
  });

  it("writes every file of a set to its own temporary first, then renames them all", () => {
    const dir = scratch();
    writeFilesAtomically([
      { file: join(dir, "values.tsv"), content: "x\n", temporary: join(dir, ".values.tmp") },
      { file: join(dir, "record.json"), content: new TextEncoder().encode("{}\n") },
    ]);
    expect(readFileSync(join(dir, "values.tsv"), "utf8")).toBe("x\n");
    expect(readFileSync(join(dir, "record.json"), "utf8")).toBe("{}\n");
    expect(readdirSync(dir).sort()).toEqual(["record.json", "values.tsv"]);
  });

  it("throws when a rename fails, removes the temporaries and leaves the targets as they were", () => {
    const dir = scratch();
    const first = join(dir, "first.txt");
    writeFileSync(first, "kept");
    // A folder with a file in it cannot be replaced by a rename.
    const blocked = join(dir, "blocked");
    mkdirSync(blocked);
    writeFileSync(join(blocked, "inside"), "");
    expect(() =>
      writeFilesAtomically([
        { file: blocked, content: "never" },
        { file: first, content: "never" },
      ]),
    ).toThrow();
    expect(readFileSync(first, "utf8")).toBe("kept");
    expect(existsSync(join(blocked, "inside"))).toBe(true);
    expect(readdirSync(dir).sort()).toEqual(["blocked", "first.txt"]);
  });
});
