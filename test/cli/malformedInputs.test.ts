// A fuzz run over malformed designs, participants tables, matrices and output folders (fast-check,
// fixed seeds), through the CLI in-process. For every case:
// - the exit code is 0 or 2, never 1; a 2 prints one located message (a file of the study, or a
//   design key) and no stack trace;
// - no input file changes (SHA-256 of every file of the study, before and after);
// - nothing is written outside `--out`, apart from its documented checkpoint folder beside it;
//   no staging folder or lock is left behind;
// - an `--out` that is or contains an input, or a folder of the user's own files, is refused.
// PLEXUS_FUZZ_RUNS raises the number of cases for a longer local run (default 300).
import { createHash } from "node:crypto";
import { existsSync, lstatSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, unlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runCli } from "../unit/strength/strengthTestFiles.js";

const RUNS = Number(process.env.PLEXUS_FUZZ_RUNS ?? 300);
const REGIONS = 5;
const SUBJECTS = 14;

let root = "";
let caseNumber = 0;

beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-fuzz-"));
});

afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

// ---- the valid study every case starts from (invented) ----

/** A small deterministic generator, so the base study is the same in every case. */
function lcg(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    return state / 2 ** 32;
  };
}

const IDS = Array.from({ length: SUBJECTS }, (_, s) => `sub-${String(s + 1).padStart(2, "0")}`);

function baseParticipants(): string[][] {
  const random = lcg(11);
  const rows = [["participant_id", "group", "age", "sex", "site"]];
  IDS.forEach((id, s) => {
    rows.push([
      id,
      s % 2 === 0 ? "patient" : "control",
      s === 5 ? "n/a" : String(40 + Math.round(random() * 30)),
      random() < 0.5 ? "F" : "M",
      s < SUBJECTS / 2 ? "east" : "west",
    ]);
  });
  return rows;
}

function baseMatrix(s: number): number[][] {
  const random = lcg(100 + s);
  const m = Array.from({ length: REGIONS }, () => new Array<number>(REGIONS).fill(1));
  for (let i = 0; i < REGIONS; i++) {
    for (let j = i + 1; j < REGIONS; j++) {
      const r = Number((random() * 1.2 - 0.6).toFixed(4));
      m[i][j] = r;
      m[j][i] = r;
    }
  }
  return m;
}

const BASE_DESIGN: Record<string, unknown> = {
  subjects: "participants.tsv",
  connectomes: "connectomes/{participant_id}.tsv",
  regions: "regions.tsv",
  model: "group + age + sex",
  levels: { group: ["control", "patient"] },
  contrasts: { patient_gt_control: "group[patient] - group[control]", age_up: "age" },
  transform: "fisher-z",
  inference: { method: "components", threshold: 2, permutations: 39, seed: 7 },
};

// ---- mutations ----

const WEIRD_VALUES: unknown[] = [
  "", "NA", "nan", "N/A", "n/a", "NaN", "1e400", "-1e400", "Infinity", "0", "-1", "1e-9", "1.0e-9", "3", "abc",
  "../outside/victim", "a/b", "..", "\u001b[31mred", "x\u0000y", "group", "age", "figures", "tables", "summary.json",
  "y ~ group", "participant_id", "site", "whole", "within", "both", "lower", "max-t", "fdr", "threshold-free",
  0, -1, 1, 2, 1e400, -1e400, 1e200, -999, ["-999"], "NA", 1e-9, 0.5, 1.5, 1e9, 2 ** 31, true, false, null, [], [1, 2], ["a"], {}, { a: 1 },
  [[0, 1, 0, 0], [0, 0, 1, 0]], "[0, 1, 0, 0]", "1e400*age", "group[patient]", "site", "sex[M] - sex[F]",
  ["patient"], ["control", "patient"], ["east"], ["west", "east"], ["F"], "sub-03", ["sub-01", "sub-02"], ["age", "site", "sex"], ["n/a"], { group: ["patient"] },
  { by: "site", variables: ["age", "sex"] }, { by: null }, { by: "age" }, { variables: "site" },
  "log1p", "total", "none", "drop", "error", 0.75, 1.0000001, { missing: "drop" }, { present_in: 0.75 }, { missing: "drop", present_in: 1 },
  // `repeated:` (several scans per person): whole mappings, as well as the single values above for its two keys
  { participant: "site", within: "group" }, { participant: "sex", within: "group" }, { participant: "group", within: "group" },
  { participant: "site" }, { within: "sex" }, { participant: "participant_id", within: "group" }, { participant: "site", within: "sex", extra: 1 },
];

