// End to end through the CLI: `main(argv, sink)` in-process on a small invented cohort (made by
// the simulator, written to a temporary folder), then the built binary once via child_process.
//
// The edge results are checked against an independent computation done here, per edge:
// ordinary least squares with ml-matrix (pseudoInverse, i.e. the SVD route, and inverse(X'X)
// for the contrast variance; ml-matrix 6.15.1 is a plexus dependency but is not the QR route
// plexus's fitEdges takes), the t upper tail from @stdlib/stats-base-dists-t-cdf 0.2.3 at −t,
// and q-values from @stdlib/stats-padjust 0.2.1. Tolerance: relative 1e-9 (+ absolute 1e-12
// for values near 0) on statistic, estimate, p_unc and q_fdr.
import { execFileSync, spawnSync } from "node:child_process";
import { copyFileSync, cpSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, unlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import tCdf from "@stdlib/stats-base-dists-t-cdf";
import padjust from "@stdlib/stats-padjust";
import { inverse, Matrix, pseudoInverse } from "ml-matrix";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { main } from "../../src/cli/main.js";
import type { OutputSink } from "../../src/cli/outputSink.js";
import { simulateCohort } from "../../src/simulate/simulateCohort.js";
import { simulationRandom } from "../../src/simulate/simulationRandom.js";
import { writeCohort } from "../../src/simulate/writeCohort.js";
import { expectAllClose } from "../helpers/close.js";

const REPO = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");
const CONTRACT_COLUMNS = ["region_a", "region_b", "statistic", "estimate", "p_unc", "q_fdr", "component"];
const INDEPENDENT = { rel: 1e-9, abs: 1e-12 };
const REGIONS = 8;

let root = "";
let cohort = "";

beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-cli-"));
  cohort = path.join(root, "cohort");
  const simulated = simulateCohort(
    { regions: REGIONS, patients: 10, controls: 8, kind: "correlation", effect: { regions: 3, size: 1.5 }, covariates: true },
    simulationRandom(5),
  );
  writeCohort(cohort, simulated, { format: "tsv", plantedFile: true });
});

afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

/** A sink that keeps what the CLI writes. */
function captureSink(): OutputSink & { stdout: () => string; stderr: () => string } {
  let out = "";
  let err = "";
  return {
    out: (text) => void (out += text),
    err: (text) => void (err += text),
    errIsTerminal: false,
    stdout: () => out,
    stderr: () => err,
  };
}

async function runCli(argv: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  const sink = captureSink();
  const code = await main(argv, sink);
  return { code, stdout: sink.stdout(), stderr: sink.stderr() };
}

/** A copy of the cohort in its own folder plus a design file there; returns the design path. */
function studyFolder(name: string, designLines: string[]): { dir: string; design: string } {
  const dir = path.join(root, name);
  mkdirSync(dir);
  cpSync(cohort, path.join(dir, "cohort"), { recursive: true });
  const design = path.join(dir, "design.yaml");
  writeFileSync(design, `${designLines.join("\n")}\n`);
  return { dir, design };
}

const DESIGN = [
  "subjects: cohort/participants.tsv", //                     line 1
  "connectomes: cohort/connectomes/{participant_id}.tsv", //  line 2
  "regions: cohort/regions.tsv", //                           line 3
  "model: group + age + sex", //                              line 4
  "levels:",
  "  group: [control, patient]",
  "contrasts:",
  "  patient_gt_control: group[patient] - group[control]",
  "  age_down: [0, 0, -1, 0]",
  "transform: fisher-z",
  "inference:",
  "  method: components",
  "  threshold: 2",
  "  permutations: 40",
  "  seed: 3",
];

// ---- reading files back, independently of plexus's readers ----

function readTable(file: string): { header: string[]; rows: string[][] } {
  const lines = readFileSync(file, "utf8").split("\n").filter((line) => line !== "");
  return { header: lines[0].split("\t"), rows: lines.slice(1).map((line) => line.split("\t")) };
}

