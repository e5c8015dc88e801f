// One rule for zero residual variance: an edge whose residuals are zero relative to its values
// (a constant edge; an edge that is an exact linear function of the design) gets no statistic,
// no estimate and no standard error, nor p, q or partial r. The cohort is written here from
// inline numbers (dyadic, so the exact edge is exact in binary); the one regular edge is checked
// against ordinary least squares by ml-matrix 6.15.1 (pseudoInverse, the SVD route; 1e-9 relative).
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { expectClose } from "../helpers/close.js";
import { numberColumn, olsReference, readTable, runCli, writeDesignFile } from "../unit/strength/strengthTestFiles.js";

const GROUPS = ["control", "control", "control", "control", "patient", "patient", "patient", "patient"];
const AGES = [61, 70, 66, 75, 64, 72, 59, 68];
const VARIED = [0.31, 0.12, 0.44, 0.27, 0.52, 0.18, 0.39, 0.6];

let root = "";
let design = "";

beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-zero-residual-"));
  mkdirSync(path.join(root, "connectomes"));
  const rows = GROUPS.map((group, s) => `sub-${s + 1}\t${group}\t${AGES[s]}`);
  writeFileSync(path.join(root, "participants.tsv"), `participant_id\tgroup\tage\n${rows.join("\n")}\n`);
  GROUPS.forEach((group, s) => {
    const constant = 0.5; // edge (1,2): the same in everyone
    const exact = 0.25 + 0.125 * (group === "patient" ? 1 : 0) + 0.015625 * AGES[s]; // edge (1,3): fitted exactly by group + age
    const matrix = [
      [0, constant, exact],
      [constant, 0, VARIED[s]],
      [exact, VARIED[s], 0],
    ];
    writeFileSync(path.join(root, "connectomes", `sub-${s + 1}.tsv`), `${matrix.map((r) => r.join("\t")).join("\n")}\n`);
  });
  design = writeDesignFile(path.join(root, "design.yaml"), [
    "subjects: participants.tsv",
    "connectomes: connectomes/{participant_id}.tsv",
    "model: group + age",
    "levels:",
    "  group: [control, patient]",
    "contrasts:",
    "  patient_gt_control: group[patient] - group[control]",
    "transform: none",
    "inference:",
    "  method: fdr",
  ]);
});

afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

describe("zero residual variance: no statistic, no estimate, no standard error", () => {
  it("a constant edge and an exactly fitted edge have every statistic column empty; the regular edge matches OLS (ml-matrix)", async () => {
    const out = path.join(root, "results");
    const result = await runCli(["run", design, "--out", out, "--threads", "1", "--quiet"]);
    expect(result.code, result.stderr).toBe(0);
    const table = readTable(path.join(out, "patient_gt_control", "edges.tsv"));
    const column = (name: string) => table.header.indexOf(name);
    for (const name of ["statistic", "estimate", "standard_error", "p_unc", "q_fdr", "partial_r", "ci_low", "ci_high", "cohens_d", "cohens_d_ci_low", "cohens_d_ci_high"]) {
      expect(column(name), name).toBeGreaterThanOrEqual(0);
      expect(table.rows[0][column(name)], `constant edge, ${name}`).toBe("");
      expect(table.rows[1][column(name)], `exactly fitted edge, ${name}`).toBe("");
      expect(table.rows[2][column(name)], `regular edge, ${name}`).not.toBe("");
    }
    const X = GROUPS.map((group, s) => [1, group === "patient" ? 1 : 0, AGES[s]]);
    const reference = olsReference(X, [VARIED], [0, 1, 0], "upper");
    const check = (name: string, expected: number) =>
      expectClose(numberColumn(table, name)[2], expected, { rel: 1e-9, abs: 1e-12, label: `${name} vs ml-matrix OLS`, inputs: { X, y: VARIED } });
    check("estimate", reference.estimate[0]);
    check("standard_error", reference.se[0]);
    check("statistic", reference.t[0]);
    const summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
    expect(summary.contrasts[0].edges_without_statistic).toBe(2);
  });
});
