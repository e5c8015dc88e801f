// Loading text matrices or a .npy stack on two threads (src/io/matrixBlocks.ts,
// textMatrixBlocks.ts, npyMatrixBlocks.ts) must give what the one-thread loader gives (itself checked cell by cell against hand-made
// matrices in connectomes.test.ts): the same edge-major values bit for bit, and
// on bad input the same error (every bad matrix, in subject order: message, file, line, column).
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import seedrandom from "seedrandom";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { isInputError } from "../../../src/errors.js";
import { loadConnectomes, type ConnectomeOptions, type ConnectomeSubject } from "../../../src/io/connectomes.js";
import { encodeNpy } from "../../../src/io/npy.js";
import { parallelLoading } from "../../../src/io/matrixBlocks.js";

const FISHER: ConnectomeOptions = { symmetrize: false, asymmetryTolerance: 1e-9, transform: "fisher-z" };
const SUBJECTS = 70;
const REGIONS = 9;

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "plexus-text-blocks-"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const saved = { ...parallelLoading };
afterEach(() => Object.assign(parallelLoading, saved));

/** A folder of SUBJECTS symmetric correlation matrices; `damage` may rewrite some subjects' text. */
function cohort(name: string, damage: (s: number, rows: string[][]) => string | undefined = () => undefined): ConnectomeSubject[] {
  const folder = join(dir, name);
  mkdirSync(folder, { recursive: true });
  const random = seedrandom(name);
  const subjects: ConnectomeSubject[] = [];
  for (let s = 0; s < SUBJECTS; s++) {
    const m = Array.from({ length: REGIONS }, () => new Array<number>(REGIONS).fill(1));
    for (let i = 0; i < REGIONS; i++) for (let j = i + 1; j < REGIONS; j++) m[i][j] = m[j][i] = (random() - 0.5) * 1.8;
    const rows = m.map((row) => row.map(String));
    const id = `sub-${String(s).padStart(3, "0")}`;
    const text = damage(s, rows) ?? rows.map((row) => row.join("\t")).join("\n") + "\n";
    if (text !== "") writeFileSync(join(folder, `${id}.tsv`), text);
    subjects.push({ id, tableRow: s, values: { participant_id: id } });
  }
  return subjects;
}

function load(subjects: ConnectomeSubject[], name: string, threads: "one" | "two" | "worker") {
  parallelLoading.minimumBytes = threads === "one" ? Infinity : 0;
  parallelLoading.callingThreadLoads = threads !== "worker";
  return loadConnectomes({ kind: "template", template: `${name}/{participant_id}.tsv`, baseDir: dir }, subjects, FISHER);
}

function errorOf(run: () => unknown): string {
  try {
    run();
  } catch (error) {
    if (isInputError(error)) return error.format();
    throw error;
  }
  throw new Error("expected an InputError");
}

describe("two-thread text loading", () => {
  it("gives the one-thread loader's values bit for bit", () => {
    const subjects = cohort("clean");
    const one = load(subjects, "clean", "one");
    for (const threads of ["two", "worker"] as const) {
    const two = load(subjects, "clean", threads);
    expect(two.files).toEqual(one.files);
    expect(two.data.length).toBe(SUBJECTS * ((REGIONS * (REGIONS - 1)) / 2));
    const a = new BigUint64Array(Float64Array.from(one.data).buffer);
    const b = new BigUint64Array(Float64Array.from(two.data).buffer);
    const first = a.findIndex((bits, i) => bits !== b[i]);
    expect(first, `${threads}: first differing value: index ${first}, one thread ${one.data[first]}, two threads ${two.data[first]} (tolerance 0)`).toBe(-1);
    }
  });

  const damaged: [string, (s: number, rows: string[][]) => string | undefined][] = [
    [
      "an asymmetric matrix in a late block and a bad cell in a later one: the earlier subject's error",
      (s, rows) => {
        if (s === 50) rows[2][5] = "0.123";
        if (s === 66) rows[4][1] = "abc";
        return undefined;
      },
    ],
    ["a missing file", (s) => (s === 37 ? "" : undefined)],
    [
      "a matrix of another size",
      (s, rows) => (s === 58 ? rows.slice(0, 5).map((row) => row.slice(0, 5).join("\t")).join("\n") + "\n" : undefined),
    ],
    [
      "errors in the first block and the last",
      (s, rows) => {
        if (s === 3) rows[1][7] = "1.5";
        if (s === 69) rows[0][1] = "nan";
        return undefined;
      },
    ],
  ];
  for (const [label, damage] of damaged) {
    it(`reports the one-thread loader's first error: ${label}`, () => {
      const name = label.replace(/[^a-z]+/g, "-");
      const subjects = cohort(name, damage);
      const expected = errorOf(() => load(subjects, name, "one"));
      expect(errorOf(() => load(subjects, name, "two"))).toBe(expected);
      // Every block on the worker thread: its errors cross back through the message port intact.
      expect(errorOf(() => load(subjects, name, "worker"))).toBe(expected);
    });
  }

  it("lists every bad matrix, in subject order, whatever thread loads which block (3 bad of 70, in three blocks)", () => {
    const subjects = cohort("three-bad", (s, rows) => {
      if (s === 2) rows[1][7] = "1.5";
      if (s === 37) return "";
      if (s === 66) rows[4][1] = "abc";
      return undefined;
    });
    const expected = errorOf(() => load(subjects, "three-bad", "one"));
    const lines = expected.split("\n").filter((line) => !line.startsWith("  "));
    expect(lines).toHaveLength(4);
    expect(lines[0]).toMatch(/sub-002\.tsv:2:8: matrix is not symmetric/);
    expect(lines[1]).toMatch(/sub-037\.tsv: .*no such file/);
    expect(lines[2]).toMatch(/sub-066\.tsv:5:2: .*abc/);
    expect(lines[3]).toBe("(3 problems in all)");
    expect(errorOf(() => load(subjects, "three-bad", "two"))).toBe(expected);
    expect(errorOf(() => load(subjects, "three-bad", "worker"))).toBe(expected);
  });

  it("beyond 20 problems lists the first 20 in subject order and counts the rest, whatever the threads", () => {
    const subjects = cohort("many-bad", (s, rows) => {
      if (s % 3 === 0) rows[0][1] = "nan";
      return undefined;
    });
    const expected = errorOf(() => load(subjects, "many-bad", "one"));
    const lines = expected.split("\n");
    expect(lines).toHaveLength(21);
    lines.slice(0, 20).forEach((line, k) => expect(line).toContain(`sub-${String(3 * k).padStart(3, "0")}.tsv:1:2: `));
    expect(lines[20]).toBe("… and 4 more (24 problems in all)");
    expect(errorOf(() => load(subjects, "many-bad", "two"))).toBe(expected);
    expect(errorOf(() => load(subjects, "many-bad", "worker"))).toBe(expected);
  });
});