const DESIGN_KEYS = [
  "subjects", "connectomes", "regions", "model", "levels", "levels.group", "levels.site", "center", "contrasts",
  "contrasts.patient_gt_control", "contrasts.age_up", "contrasts.figures", "contrasts.summary.json", "contrasts.f",
  "contrasts.x", "transform", "symmetrize", "asymmetry_tolerance", "inference", "inference.method",
  "inference.threshold", "inference.size", "inference.tail", "inference.permutations", "inference.seed",
  "inference.alpha", "inference.fdr", "inference.scheme", "inference.blocks", "inference.block_permutation",
  "inference.enhancement", "inference.enhancement.step", "inference.enhancement.extent_exponent", "missing_values", "unknown_key",
  // select and cohort_table
  "select", "select.group", "select.site", "select.sex", "select.participant_id", "select.unknown_column",
  "cohort_table", "cohort_table.by", "cohort_table.variables", "cohort_table.unknown_key",
  "inference.across_contrasts",
  "scale", "edges", "edges.missing", "edges.present_in", "edges.unknown_key",
  "repeated", "repeated.participant", "repeated.within",
];

const CELL_VALUES = [
  "", "NA", "N/A", "nan", "NaN", "n/a", "1e400", "1e200", "-inf", "Infinity", "unknown", "6O", "x\r", "../outside/victim", "a/b",
  "..", "\u001b[2J", "x\ty", "sub-01", "patient", "control", "F", "M", "0", "-3", "1e-300", "\u00e9t\u00e9", "\ufeff",
];

const MATRIX_VALUES = ["NaN", "nan", "", "abc", "1", "-1", "1.5", "1e400", "Infinity", "0", "0.99999", "0x10", "1,5"];

const OUT_CHOICES = ["results", ".", "connectomes", "connectomes/res", "precious", "..", "participants.tsv", "fresh/deep/out"];

type Mutation =
  | { kind: "set"; key: string; value: unknown }
  | { kind: "remove"; key: string }
  | { kind: "designBytes"; at: number; bytes: Uint8Array }
  | { kind: "cell"; row: number; column: number; value: string }
  | { kind: "dropColumn"; column: number }
  | { kind: "duplicateRow"; row: number }
  | { kind: "participantsBytes"; at: number; bytes: Uint8Array }
  | { kind: "matrixCell"; subject: number; i: number; j: number; value: string }
  | { kind: "matrixRow"; subject: number; drop: boolean }
  | { kind: "matrixMissing"; subject: number }
  | { kind: "matrixBytes"; subject: number; at: number; bytes: Uint8Array }
  | { kind: "regionsCell"; row: number; value: string }
  | { kind: "matrixLabels"; subject: number; all: boolean; header: boolean; column: boolean; label: string }
  | { kind: "edgeTable"; byLabel: boolean; row: number; column: number; value: string };