function readMatrix(file: string): number[][] {
  return readFileSync(file, "utf8")
    .split("\n")
    .filter((line) => line.trim() !== "")
    .map((line) => line.trim().split(/\s+/).map(Number));
}

interface IndependentFit {
  labels: string[];
  statistic: number[];
  estimate: number[];
  pUpper: number[];
  pTwoSided: number[];
  df: number;
}

/**
 * OLS per edge from the raw files: X = [1, patient, age, male], y = edge value (atanh(r) when
 * `fisher`), b = pinv(X) y, s² = RSS/(S − 4), se = sqrt(s² c'(X'X)⁻¹c), t = c'b/se,
 * P(T > t) = cdf(−t) by symmetry.
 */
function independentFit(folder: string, contrast: number[], fisher: boolean): IndependentFit {
  const participants = readTable(path.join(folder, "participants.tsv"));
  const column = (name: string) => participants.rows.map((row) => row[participants.header.indexOf(name)]);
  const ids = column("participant_id");
  const group = column("group");
  const age = column("age").map(Number);
  const sex = column("sex");
  const labels = readTable(path.join(folder, "regions.tsv")).rows.map((row) => row[0]);
  const S = ids.length;
  const X = new Matrix(ids.map((_, s) => [1, group[s] === "patient" ? 1 : 0, age[s], sex[s] === "M" ? 1 : 0]));
  const matrices = ids.map((id) => readMatrix(path.join(folder, "connectomes", `${id}.tsv`)));
  const N = matrices[0].length;
  const Y = new Matrix(S, (N * (N - 1)) / 2);
  let e = 0;
  for (let i = 0; i < N; i++) {
    for (let j = i + 1; j < N; j++, e++) {
      for (let s = 0; s < S; s++) Y.set(s, e, fisher ? Math.atanh(matrices[s][i][j]) : matrices[s][i][j]);
    }
  }
  const B = pseudoInverse(X).mmul(Y);
  const residuals = Y.clone().sub(X.mmul(B));
  const df = S - X.columns;
  const c = Matrix.columnVector(contrast);
  const varianceFactor = c.transpose().mmul(inverse(X.transpose().mmul(X))).mmul(c).get(0, 0);
  const out: IndependentFit = { labels, statistic: [], estimate: [], pUpper: [], pTwoSided: [], df };
  for (let k = 0; k < Y.columns; k++) {
    let rss = 0;
    for (let s = 0; s < S; s++) rss += residuals.get(s, k) ** 2;
    let estimate = 0;
    contrast.forEach((ck, j) => (estimate += ck * B.get(j, k)));
    const t = estimate / Math.sqrt((rss / df) * varianceFactor);
    out.statistic.push(t);
    out.estimate.push(estimate);
    out.pUpper.push(tCdf(-t, df));
    out.pTwoSided.push(Math.min(1, 2 * tCdf(-Math.abs(t), df)));
  }
  return out;
}

/** The number in a cell; "" (non-finite) reads as NaN. */
const cellNumber = (cell: string) => (cell === "" ? NaN : Number(cell));