describe("two-thread .npy stack loading", () => {
  /** A stack of `rows` matrices; subjects take the rows in a shuffled order, skipping some (as a participants selection does). */
  function stack(name: string, damage: (row: number, m: Float64Array) => void = () => undefined) {
    const rows = 90;
    const random = seedrandom(name);
    const values = new Float64Array(rows * REGIONS * REGIONS);
    for (let r = 0; r < rows; r++) {
      const m = values.subarray(r * REGIONS * REGIONS, (r + 1) * REGIONS * REGIONS);
      for (let i = 0; i < REGIONS; i++) {
        m[i * REGIONS + i] = 1;
        for (let j = i + 1; j < REGIONS; j++) m[i * REGIONS + j] = m[j * REGIONS + i] = (random() - 0.5) * 1.8;
      }
      damage(r, m);
    }
    const file = join(dir, `${name}.npy`);
    writeFileSync(file, encodeNpy([rows, REGIONS, REGIONS], values));
    const order = Array.from({ length: rows }, (_, r) => r).sort(() => random() - 0.5).slice(0, SUBJECTS);
    const subjects: ConnectomeSubject[] = order.map((row, s) => ({ id: `sub-${s}`, tableRow: row, values: { participant_id: `sub-${s}` } }));
    return { file, subjects };
  }
  function loadStack(file: string, subjects: ConnectomeSubject[], threads: "one" | "two" | "worker") {
    parallelLoading.minimumBytes = threads === "one" ? Infinity : 0;
    parallelLoading.callingThreadLoads = threads !== "worker";
    return loadConnectomes({ kind: "file", path: file }, subjects, FISHER);
  }

  it("gives the one-thread loader's values bit for bit", () => {
    const { file, subjects } = stack("stack-clean");
    const one = loadStack(file, subjects, "one");
    for (const threads of ["two", "worker"] as const) {
      const other = loadStack(file, subjects, threads);
      const a = new BigUint64Array(Float64Array.from(one.data).buffer);
      const b = new BigUint64Array(Float64Array.from(other.data).buffer);
      const first = a.findIndex((bits, i) => bits !== b[i]);
      expect(first, `${threads}: first differing value: index ${first}, one thread ${one.data[first]}, two threads ${other.data[first]} (tolerance 0)`).toBe(-1);
    }
  });

  it("reports the one-thread loader's first error (an asymmetric matrix, then a correlation of 1)", () => {
    const { file, subjects } = stack("stack-damaged", (row, m) => {
      if (row === 12) m[2 * REGIONS + 5] = 0.123;
      if (row === 40) m[1 * REGIONS + 4] = m[4 * REGIONS + 1] = 1;
    });
    const expected = errorOf(() => loadStack(file, subjects, "one"));
    expect(expected).toMatch(/matrix (13|41) of the stack/);
    // Both bad matrices are reported (if the participants selection took both rows), in subject order.
    const taken = [12, 40].filter((row) => subjects.some((subject) => subject.tableRow === row));
    for (const row of taken) expect(expected).toContain(`matrix ${row + 1} of the stack`);
    if (taken.length === 2) expect(expected).toContain("(2 problems in all)");
    expect(errorOf(() => loadStack(file, subjects, "two"))).toBe(expected);
    expect(errorOf(() => loadStack(file, subjects, "worker"))).toBe(expected);
  });
});