const mutationArbitrary: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ kind: fc.constant("set" as const), key: fc.constantFrom(...DESIGN_KEYS), value: fc.constantFrom(...WEIRD_VALUES) }),
  fc.record({ kind: fc.constant("remove" as const), key: fc.constantFrom(...DESIGN_KEYS) }),
  fc.record({ kind: fc.constant("designBytes" as const), at: fc.nat(600), bytes: fc.uint8Array({ minLength: 1, maxLength: 4 }) }),
  fc.record({ kind: fc.constant("cell" as const), row: fc.nat(SUBJECTS), column: fc.nat(4), value: fc.constantFrom(...CELL_VALUES) }),
  fc.record({ kind: fc.constant("dropColumn" as const), column: fc.nat(4) }),
  fc.record({ kind: fc.constant("duplicateRow" as const), row: fc.nat(SUBJECTS) }),
  fc.record({ kind: fc.constant("participantsBytes" as const), at: fc.nat(400), bytes: fc.uint8Array({ minLength: 1, maxLength: 4 }) }),
  fc.record({
    kind: fc.constant("matrixCell" as const),
    subject: fc.nat(SUBJECTS - 1),
    i: fc.nat(REGIONS - 1),
    j: fc.nat(REGIONS - 1),
    value: fc.constantFrom(...MATRIX_VALUES),
  }),
  fc.record({ kind: fc.constant("matrixRow" as const), subject: fc.nat(SUBJECTS - 1), drop: fc.boolean() }),
  fc.record({ kind: fc.constant("matrixMissing" as const), subject: fc.nat(SUBJECTS - 1) }),
  fc.record({
    kind: fc.constant("matrixBytes" as const),
    subject: fc.nat(SUBJECTS - 1),
    at: fc.nat(200),
    bytes: fc.uint8Array({ minLength: 1, maxLength: 4 }),
  }),
  fc.record({ kind: fc.constant("regionsCell" as const), row: fc.nat(REGIONS), value: fc.constantFrom(...CELL_VALUES) }),
  fc.record({
    kind: fc.constant("matrixLabels" as const),
    subject: fc.nat(SUBJECTS - 1),
    all: fc.boolean(),
    header: fc.boolean(),
    column: fc.boolean(),
    label: fc.constantFrom("node_1", "node_2", ...CELL_VALUES, '"q', "a,b"),
  }),
  fc.record({
    kind: fc.constant("edgeTable" as const),
    byLabel: fc.boolean(),
    row: fc.nat(SUBJECTS + 1),
    column: fc.nat(REGIONS * 2),
    value: fc.constantFrom(...MATRIX_VALUES, "node_1~node_2", "sub-01"),
  }),
);

const caseArbitrary = fc.record({
  mutations: fc.array(mutationArbitrary, { minLength: 0, maxLength: 3 }),
  command: fc.constantFrom("check", "run", "run"),
  out: fc.constantFrom(...OUT_CHOICES),
  force: fc.boolean(),
  resume: fc.boolean(),
  // --permutations / --seed on the command line (check and run): valid, equal to the design's, or malformed.
  override: fc.option(
    fc.record({
      flag: fc.constantFrom("--permutations", "--seed", "--memory"),
      // --memory: plenty, too little for any cohort (refused before the matrices are loaded), or malformed.
      value: fc.constantFrom("19", "40", "7", "0", "-2", "x", "1e3", "2.5", "", "9007199254740993", "0.1", "64"),
    }),
    { nil: undefined },
  ),
});

function setKey(design: Record<string, unknown>, key: string, value: unknown, remove = false): void {
  const parts = key.startsWith("contrasts.") ? ["contrasts", key.slice("contrasts.".length)] : key.split(".");
  let node = design as Record<string, unknown>;
  for (const part of parts.slice(0, -1)) {
    if (typeof node[part] !== "object" || node[part] === null || Array.isArray(node[part])) node[part] = {};
    node = node[part] as Record<string, unknown>;
  }
  const last = parts[parts.length - 1];
  if (remove) delete node[last];
  else node[last] = value;
}

function splice(bytes: Uint8Array, at: number, insert: Uint8Array): Uint8Array {
  const position = Math.min(at, bytes.length);
  const out = new Uint8Array(bytes.length + insert.length);
  out.set(bytes.subarray(0, position));
  out.set(insert, position);
  out.set(bytes.subarray(position), position + insert.length);
  return out;
}

const tsv = (rows: string[][]) => `${rows.map((row) => row.join("\t")).join("\n")}\n`;