function expectEdgesTable(
  file: string,
  reference: IndependentFit,
  pReference: number[],
  qReference: number[],
  threshold: number,
  tail: "upper" | "both",
): void {
  const table = readTable(file);
  expect(table.header.slice(0, CONTRACT_COLUMNS.length)).toEqual(CONTRACT_COLUMNS);
  const at = (name: string) => table.header.indexOf(name);
  const N = reference.labels.length;
  expect(table.rows.length).toBe((N * (N - 1)) / 2);
  // Row-major i < j order: (0,1), (0,2), …, (0,N−1), (1,2), …
  const order: string[][] = [];
  for (let i = 0; i < N; i++) for (let j = i + 1; j < N; j++) order.push([reference.labels[i], reference.labels[j]]);
  expect(table.rows.map((row) => [row[at("region_a")], row[at("region_b")]])).toEqual(order);

  const numbers = (name: string) => table.rows.map((row) => cellNumber(row[at(name)]));
  const inputs = { file };
  expectAllClose(numbers("statistic"), reference.statistic, { ...INDEPENDENT, label: "statistic vs ml-matrix OLS t", inputs });
  expectAllClose(numbers("estimate"), reference.estimate, { ...INDEPENDENT, label: "estimate vs ml-matrix OLS c'b", inputs });
  expectAllClose(numbers("p_unc"), pReference, { ...INDEPENDENT, label: "p_unc vs @stdlib t-cdf", inputs });
  expectAllClose(numbers("q_fdr"), qReference, { ...INDEPENDENT, label: "q_fdr vs @stdlib padjust", inputs });
  // An edge carries a component id exactly when it is above the threshold (in the tail tested).
  table.rows.forEach((row, e) => {
    const t = reference.statistic[e];
    const supra = tail === "both" ? Math.abs(t) > threshold : t > threshold;
    expect(row[at("component")] !== "", `edge ${e} (t = ${t})`).toBe(supra);
    if (supra) expect(Number.isInteger(Number(row[at("component")]))).toBe(true);
  });
}

describe("plexus check and run on a small simulated cohort (in-process)", () => {
  it("check exits 0 and prints the design columns and contrasts", async () => {
    const { design } = studyFolder("check-ok", DESIGN);
    const result = await runCli(["check", design]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stdout).toContain("columns     intercept, group[patient], age, sex[M]");
    expect(result.stdout).toContain("contrast    age_down: [0, 0, -1, 0]  ->  [0, 0, -1, 0]");
    expect(result.stdout).toContain(`${REGIONS} regions, ${(REGIONS * (REGIONS - 1)) / 2} edges`);
    expect(result.stdout).toContain("ok:");
  });

  it("run exits 0 and writes edges.tsv per contrast equal to an independent OLS fit (ml-matrix, @stdlib t-cdf and padjust; 1e-9 relative)", async () => {
    const { dir, design } = studyFolder("run-ok", DESIGN);
    const out = path.join(dir, "results");
    const result = await runCli(["run", design, "--out", out, "--threads", "1", "--quiet"]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stderr).not.toMatch(/\n\s+at /);
    const contrasts: Array<[string, number[]]> = [
      ["patient_gt_control", [0, 1, 0, 0]],
      ["age_down", [0, 0, -1, 0]],
    ];
    for (const [name, vector] of contrasts) {
      const reference = independentFit(path.join(dir, "cohort"), vector, true);
      const q = padjust(reference.pUpper, "bh");
      expectEdgesTable(path.join(out, name, "edges.tsv"), reference, reference.pUpper, q, 2, "upper");
      expect(existsSync(path.join(out, name, "components.tsv"))).toBe(true);
    }
    expect(existsSync(path.join(out, "summary.json"))).toBe(true);
  });

  it("tail both with BY: p_unc is two-sided and q_fdr is @stdlib padjust 'by' (1e-9 relative; transform none)", async () => {
    const lines = DESIGN.filter((line) => !line.startsWith("transform")).map((line) => (line === "  method: components" ? "  method: fdr" : line));
    const { dir, design } = studyFolder("run-both", [...lines, "  tail: both", "  fdr: by"]);
    const out = path.join(dir, "results");
    const result = await runCli(["run", design, "--out", out, "--threads", "1", "--quiet"]);
    expect(result.code, result.stderr).toBe(0);
    const reference = independentFit(path.join(dir, "cohort"), [0, 1, 0, 0], false);
    const q = padjust(reference.pTwoSided, "by");
    expectEdgesTable(path.join(out, "patient_gt_control", "edges.tsv"), reference, reference.pTwoSided, q, 2, "both");
  });
});

