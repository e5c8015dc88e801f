// Exact enumeration of sign flips for a paired-differences design: six invented people scanned
// pre and post, four regions (six edges). Under the null of no change each person's difference
// is symmetric about zero, so the 2^6 = 64 sign patterns of the differences are equally likely
// (Winkler et al. 2014, NeuroImage 92:381, §2.3). The test computes, by hand, the one-sample t of
// every edge under every pattern, the largest |t| of each pattern, and each edge's p_FWE = the
// share of the 64 patterns whose largest |t| reaches the edge's |t| (ties within the relative
// tolerance plexus states, 1e-10); plexus must enumerate the same 64 patterns and give the same
// p_FWE (max-t, two-sided).
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";
import { inverse, Matrix } from "ml-matrix";
import { afterAll, describe, expect, it } from "vitest";
import { runAnalysis } from "../../../src/run/runAnalysis.js";
import { expectClose } from "../../helpers/close.js";
import { scratchFolder } from "../permute/cohortFiles.js";

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), "../../..");
const scratch = scratchFolder("repeated-exact");
afterAll(() => scratch.remove());

const PEOPLE = 6;
const REGIONS = 4;
// Invented edge values: pre[p][e] and a change per person and edge (no random numbers, so the
// cohort is written out here in full).
const PRE = [
  [0.21, 0.35, -0.12, 0.44, 0.05, 0.3],
  [0.18, 0.4, -0.02, 0.39, 0.11, 0.22],
  [0.3, 0.28, -0.2, 0.5, 0.0, 0.35],
  [0.12, 0.33, -0.08, 0.41, 0.09, 0.27],
  [0.25, 0.37, -0.15, 0.47, 0.02, 0.31],
  [0.2, 0.31, -0.1, 0.43, 0.07, 0.29],
];
const CHANGE = [
  [0.11, -0.02, 0.05, 0.09, 0.01, -0.04],
  [0.08, 0.03, 0.07, 0.12, -0.03, 0.02],
  [0.14, -0.05, 0.02, 0.1, 0.04, -0.01],
  [0.09, 0.01, 0.06, -0.02, 0.02, 0.03],
  [0.12, -0.03, -0.01, 0.11, -0.02, -0.05],
  [0.1, 0.02, 0.04, 0.08, 0.03, 0.01],
];

function matrixText(edges: number[]): string {
  const m = Array.from({ length: REGIONS }, () => new Array<number>(REGIONS).fill(0));
  let e = 0;
  for (let i = 0; i < REGIONS; i++) {
    for (let j = i + 1; j < REGIONS; j++) {
      m[i][j] = m[j][i] = edges[e++];
    }
  }
  return `${m.map((row) => row.join("\t")).join("\n")}\n`;
}

/** One-sample t of the values (mean ÷ its standard error). */
function oneSampleT(values: number[]): number {
  const n = values.length;
  const mean = values.reduce((a, b) => a + b, 0) / n;
  const variance = values.reduce((a, v) => a + (v - mean) ** 2, 0) / (n - 1);
  return mean / Math.sqrt(variance / n);
}

describe("paired differences: exact sign-flip p_FWE by enumeration of all 2^6 patterns", () => {
  it("matches the hand enumeration edge by edge", async () => {
    mkdirSync(join(scratch.dir, "m"));
    const rows = ["participant_id\tperson\tsession"];
    for (let p = 0; p < PEOPLE; p++) {
      const post = PRE[p].map((v, e) => v + CHANGE[p][e]);
      writeFileSync(join(scratch.dir, "m", `q${p + 1}_pre.tsv`), matrixText(PRE[p]));
      writeFileSync(join(scratch.dir, "m", `q${p + 1}_post.tsv`), matrixText(post));
      rows.push(`q${p + 1}-pre\tq${p + 1}\tpre`, `q${p + 1}-post\tq${p + 1}\tpost`);
    }
    writeFileSync(join(scratch.dir, "participants.tsv"), `${rows.join("\n")}\n`);
    const designFile = join(scratch.dir, "design.yaml");
    writeFileSync(
      designFile,
      [
        "subjects: participants.tsv",
        "connectomes: m/{person}_{session}.tsv",
        "repeated: { participant: person, within: session }",
        "model: session",
        "levels: { session: [pre, post] }",
        "contrasts:",
        "  change: session[post] - session[pre]",
        "inference: { method: max-t, tail: both, threshold: 2, permutations: 1000, seed: 3 }",
        "",
      ].join("\n"),
    );
    const out = join(scratch.dir, "out");
    await runAnalysis({ designFile, out, quiet: true, threads: 1 }, { info: () => {}, warn: () => {} });

    // The hand enumeration, from the values as written to the files (post = pre + change, in binary64).
    const differences = PRE.map((pre, p) => pre.map((v, e) => v + CHANGE[p][e] - v));
    const edges = PRE[0].length;
    const observed = Array.from({ length: edges }, (_, e) => oneSampleT(differences.map((d) => d[e])));
    const largest: number[] = [];
    for (let pattern = 0; pattern < 2 ** PEOPLE; pattern++) {
      const sign = (p: number) => ((pattern >> p) & 1 ? -1 : 1);
      let max = 0;
      for (let e = 0; e < edges; e++) max = Math.max(max, Math.abs(oneSampleT(differences.map((d, p) => sign(p) * d[e]))));
      largest.push(max);
    }
    const expected = observed.map((t) => largest.filter((m) => m >= Math.abs(t) * (1 - 1e-10)).length / largest.length);

    // Edge 0 rises in all six people: only the identity and the all-flipped pattern reach its |t|.
    expect(expected[0]).toBe(2 / 64);
    const summary = JSON.parse(readFileSync(join(out, "summary.json"), "utf8"));
    expect(summary.contrasts[0]).toMatchObject({ mode: "exact", permutations: 64, scheme: "sign-flip" });
    expect(summary.repeated).toMatchObject({ design: "paired differences", people: 6, scans: 12 });
    const [header, ...lines] = readFileSync(join(out, "change", "edges.tsv"), "utf8").trim().split("\n").map((l) => l.split("\t"));
    const tColumn = header.indexOf("statistic");
    const pColumn = header.indexOf("p_fwe");
    lines.forEach((cells, e) => {
      expectClose(Number(cells[tColumn]), observed[e], { rel: 1e-12, label: `edge ${e}: t vs the hand one-sample t of the differences` });
      expect(Number(cells[pColumn]), `edge ${e}: p_FWE vs the enumeration of all 64 sign patterns`).toBe(expected[e]);
    });
  });
});