/** Writes the study with its mutations into study/ under a fresh case folder; returns that folder. */
function writeStudy(mutations: Mutation[]): string {
  const dir = path.join(root, `case-${++caseNumber}`);
  const study = path.join(dir, "study");
  mkdirSync(path.join(study, "connectomes"), { recursive: true });
  mkdirSync(path.join(study, "precious"));
  writeFileSync(path.join(study, "precious", "thesis.docx"), "chapter one\n");

  const design = structuredClone(BASE_DESIGN);
  let participants = baseParticipants();
  const matrices = IDS.map((_, s) => baseMatrix(s).map((row) => row.map(String)));
  const missing = new Set<number>();
  const regions = [["label", "system"], ...Array.from({ length: REGIONS }, (_, r) => [`node_${r + 1}`, r < 2 ? "alpha" : "beta"])];
  for (const m of mutations) {
    if (m.kind === "set") setKey(design, m.key, m.value);
    else if (m.kind === "remove") setKey(design, m.key, undefined, true);
    else if (m.kind === "cell") participants[Math.min(m.row, participants.length - 1)][m.column % participants[0].length] = m.value;
    else if (m.kind === "dropColumn") participants = participants.map((row) => row.filter((_, c) => c !== m.column % row.length));
    else if (m.kind === "duplicateRow") participants.push([...participants[Math.min(m.row, participants.length - 1)]]);
    else if (m.kind === "matrixCell") matrices[m.subject][m.i][m.j] = m.value;
    else if (m.kind === "matrixRow") {
      if (m.drop) matrices[m.subject].pop();
      else matrices[m.subject].push(matrices[m.subject][0]);
    } else if (m.kind === "matrixMissing") missing.add(m.subject);
    else if (m.kind === "regionsCell") regions[Math.min(m.row, regions.length - 1)][0] = m.value;
  }
  // Labelled matrices: a header row and/or a label column naming the regions, one label changed.
  for (const m of mutations) {
    if (m.kind !== "matrixLabels") continue;
    const labels = Array.from({ length: REGIONS }, (_, r) => (r === m.subject % REGIONS ? m.label : `node_${r + 1}`));
    for (const s of m.all ? IDS.keys() : [m.subject]) {
      if (m.column) matrices[s] = matrices[s].map((row, i) => [labels[i] ?? "extra", ...row]);
      if (m.header) matrices[s].unshift(m.column ? ["", ...labels] : labels);
    }
  }
  // A participants × edges table in place of the matrices: columns in edge order, or by label in reverse order.
  const edgeTable = mutations.find((m): m is Extract<Mutation, { kind: "edgeTable" }> => m.kind === "edgeTable");
  if (edgeTable) {
    const pairs: [number, number][] = [];
    for (let i = 0; i < REGIONS; i++) for (let j = i + 1; j < REGIONS; j++) pairs.push([i, j]);
    if (edgeTable.byLabel) pairs.reverse();
    const rows = [["participant_id", ...pairs.map(([i, j]) => `node_${i + 1}~node_${j + 1}`)]];
    IDS.forEach((id, s) => rows.push([id, ...pairs.map(([i, j]) => String(baseMatrix(s)[i][j]))]));
    rows[Math.min(edgeTable.row, rows.length - 1)][edgeTable.column % rows[0].length] = edgeTable.value;
    writeFileSync(path.join(study, "edges.tsv"), tsv(rows));
    design.connectomes = "edges.tsv";
  }
  let designBytes: Uint8Array = Buffer.from(`${JSON.stringify(design, null, 2)}\n`); // JSON is YAML 1.2
  let participantsBytes: Uint8Array = Buffer.from(tsv(participants));
  const matrixBytes = matrices.map((m) => Buffer.from(tsv(m)) as Uint8Array);
  for (const m of mutations) {
    if (m.kind === "designBytes") designBytes = splice(designBytes, m.at, m.bytes);
    else if (m.kind === "participantsBytes") participantsBytes = splice(participantsBytes, m.at, m.bytes);
    else if (m.kind === "matrixBytes") matrixBytes[m.subject] = splice(matrixBytes[m.subject], m.at, m.bytes);
  }
  writeFileSync(path.join(study, "design.yaml"), designBytes);
  writeFileSync(path.join(study, "participants.tsv"), participantsBytes);
  writeFileSync(path.join(study, "regions.tsv"), tsv(regions));
  IDS.forEach((id, s) => {
    if (!missing.has(s)) writeFileSync(path.join(study, "connectomes", `${id}.tsv`), matrixBytes[s]);
  });
  return dir;
}

/** SHA-256 of every file under `dir` (symlinks by their target text), keyed by relative path. */
function snapshot(dir: string, skip: (relative: string) => boolean = () => false): Map<string, string> {
  const files = new Map<string, string>();
  const walk = (folder: string) => {
    for (const name of readdirSync(folder)) {
      const full = path.join(folder, name);
      const relative = path.relative(dir, full);
      if (skip(relative)) continue;
      const stat = lstatSync(full);
      if (stat.isDirectory()) {
        files.set(`${relative}/`, "folder");
        walk(full);
      } else {
        files.set(relative, createHash("sha256").update(readFileSync(full)).digest("hex"));
      }
    }
  };
  walk(dir);
  return files;
}