describe("plexus check and run on bad inputs: exit 2, the place named, no stack trace", () => {
  /** Runs `check` and `run`; both must exit 2 with a located message and no stack. */
  async function expectUserError(design: string, out: string, patterns: (string | RegExp)[]): Promise<void> {
    for (const argv of [["check", design], ["run", design, "--out", out, "--threads", "1"]]) {
      const result = await runCli(argv);
      expect(result.code, `${argv[0]}: ${result.stderr}`).toBe(2);
      expect(result.stderr).toMatch(/^plexus: error: /);
      expect(result.stderr).not.toContain("    at ");
      for (const pattern of patterns) expect(result.stderr, argv[0]).toMatch(pattern);
    }
    expect(existsSync(out), "no results folder after a failed run").toBe(false);
  }

  const escape = (text: string) => text.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");

  it("missing participants file: names the file", async () => {
    const { dir, design } = studyFolder("missing-participants", DESIGN.map((l) => l.replace("cohort/participants.tsv", "cohort/nobody.tsv")));
    await expectUserError(design, path.join(dir, "out"), [/nobody\.tsv/, /no such file/]);
  });

  it("unknown design key: names the design file, line and key, with a hint", async () => {
    const { dir, design } = studyFolder("unknown-key", [...DESIGN.slice(0, 4), "modle: group", ...DESIGN.slice(4)]);
    await expectUserError(design, path.join(dir, "out"), [new RegExp(`${escape(design)}:5`), /key 'modle'/, /did you mean 'model'\?/]);
  });

  it("a formula column not in the participants table: names the model key and suggests the near column", async () => {
    const { dir, design } = studyFolder("bad-column", DESIGN.map((l) => l.replace("model: group + age + sex", "model: group + agee + sex")));
    await expectUserError(design, path.join(dir, "out"), [new RegExp(`${escape(design)}:4`), /key 'model'/, /'agee'/, /did you mean 'age'\?/]);
  });

  it("rank-deficient design (a column duplicated): names the collinear columns and the model key", async () => {
    const { dir, design } = studyFolder("rank-deficient", DESIGN.map((l) => l.replace("model: group + age + sex", "model: group + age + age_copy + sex")));
    const file = path.join(dir, "cohort", "participants.tsv");
    const lines = readFileSync(file, "utf8").trimEnd().split("\n");
    const ageAt = lines[0].split("\t").indexOf("age");
    writeFileSync(file, `${lines.map((line, k) => `${line}\t${k === 0 ? "age_copy" : line.split("\t")[ageAt]}`).join("\n")}\n`);
    await expectUserError(design, path.join(dir, "out"), [/key 'model'/, /rank-deficient/, /age, age_copy/]);
  });

  it("missing connectome file: names it", async () => {
    const { dir, design } = studyFolder("missing-connectome", DESIGN);
    unlinkSync(path.join(dir, "cohort", "connectomes", "sub-003.tsv"));
    await expectUserError(design, path.join(dir, "out"), [/sub-003\.tsv/, /no such file/]);
  });

  /** Rewrites one subject's matrix; `edit` gets the rows as arrays of cell texts. */
  function editMatrix(dir: string, id: string, edit: (rows: string[][]) => void): string {
    const file = path.join(dir, "cohort", "connectomes", `${id}.tsv`);
    const rows = readFileSync(file, "utf8").trimEnd().split("\n").map((line) => line.split("\t"));
    edit(rows);
    writeFileSync(file, `${rows.map((row) => row.join("\t")).join("\n")}\n`);
    return file;
  }

  it("non-square matrix (a value missing on line 4): names file:line", async () => {
    const { dir, design } = studyFolder("non-square", DESIGN);
    const file = editMatrix(dir, "sub-002", (rows) => rows[3].pop());
    await expectUserError(design, path.join(dir, "out"), [new RegExp(`${escape(file)}:4`), /not square/]);
  });

  it("asymmetric matrix (row 2, column 5 changed): names file:line:column", async () => {
    const { dir, design } = studyFolder("asymmetric", DESIGN);
    const file = editMatrix(dir, "sub-002", (rows) => (rows[1][4] = String(Number(rows[1][4]) / 2 + 0.1)));
    await expectUserError(design, path.join(dir, "out"), [new RegExp(`${escape(file)}:2:5`), /not symmetric/]);
  });

  it("non-numeric cell (row 3, column 4): names file:line:column", async () => {
    const { dir, design } = studyFolder("non-numeric", DESIGN);
    const file = editMatrix(dir, "sub-002", (rows) => {
      rows[2][3] = "abc";
      rows[3][2] = "abc";
    });
    await expectUserError(design, path.join(dir, "out"), [new RegExp(`${escape(file)}:3:4`), /'abc'/, /not a number/]);
  });

  it("an existing non-empty --out without --force: exit 2 naming the folder and --force; with --force: exit 0 only for a folder plexus wrote", async () => {
    const { dir, design } = studyFolder("existing-out", DESIGN);
    const out = path.join(dir, "results");
    mkdirSync(out);
    writeFileSync(path.join(out, "keep.txt"), "earlier results\n");
    const refused = await runCli(["run", design, "--out", out, "--threads", "1"]);
    expect(refused.code, refused.stderr).toBe(2);
    expect(refused.stderr).toContain(out);
    expect(refused.stderr).toContain("--force");
    expect(refused.stderr).not.toContain("    at ");
    expect(readFileSync(path.join(out, "keep.txt"), "utf8")).toBe("earlier results\n");

    // A folder plexus did not write is never replaced, even with --force.
    const notOurs = await runCli(["run", design, "--out", out, "--threads", "1", "--force", "--quiet"]);
    expect(notOurs.code, notOurs.stderr).toBe(2);
    expect(notOurs.stderr).toContain("keep.txt");
    expect(readFileSync(path.join(out, "keep.txt"), "utf8")).toBe("earlier results\n");

    rmSync(out, { recursive: true });
    expect((await runCli(["run", design, "--out", out, "--threads", "1", "--quiet"])).code).toBe(0);
    const forced = await runCli(["run", design, "--out", out, "--threads", "1", "--force", "--quiet"]);
    expect(forced.code, forced.stderr).toBe(0);
    expect(existsSync(path.join(out, "patient_gt_control", "edges.tsv"))).toBe(true);
  });
});

