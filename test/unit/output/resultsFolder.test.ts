// A results folder reads back what it has just written (the report reads the tables) from its
// temporary staging folder; an input error raised there must name the folder the user asked for,
// never the temporary path, and errors about other files pass through unchanged.
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { InputError } from "../../../src/errors.js";
import { ResultsFolder } from "../../../src/output/resultsFolder.js";

const root = mkdtempSync(path.join(tmpdir(), "plexus-results-folder-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));

function caught(work: () => void): InputError {
  try {
    work();
  } catch (error) {
    return error as InputError;
  }
  throw new Error("expected an error");
}

describe("ResultsFolder.readingBack", () => {
  it("names the results folder, not the staging folder, in an input error about a file it wrote", () => {
    const folder = ResultsFolder.open(path.join(root, "results"), { force: false });
    try {
      const error = caught(() =>
        folder.readingBack(() => {
          throw new InputError("duplicate column 'participant_id'", { file: path.join(folder.staging, "subjects.tsv"), line: 1 });
        }),
      );
      expect(error).toBeInstanceOf(InputError);
      expect(error.location.file).toBe(path.join(root, "results", "subjects.tsv"));
      expect(error.format()).not.toContain("plexus-tmp");
      expect(error.format()).toContain("nothing was written");
    } finally {
      folder.abandon();
    }
  });

  it("passes other errors through unchanged", () => {
    const folder = ResultsFolder.open(path.join(root, "other"), { force: false });
    try {
      const elsewhere = new InputError("bad cell", { file: "/study/participants.tsv", line: 3 });
      expect(caught(() => folder.readingBack(() => { throw elsewhere; }))).toBe(elsewhere);
      expect(folder.readingBack(() => 42)).toBe(42);
    } finally {
      folder.abandon();
    }
  });
});