const LOCATED = /(design\.yaml|participants\.tsv|regions\.tsv|edges\.tsv|sub-\d+\.tsv|connectomes|results|precious|fresh|study|key ')/;

describe("malformed inputs never lose data and never fail with an internal error (fast-check)", () => {
  it(`over ${RUNS} cases of mutated designs, tables, matrices and output folders`, async () => {
    await fc.assert(
      fc.asyncProperty(caseArbitrary, async (testCase) => {
        const dir = writeStudy(testCase.mutations);
        const study = path.join(dir, "study");
        const out = path.resolve(study, testCase.out);
        const outName = path.relative(dir, out);
        const before = snapshot(dir);
        const override = testCase.override ? [testCase.override.flag, testCase.override.value] : [];
        const argv =
          testCase.command === "check"
            ? ["check", path.join(study, "design.yaml"), ...override]
            : [
                "run",
                path.join(study, "design.yaml"),
                "--out",
                out,
                "--threads",
                "1",
                "--quiet",
                ...(testCase.force ? ["--force"] : []),
                ...(testCase.resume ? ["--resume"] : []),
                ...override,
              ];
        const { code, stdout, stderr } = await runCli(argv);
        const context = `case ${caseNumber}: ${JSON.stringify(testCase)}\nstderr: ${stderr}`;

        expect(code, context).not.toBe(1);
        expect([0, 2], context).toContain(code);
        expect(stderr, context).not.toMatch(/internal error|\n\s+at /);
        if (code === 2) expect(/plexus: error: .*/.exec(stderr)?.[0], context).toMatch(LOCATED);
        // age is numeric in every case: a stray cell must never turn it into a factor silently.
        if (code === 0 && testCase.command === "check") expect(stdout, context).not.toMatch(/age\[/);

        // Inputs unchanged, nothing added or removed outside --out and its checkpoint.
        const outside = (relative: string) => {
          const full = path.join(dir, relative.replace(/\/$/, ""));
          const fromOut = path.relative(out, full);
          if (testCase.command === "run" && (fromOut === "" || (!fromOut.startsWith("..") && !path.isAbsolute(fromOut)))) {
            return false; // inside --out
          }
          if (testCase.command === "run" && relative.endsWith("/") && path.relative(full, out).split(path.sep)[0] !== "..") {
            return false; // a parent folder of --out, created for it
          }
          if (testCase.command === "run" && full.startsWith(path.join(path.dirname(out), `.${path.basename(out)}.plexus-checkpoint`))) {
            return false;
          }
          return true;
        };
        const after = snapshot(dir);
        for (const [relative, hash] of before) {
          if (!outside(relative)) continue;
          expect(after.get(relative), `${context}\n${relative} was changed or removed`).toBe(hash);
        }
        for (const relative of after.keys()) {
          if (!outside(relative)) continue;
          expect(before.has(relative), `${context}\n${relative} was written outside --out`).toBe(true);
        }

        // An --out that is or holds an input, or a folder of the user's own files, is refused.
        if (testCase.command === "run") {
          const holdsInputs = [".", "..", "connectomes", "connectomes/res", "participants.tsv"].includes(testCase.out);
          if (holdsInputs) expect(code, `${context}\n--out ${outName} overlaps the inputs`).toBe(2);
          if (testCase.out === "precious") {
            expect(code, context).toBe(2);
            expect(existsSync(path.join(study, "precious", "thesis.docx")), context).toBe(true);
          }
        }
        rmSync(dir, { recursive: true, force: true });
      }),
      { seed: 20261204, numRuns: RUNS, endOnFailure: true },
    );
  });

  it("the unmutated study runs (the fuzz starts from a valid study)", async () => {
    const dir = writeStudy([]);
    const { code, stderr } = await runCli(["run", path.join(dir, "study", "design.yaml"), "--out", path.join(dir, "results"), "--threads", "1", "--quiet"]);
    expect(code, stderr).toBe(0);
    expect(existsSync(path.join(dir, "results", "summary.json"))).toBe(true);
    unlinkSync(path.join(dir, "results", "summary.json"));
  });
});