describe("the built binary (node bin/plexus.js)", () => {
  it("exits 2 with a located message and no stack trace on an unknown design key", () => {
    // Build into a private folder laid out like the package (bin/ beside dist/), so that the shared
    // dist/ is left alone; bin/plexus.js is copied unchanged.
    const pkg = path.join(root, "package");
    mkdirSync(path.join(pkg, "bin"), { recursive: true });
    copyFileSync(path.join(REPO, "bin", "plexus.js"), path.join(pkg, "bin", "plexus.js"));
    writeFileSync(path.join(pkg, "package.json"), JSON.stringify({ type: "module" }));
    symlinkSync(path.join(REPO, "node_modules"), path.join(pkg, "node_modules"), "dir");
    const tsc = path.join(REPO, "node_modules", "typescript", "bin", "tsc");
    try {
      execFileSync(process.execPath, [tsc, "-p", path.join(REPO, "tsconfig.build.json"), "--outDir", path.join(pkg, "dist")], {
        cwd: REPO,
        stdio: "pipe",
      });
    } catch (error) {
      // Type errors elsewhere in a tree under concurrent edits still emit JavaScript; only a
      // missing entry point is fatal here.
      if (!existsSync(path.join(pkg, "dist", "cli", "main.js"))) throw error;
    }

    const { dir, design } = studyFolder("binary", [...DESIGN, "permutatoins: 10"]);
    const result = spawnSync(process.execPath, [path.join(pkg, "bin", "plexus.js"), "run", design, "--out", path.join(dir, "out")], {
      encoding: "utf8",
    });
    expect(result.status, result.stderr).toBe(2);
    expect(result.stderr).toContain(`${design}:${DESIGN.length + 1}`);
    expect(result.stderr).toContain("unknown key 'permutatoins'");
    expect(result.stderr).not.toContain("    at ");
    expect(result.stdout).toBe("");
  });
});
