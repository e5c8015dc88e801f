// `plexus check` and `plexus run` report every bad connectivity matrix in one pass: one error
// (exit 2, no stack) whose first line is the first problem in subject order, then the others one
// per line, then the count; beyond 20 problems the rest are counted, not listed. The cohort (30
// subjects, 4 regions) is written here from inline numbers.
import { existsSync, mkdirSync, mkdtempSync, rmSync, unlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runCli, writeDesignFile } from "../unit/strength/strengthTestFiles.js";

const SUBJECTS = 30;
let root = "";

beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-matrix-problems-"));
});

afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

const id = (s: number) => `sub-${String(s + 1).padStart(2, "0")}`;

/** A cohort of SUBJECTS valid 4 × 4 correlation matrices; `damage` may rewrite subject s's rows (null: no file). */
function cohort(name: string, damage: (s: number, rows: string[][]) => string[][] | null | undefined): { design: string; file: (s: number) => string } {
  const dir = path.join(root, name);
  mkdirSync(path.join(dir, "connectomes"), { recursive: true });
  const lines = Array.from({ length: SUBJECTS }, (_, s) => `${id(s)}\t${s % 2 === 0 ? "control" : "patient"}`);
  writeFileSync(path.join(dir, "participants.tsv"), `participant_id\tgroup\n${lines.join("\n")}\n`);
  const file = (s: number) => path.join(dir, "connectomes", `${id(s)}.tsv`);
  for (let s = 0; s < SUBJECTS; s++) {
    const r = (k: number) => String(((s * 7 + k * 13) % 17) / 20 - 0.4);
    let rows: string[][] | null = [
      ["1", r(1), r(2), r(3)],
      [r(1), "1", r(4), r(5)],
      [r(2), r(4), "1", r(6)],
      [r(3), r(5), r(6), "1"],
    ];
    const damaged = damage(s, rows);
    if (damaged !== undefined) rows = damaged;
    if (rows === null) continue;
    writeFileSync(file(s), `${rows.map((row) => row.join("\t")).join("\n")}\n`);
  }
  const design = writeDesignFile(path.join(dir, "design.yaml"), [
    "subjects: participants.tsv",
    "connectomes: connectomes/{participant_id}.tsv",
    "model: group",
    "levels:",
    "  group: [control, patient]",
    "contrasts:",
    "  up: group[patient] - group[control]",
    "transform: fisher-z",
    "inference:",
    "  method: fdr",
  ]);
  return { design, file };
}

async function expectProblems(design: string, out: string, expected: RegExp[], tail: string): Promise<void> {
  for (const argv of [["check", design], ["run", design, "--out", out, "--threads", "1"]]) {
    const result = await runCli(argv);
    expect(result.code, `${argv[0]}: ${result.stderr}`).toBe(2);
    expect(result.stderr).not.toContain("    at ");
    const lines = result.stderr.trimEnd().split("\n").filter((line) => !line.startsWith("  "));
    expect(lines.length, `${argv[0]}: ${result.stderr}`).toBe(expected.length + 1);
    expect(lines[0].startsWith("plexus: error: "), argv[0]).toBe(true);
    expected.forEach((pattern, k) => expect(lines[k].replace(/^plexus: error: /, ""), `${argv[0]}, line ${k + 1}`).toMatch(pattern));
    expect(lines[expected.length], argv[0]).toBe(tail);
  }
  expect(existsSync(out), "no results folder after a failed run").toBe(false);
}

describe("every bad matrix in one pass", () => {
  it("3 bad files of 30 (a missing file, a non-numeric cell, an asymmetric matrix): all three, in subject order", async () => {
    const { design, file } = cohort("three", (s, rows) => {
      if (s === 4) return null;
      if (s === 11) rows[2][1] = "abc";
      if (s === 23) rows[0][3] = "0.3125";
      return undefined;
    });
    const result = await runCli(["check", design]);
    expect(result.stderr).toContain(id(4));
    await expectProblems(
      design,
      path.join(root, "three-out"),
      [
        (new RegExp(`^${escape(file(4))}: .*no such file`)),
        (new RegExp(`^${escape(file(11))}:3:2: .*abc`)),
        (new RegExp(`^${escape(file(23))}:1:4: matrix is not symmetric`)),
      ],
      "(3 problems in all)",
    );
  });

  it("a wrong size and a correlation out of range for Fisher z are reported together", async () => {
    const { design, file } = cohort("size-and-range", (s, rows) => {
      if (s === 2) return rows.slice(0, 3).map((row) => row.slice(0, 3));
      if (s === 9) rows[1][2] = rows[2][1] = "1.5";
      return undefined;
    });
    await expectProblems(
      design,
      path.join(root, "size-and-range-out"),
      [
        (new RegExp(`^${escape(file(2))}:1: this matrix is 3 × 3 but .* is 4 × 4`)),
        (new RegExp(`^${escape(file(9))}:2:3: .*fisher-z needs correlations strictly between -1 and 1`)),
      ],
      "(2 problems in all)",
    );
  });

  it("more than 20 bad matrices: the first 20 listed, the rest counted", async () => {
    const { design, file } = cohort("many", (s, rows) => {
      if (s >= 3) rows[0][1] = "nan";
      return undefined;
    });
    const listed = Array.from({ length: 20 }, (_, k) => (new RegExp(`^${escape(file(k + 3))}:1:2: `)));
    await expectProblems(design, path.join(root, "many-out"), listed, "… and 7 more (27 problems in all)");
  });

  it("the first file unreadable: the next readable one sets the size, and the first is still reported first", async () => {
    const { design, file } = cohort("first-missing", (s, rows) => {
      if (s === 0) return null;
      if (s === 5) return rows.slice(0, 2).map((row) => row.slice(0, 2));
      return undefined;
    });
    await expectProblems(
      design,
      path.join(root, "first-missing-out"),
      [
        (new RegExp(`^${escape(file(0))}: .*no such file`)),
        (new RegExp(`^${escape(file(5))}:1: this matrix is 2 × 2 but ${escape(file(1))} is 4 × 4`)),
      ],
      "(2 problems in all)",
    );
  });
});

function escape(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
}