// Exact enumeration of whole-person exchanges for a between-person contrast with three sessions:
// the R-made cohort of test/fixtures/repeated/measures (7 people with a scan at every level; 4 in
// group a, 3 in group b). With each person's scans in level order, exchanging whole people under
// Freedman–Lane with the session columns as nuisance equals reassigning the group labels to
// people (the session fit is the same in every block), so the C(7, 3) = 35 assignments are the
// null (Winkler et al. 2015, NeuroImage 123:253, whole-block exchange). The test computes the OLS
// t of group (y ~ session + group over the 21 scans, solved with ml-matrix) under every
// assignment, and each edge's p_FWE from the largest |t| of each.
describe("repeated measures, between people: exact p_FWE by enumeration of all 35 whole-person exchanges", () => {
  it("matches the hand enumeration edge by edge", async () => {
    const data = join(ROOT, "test/fixtures/repeated/measures");
    const table = readFileSync(join(data, "participants.tsv"), "utf8").trim().split("\n").slice(1).map((l) => l.split("\t"));
    const complete = table.filter((row) => row[1] !== "p8" && row[1] !== "p9");
    const levels = ["base", "mid", "end"];
    const people = [...new Set(complete.map((row) => row[1]))];
    const readEdges = (file: string) => {
      const m = readFileSync(file, "utf8").trim().split("\n").map((l) => l.split("\t").map(Number));
      const out: number[] = [];
      for (let i = 0; i < m.length; i++) for (let j = i + 1; j < m.length; j++) out.push(m[i][j]);
      return out;
    };
    const scans = complete.map((row) => ({ person: people.indexOf(row[1]), level: levels.indexOf(row[2]), edges: readEdges(join(data, "matrices", `${row[1]}_${row[2]}.tsv`)) }));
    const edgeCount = scans[0].edges.length;
    const groupT = (isB: boolean[], e: number): number => {
      const x = new Matrix(scans.map((s) => [1, s.level === 1 ? 1 : 0, s.level === 2 ? 1 : 0, isB[s.person] ? 1 : 0]));
      const y = Matrix.columnVector(scans.map((s) => s.edges[e]));
      const xtxInverse = inverse(x.transpose().mmul(x));
      const beta = xtxInverse.mmul(x.transpose()).mmul(y);
      const residual = y.clone().sub(x.mmul(beta));
      const s2 = residual.transpose().mmul(residual).get(0, 0) / (scans.length - 4);
      return beta.get(3, 0) / Math.sqrt(s2 * xtxInverse.get(3, 3));
    };
    const observedB = people.map((p) => Number(p.slice(1)) % 2 === 0);
    const observed = Array.from({ length: edgeCount }, (_, e) => groupT(observedB, e));
    const largest: number[] = [];
    for (let mask = 0; mask < 2 ** people.length; mask++) {
      const isB = people.map((_, p) => ((mask >> p) & 1) === 1);
      if (isB.filter(Boolean).length !== 3) continue;
      largest.push(Math.max(...Array.from({ length: edgeCount }, (_, e) => Math.abs(groupT(isB, e)))));
    }
    expect(largest.length).toBe(35);
    const expected = observed.map((t) => largest.filter((m) => m >= Math.abs(t) * (1 - 1e-10)).length / largest.length);

    const designFile = join(scratch.dir, "between.yaml");
    writeFileSync(
      designFile,
      [
        `subjects: ${data}/participants.tsv`,
        `connectomes: ${data}/matrices/{person}_{session}.tsv`,
        "repeated: { participant: person, within: session }",
        "model: session + group",
        "levels: { session: [base, mid, end] }",
        "contrasts:",
        "  g: group[b] - group[a]",
        "inference: { method: max-t, tail: both, threshold: 2, permutations: 1000, seed: 3 }",
        "",
      ].join("\n"),
    );
    const out = join(scratch.dir, "out-between");
    await runAnalysis({ designFile, out, quiet: true, threads: 1 }, { info: () => {}, warn: () => {} });
    const summary = JSON.parse(readFileSync(join(out, "summary.json"), "utf8"));
    expect(summary.contrasts[0]).toMatchObject({ mode: "exact", permutations: 35, scheme: "permute", exchangeability_blocks: { column: "person", count: 7, permutation: "whole" } });
    expect(summary.repeated).toMatchObject({ exchange: "whole people", people: 7, scans: 21 });
    const [header, ...lines] = readFileSync(join(out, "g", "edges.tsv"), "utf8").trim().split("\n").map((l) => l.split("\t"));
    lines.forEach((cells, e) => {
      expectClose(Number(cells[header.indexOf("statistic")]), observed[e], { rel: 1e-10, label: `edge ${e}: t vs the ml-matrix OLS t` });
      expect(Number(cells[header.indexOf("p_fwe")]), `edge ${e}: p_FWE vs the enumeration of all 35 exchanges`).toBe(expected[e]);
    });
    expect(Math.min(...expected)).toBeLessThan(1);
  });
});
