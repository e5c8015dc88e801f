// The SHA-256 of each text matrix is taken from the bytes loaded (src/io/connectomes.ts,
// src/io/textMatrixBlocks.ts, on whichever thread reads the file) instead of reading every
// file again for the provenance. Each digest must equal coreutils `sha256sum` of the file
// (an implementation of FIPS 180-4 outside plexus and Node) and plexus's own sha256File,
// with one thread, two threads and the worker alone; exact string comparison (tolerance: none).
import { execFileSync } from "node:child_process";
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import seedrandom from "seedrandom";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { loadConnectomes, type ConnectomeOptions, type ConnectomeSubject } from "../../../src/io/connectomes.js";
import { encodeNpy } from "../../../src/io/npy.js";
import { parallelLoading } from "../../../src/io/matrixBlocks.js";
import { hashInputs } from "../../../src/output/provenance.js";
import { sha256File } from "../../../src/common/sha256.js";
import { prepareAnalysis } from "../../../src/run/prepareAnalysis.js";

const OPTIONS: ConnectomeOptions = { symmetrize: false, asymmetryTolerance: 1e-9, transform: "none" };
const SUBJECTS = 70;
const REGIONS = 7;

let dir: string;
let subjects: ConnectomeSubject[];
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "plexus-digests-"));
  mkdirSync(join(dir, "m"));
  const random = seedrandom("digests");
  subjects = [];
  for (let s = 0; s < SUBJECTS; s++) {
    const m = Array.from({ length: REGIONS }, () => new Array<number>(REGIONS).fill(1));
    for (let i = 0; i < REGIONS; i++) for (let j = i + 1; j < REGIONS; j++) m[i][j] = m[j][i] = Number(((random() - 0.5) * 1.8).toFixed(1 + (s % 17)));
    // Files of different sizes in turn (a long one, then a short one reusing the read buffer),
    // and layouts that change the bytes but not the values: CRLF, a byte-order mark, trailing blanks.
    const separator = s % 3 === 0 ? "\t" : " ";
    const end = s % 4 === 1 ? "\r\n" : "\n";
    let text = m.map((row) => row.join(separator)).join(end) + end;
    if (s % 5 === 2) text = "\ufeff" + text;
    if (s % 7 === 3) text += "\n\n   \n";
    const id = `sub-${String(s).padStart(3, "0")}`;
    writeFileSync(join(dir, "m", `${id}.txt`), text);
    subjects.push({ id, tableRow: s, values: { participant_id: id } });
  }
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const saved = { ...parallelLoading };
afterEach(() => Object.assign(parallelLoading, saved));

/** coreutils sha256sum of each file, in order. */
function coreutilsSha256(files: string[]): string[] {
  const out = execFileSync("sha256sum", ["--", ...files], { encoding: "utf8" });
  return out
    .trim()
    .split("\n")
    .map((line) => line.slice(0, 64));
}

function load(threads: "one" | "two" | "worker") {
  parallelLoading.minimumBytes = threads === "one" ? Infinity : 0;
  parallelLoading.callingThreadLoads = threads !== "worker";
  return loadConnectomes({ kind: "template", template: "m/{participant_id}.txt", baseDir: dir }, subjects, OPTIONS);
}

describe("digests of text matrices taken while loading", () => {
  for (const threads of ["one", "two", "worker"] as const) {
    it(`equal sha256sum and sha256File of each file (${threads} thread${threads === "one" ? "" : "s"})`, () => {
      const loaded = load(threads);
      expect(loaded.sha256, "digests present").toBeDefined();
      expect(loaded.sha256!.length).toBe(SUBJECTS);
      const reference = coreutilsSha256(loaded.files);
      loaded.files.forEach((file, s) => {
        expect(loaded.sha256![s], `${file}: vs sha256sum`).toBe(reference[s]);
        expect(loaded.sha256![s], `${file}: vs sha256File`).toBe(sha256File(file));
      });
      // The layouts differ, so every file has its own digest.
      expect(new Set(loaded.sha256).size).toBe(SUBJECTS);
    });
  }

  it("are not given for an .npy stack (read in parts), which the writer hashes from the file", () => {
    const file = join(dir, "stack.npy");
    writeFileSync(file, encodeNpy([2, 3, 3], Float64Array.from([1, 0.1, 0.2, 0.1, 1, 0.3, 0.2, 0.3, 1, 1, 0.4, 0.5, 0.4, 1, 0.6, 0.5, 0.6, 1])));
    const two = subjects.slice(0, 2);
    const loaded = loadConnectomes({ kind: "file", path: file }, two, OPTIONS);
    expect(loaded.sha256).toBeUndefined();
    expect(hashInputs([{ role: "connectome", path: file }])[0].sha256).toBe(coreutilsSha256([file])[0]);
  });
});

describe("hashInputs after prepareAnalysis", () => {
  it("gives the records hashing every input file afresh would give, in order and key order", () => {
    const ids = subjects.map((s) => s.id);
    writeFileSync(join(dir, "participants.tsv"), `participant_id\tgroup\n${ids.map((id, k) => `${id}\t${k % 2 ? "a" : "b"}`).join("\n")}\n`);
    writeFileSync(
      join(dir, "design.yaml"),
      ["subjects: participants.tsv", "connectomes: m/{participant_id}.txt", "model: group", "contrasts:", "  ab: group[a] - group[b]", "inference:", "  method: fdr", ""].join("\n"),
    );
    for (const threads of ["one", "two"] as const) {
      parallelLoading.minimumBytes = threads === "one" ? Infinity : 0;
      const prepared = prepareAnalysis(join(dir, "design.yaml"));
      const connectomes = prepared.inputs.filter((i) => i.role === "connectome");
      expect(connectomes.length).toBe(SUBJECTS);
      expect(connectomes.every((i) => typeof i.sha256 === "string")).toBe(true);
      const records = hashInputs(prepared.inputs);
      const paths = prepared.inputs.map((i) => i.path);
      const reference = coreutilsSha256(paths);
      const expected = prepared.inputs.map((i, k) => ({ role: i.role, path: i.path, sha256: reference[k] }));
      expect(JSON.stringify(records), `${threads} thread(s)`).toBe(JSON.stringify(expected));
      expect(records.map((r) => r.sha256)).toEqual(paths.map((p) => sha256File(p)));
    }
  });
});
