// Exact permutation inference end to end (runAnalysis on tiny cohorts written from inline
// values) against an independent brute force written here from the published definitions:
// - the distinct relabelings of a design are the distinct arrangements of its design rows
//   (Winkler, Ridgway, Webster, Smith & Nichols 2014, NeuroImage 92:381, §2.3 and §2.6: identical
//   rows give identical relabelings; within-block and whole-block exchangeability; sign flips
//   for a one-sample test, 2^S of them);
// - for each, the model is refitted by direct least squares (ml-matrix QR) on the original data
//   — with only the intercept as nuisance, the Freedman & Lane (1983, J. Bus. Econ. Stat. 1:292)
//   permuted data equal the data with the design rows relabeled — or, for sign flips, the
//   one-sample t of the flipped data;
// - the supra-threshold components by breadth-first search (network-based statistic: Zalesky,
//   Fornito & Bullmore 2010, NeuroImage 53:1197) and the largest extent, mass and statistic;
// - with all M relabelings enumerated, p_fwe = b/M (Westfall & Young 1993; the identity is one
//   of the M, so p ≥ 1/M).
// Tolerances: extents are compared exactly; masses and statistics within 1e-10 relative plus
// 1e-12 absolute (two least-squares routes of a handful of well-conditioned operations; the
// measured worst difference is far below: see the report).
import { readFileSync } from "node:fs";
import { join } from "node:path";
import seedrandom from "seedrandom";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Matrix, QrDecomposition } from "ml-matrix";
import { Relabeler } from "../../../src/permute/relabelings.js";
import { runAnalysis, type RunResult } from "../../../src/run/runAnalysis.js";
import { expectClose } from "../../helpers/close.js";
import {
  allPermutations,
  bruteForceMaxima,
  normalDraw,
  oneSampleT,
  olsContrastT,
  readNullRows,
  readTsv,
  scratchFolder,
  sortRows,
  subsets,
  writeDesign,
  writeTinyCohort,
  type NullRow,
} from "./cohortFiles.js";

const scratch = scratchFolder("exact");
afterAll(() => scratch.remove());
const quietLog = { info() {}, warn() {} };
const TOLERANCE = { rel: 1e-10, abs: 1e-12 };

/** Edge data: N(0,1) noise plus `shift` on the edges among regions 0..3 for the subjects in `shifted`. */
function edgeData(seed: string, subjects: number, regionCount: number, shifted: Set<number>, shift: number): Float64Array[] {
  const random = seedrandom(seed);
  const E = (regionCount * (regionCount - 1)) / 2;
  return Array.from({ length: subjects }, (_, s) => {
    const row = new Float64Array(E);
    let e = 0;
    for (let i = 0; i < regionCount; i++) {
      for (let j = i + 1; j < regionCount; j++, e++) {
        row[e] = Math.round((normalDraw(random) + (j < 4 && shifted.has(s) ? shift : 0)) * 1e6) / 1e6;
      }
    }
    return row;
  });
}

function compareRow(actual: NullRow, expected: NullRow, label: string, inputs?: unknown): void {
  expect(actual.maxExtent, `${label}: max_extent`).toBe(expected.maxExtent);
  expectClose(actual.maxMass, expected.maxMass, { ...TOLERANCE, label: `${label}: max_mass`, inputs });
  expectClose(actual.maxStatistic, expected.maxStatistic, { ...TOLERANCE, label: `${label}: max_statistic`, inputs });
}

function compareMultisets(actual: NullRow[], expected: NullRow[], label: string): void {
  expect(actual.length).toBe(expected.length);
  const a = sortRows(actual);
  const b = sortRows(expected);
  a.forEach((row, i) => compareRow(row, b[i], `${label}, sorted row ${i + 1}`));
}

/** The null rows a brute force gives for a list of patient sets (two-group model, contrast patient − control). */
function twoGroupBruteForce(data: Float64Array[], patientSets: number[][], regionCount: number, threshold: number, tail: "upper" | "lower" | "both") {
  const S = data.length;
  const y = data.map((row) => Array.from(row));
  return patientSets.map((set) => {
    const inSet = new Set(set);
    const design = Array.from({ length: S }, (_, s) => [1, inSet.has(s) ? 1 : 0]);
    return bruteForceMaxima(olsContrastT(design, y, [0, 1]), regionCount, threshold, tail);
  });
}

const key = (set: number[]) => [...set].sort((a, b) => a - b).join(",");

describe("exact mode, two groups of 5: all C(10,5) = 252 relabelings", () => {
  const dir = join(scratch.dir, "two-groups");
  const regionCount = 8;
  const threshold = 1.5;
  const groups = ["control", "patient", "control", "patient", "patient", "control", "control", "patient", "control", "patient"];
  const patients = groups.flatMap((g, s) => (g === "patient" ? [s] : []));
  const data = edgeData("exact-two-groups", 10, regionCount, new Set(patients), 1.2);
  writeTinyCohort(dir, {
    columns: ["group"],
    rows: groups.map((g, s) => [`sub-${String(s + 1).padStart(2, "0")}`, g]),
    regionCount,
    edges: data,
  });
  const design = writeDesign(
    dir,
    "design.yaml",
    `model: group
levels:
  group: [control, patient]
contrasts:
  patient_gt_control: group[patient] - group[control]
inference:
  method: components
  threshold: ${threshold}
  size: extent
  tail: both
  permutations: 1000
  seed: 1
`,
  );
  const out = join(dir, "results");
  let result: RunResult;
  beforeAll(async () => {
    result = await runAnalysis({ designFile: design, out, threads: 1, quiet: true }, quietLog);
  });
  const folder = join(out, "patient_gt_control");
  // Reference: every 5-subset of the 10 subjects is one distinct relabeling (the design has two row types).
  const allSets = subsets(10, 5);
  const brute = twoGroupBruteForce(data, allSets, regionCount, threshold, "both");

  it("is exact: summary says mode exact, 252 permutations, 252 distinct relabelings", () => {
    const summary = JSON.parse(readFileSync(join(out, "summary.json"), "utf8"));
    const contrast = summary.contrasts[0];
    expect(allSets.length).toBe(252); // C(10,5), from the definition of a binomial coefficient
    expect(contrast.mode).toBe("exact");
    expect(contrast.permutations).toBe(252);
    expect(contrast.distinct_relabelings).toBe(252);
    expect(contrast.scheme).toBe("permute");
    expect(contrast.smallest_possible_p).toBe(1 / 252);
  });

  it("null.tsv has 252 rows numbered 1..252, and row 1 equals the observed maxima exactly", () => {
    const rows = readNullRows(join(folder, "null.tsv"));
    expect(rows.map((r) => r.k)).toEqual(Array.from({ length: 252 }, (_, i) => i + 1));
    const [componentHeader, ...components] = readTsv(join(folder, "components.tsv"));
    const extentAt = componentHeader.indexOf("extent");
    const massAt = componentHeader.indexOf("mass");
    expect(components.length).toBeGreaterThan(0);
    const observedExtent = Math.max(...components.map((c) => Number(c[extentAt])));
    const observedMass = Math.max(...components.map((c) => Number(c[massAt])));
    const [edgeHeader, ...edges] = readTsv(join(folder, "edges.tsv"));
    const statisticAt = edgeHeader.indexOf("statistic");
    const observedStatistic = Math.max(...edges.map((e) => Math.abs(Number(e[statisticAt]))));
    // Exact equality: the identity row is the observed statistics themselves (same doubles, same sums).
    expect(rows[0].row).toEqual({ maxExtent: observedExtent, maxMass: observedMass, maxStatistic: observedStatistic });
    // And it is the brute force's value for the observed grouping (tolerance above).
    compareRow(rows[0].row, brute[allSets.findIndex((s) => key(s) === key(patients))], "row 1 vs brute force of the observed grouping");
  });

  it("the multiset of the 252 null rows equals the brute force over all 252 groupings", () => {
    const rows = readNullRows(join(folder, "null.tsv")).map((r) => r.row);
    compareMultisets(rows, brute, "null.tsv vs brute force");
  });

  it("row k is the brute force of the grouping relabeling k makes (subject s takes the row of out[s])", () => {
    const plan = result.nulls[0]!.setup.context.plan;
    const relabeler = new Relabeler(plan);
    const out = new Int32Array(10);
    const rows = readNullRows(join(folder, "null.tsv"));
    const index = new Map(allSets.map((s, i) => [key(s), i]));
    const seen = new Set<string>();
    for (const { k, row } of rows) {
      relabeler.permutation(k, out);
      const set = Array.from(out).flatMap((source, s) => (groups[source] === "patient" ? [s] : []));
      seen.add(key(set));
      compareRow(row, brute[index.get(key(set))!], `null.tsv row ${k}`, { k, patients: set });
    }
    expect(seen.size).toBe(252);
  });

  it("p_fwe = b/M exactly, with b counted over the 252 brute-force extents; no interval columns", () => {
    const [header, ...components] = readTsv(join(folder, "components.tsv"));
    expect(header).not.toContain("p_fwe_low");
    for (const c of components) {
      const extent = Number(c[header.indexOf("extent")]);
      const b = brute.filter((r) => r.maxExtent >= extent).length;
      expect(Number(c[header.indexOf("p_fwe")]), `component ${c[0]} (extent ${extent})`).toBe(b / 252);
      expect(b).toBeGreaterThanOrEqual(1); // the identity is among the 252
    }
  });
});

describe("exact mode within exchangeability blocks and with whole-block permutation", () => {
  const regionCount = 7;
  const threshold = 1.5;

  it("within 2 blocks of 5 (3+2 and 2+3 patients): C(5,3)·C(5,2) = 100 relabelings, equal to the brute force", async () => {
    const dir = join(scratch.dir, "within-blocks");
    const groups = ["patient", "patient", "control", "patient", "control", "control", "patient", "control", "patient", "control"];
    const site = ["a", "a", "a", "a", "a", "b", "b", "b", "b", "b"];
    const patients = groups.flatMap((g, s) => (g === "patient" ? [s] : []));
    const data = edgeData("exact-within-blocks", 10, regionCount, new Set(patients), 1);
    writeTinyCohort(dir, { columns: ["group", "site"], rows: groups.map((g, s) => [`sub-${s + 1}`, g, site[s]]), regionCount, edges: data });
    const design = writeDesign(
      dir,
      "design.yaml",
      `model: group
levels:
  group: [control, patient]
contrasts:
  effect: group[patient] - group[control]
inference:
  threshold: ${threshold}
  size: mass
  permutations: 500
  blocks: site
  block_permutation: within
`,
    );
    const out = join(dir, "results");
    await runAnalysis({ designFile: design, out, threads: 1, quiet: true }, quietLog);
    const summary = JSON.parse(readFileSync(join(out, "summary.json"), "utf8")).contrasts[0];
    // Reference: patient sets that keep 3 patients in block a (subjects 0–4) and 2 in block b (5–9).
    const sets: number[][] = [];
    for (const a of subsets(5, 3)) for (const b of subsets(5, 2)) sets.push([...a, ...b.map((s) => s + 5)]);
    expect(sets.length).toBe(100);
    expect(summary.mode).toBe("exact");
    expect(summary.distinct_relabelings).toBe(100);
    expect(summary.exchangeability_blocks).toEqual({ column: "site", count: 2, permutation: "within" });
    const rows = readNullRows(join(out, "effect", "null.tsv"));
    expect(rows.length).toBe(100);
    compareMultisets(rows.map((r) => r.row), twoGroupBruteForce(data, sets, regionCount, threshold, "upper"), "within-block null vs brute force");
  });

  it("whole blocks (4 blocks of 3, two alike): 4!/2! = 12 relabelings, equal to the brute force", async () => {
    const dir = join(scratch.dir, "whole-blocks");
    // Blocks in subject order: [P P C] [P C C] [P P C] [C C P]; blocks 1 and 3 are alike.
    const groups = ["patient", "patient", "control", "patient", "control", "control", "patient", "patient", "control", "control", "control", "patient"];
    const family = ["f1", "f1", "f1", "f2", "f2", "f2", "f3", "f3", "f3", "f4", "f4", "f4"];
    const patients = groups.flatMap((g, s) => (g === "patient" ? [s] : []));
    const data = edgeData("exact-whole-blocks", 12, regionCount, new Set(patients), 1);
    writeTinyCohort(dir, { columns: ["group", "family"], rows: groups.map((g, s) => [`sub-${s + 1}`, g, family[s]]), regionCount, edges: data });
    const design = writeDesign(
      dir,
      "design.yaml",
      `model: group
levels:
  group: [control, patient]
contrasts:
  effect: group[patient] - group[control]
inference:
  threshold: ${threshold}
  permutations: 100
  blocks: family
  block_permutation: whole
`,
    );
    const out = join(dir, "results");
    await runAnalysis({ designFile: design, out, threads: 1, quiet: true }, quietLog);
    // Reference: move whole blocks (keeping the order inside each) in all 4! ways; keep distinct patient sets.
    const unique = new Map<string, number[]>();
    for (const order of allPermutations(4)) {
      const set: number[] = [];
      for (let b = 0; b < 4; b++) for (let i = 0; i < 3; i++) if (groups[order[b] * 3 + i] === "patient") set.push(b * 3 + i);
      unique.set(key(set), set);
    }
    expect(unique.size).toBe(12);
    const summary = JSON.parse(readFileSync(join(out, "summary.json"), "utf8")).contrasts[0];
    expect(summary.mode).toBe("exact");
    expect(summary.distinct_relabelings).toBe(12);
    const rows = readNullRows(join(out, "effect", "null.tsv"));
    compareMultisets(
      rows.map((r) => r.row),
      twoGroupBruteForce(data, [...unique.values()], regionCount, threshold, "upper"),
      "whole-block null vs brute force",
    );
  });
});

describe("exact sign flips: one-sample model `1`, contrast [1], S = 8: 2^8 = 256 relabelings", () => {
  it("row k is the one-sample t of the data with signs flipped by the binary digits of k − 1; 256 rows", async () => {
    const dir = join(scratch.dir, "sign-flip");
    const regionCount = 6;
    const threshold = 2;
    const S = 8;
    const random = seedrandom("exact-sign-flip");
    const E = (regionCount * (regionCount - 1)) / 2;
    // A positive mean on the first 5 edges, noise elsewhere.
    const data = Array.from({ length: S }, () => Float64Array.from({ length: E }, (_, e) => Math.round((normalDraw(random) + (e < 5 ? 1.2 : 0)) * 1e6) / 1e6));
    writeTinyCohort(dir, { columns: ["age"], rows: data.map((_, s) => [`sub-${s + 1}`, String(60 + s)]), regionCount, edges: data });
    const design = writeDesign(
      dir,
      "design.yaml",
      `model: 1
contrasts:
  mean: [1]
inference:
  threshold: ${threshold}
  size: mass
  tail: upper
  permutations: 5000
`,
    );
    const out = join(dir, "results");
    await runAnalysis({ designFile: design, out, threads: 1, quiet: true }, quietLog);
    const summary = JSON.parse(readFileSync(join(out, "summary.json"), "utf8")).contrasts[0];
    expect(summary.mode).toBe("exact");
    expect(summary.scheme).toBe("sign-flip");
    expect(summary.permutations).toBe(256);
    const rows = readNullRows(join(out, "mean", "null.tsv"));
    expect(rows.length).toBe(256);
    // Reference: all 2^8 sign vectors; bit u of (k − 1) flips subject u (the documented order).
    const brute: NullRow[] = [];
    for (let pattern = 0; pattern < 256; pattern++) {
      const flipped = data.map((row, s) => Array.from(row, (v) => ((pattern >> s) & 1 ? -v : v)));
      brute.push(bruteForceMaxima(oneSampleT(flipped), regionCount, threshold, "upper"));
    }
    rows.forEach(({ k, row }) => compareRow(row, brute[k - 1], `sign-flip row ${k}`, { k, pattern: (k - 1).toString(2) }));
    compareMultisets(rows.map((r) => r.row), brute, "sign-flip null vs brute force");
    // p_fwe of the largest component is b/256 with b from the brute force.
    const [header, ...components] = readTsv(join(out, "mean", "components.tsv"));
    expect(components.length).toBeGreaterThan(0);
    for (const c of components) {
      const mass = Number(c[header.indexOf("mass")]);
      // Mass ties at the 1e-10 level are impossible here; count with the brute-force masses.
      const b = brute.filter((r) => r.maxMass >= mass * (1 - 1e-12)).length;
      expect(Number(c[header.indexOf("p_fwe")])).toBe(b / 256);
    }
  });
});

describe("exact mode with a two-level covariate: model group + sex, cells 2, 2, 2, 2 (S = 8)", () => {
  it("8!/(2!·2!·2!·2!) = 2520 relabelings; the null equals a Freedman–Lane refit over every distinct arrangement", async () => {
    const dir = join(scratch.dir, "group-sex");
    const regionCount = 6;
    const threshold = 1.5;
    const groups = ["patient", "control", "control", "patient", "patient", "control", "patient", "control"];
    const sex = ["F", "F", "M", "M", "F", "M", "M", "F"];
    const patients = groups.flatMap((g, s) => (g === "patient" ? [s] : []));
    const data = edgeData("exact-group-sex", 8, regionCount, new Set(patients), 1);
    writeTinyCohort(dir, { columns: ["group", "sex"], rows: groups.map((g, s) => [`sub-${s + 1}`, g, sex[s]]), regionCount, edges: data });
    const design = writeDesign(
      dir,
      "design.yaml",
      `model: group + sex
levels:
  group: [control, patient]
  sex: [F, M]
contrasts:
  effect: group[patient] - group[control]
inference:
  threshold: ${threshold}
  size: mass
  tail: both
  permutations: 3000
`,
    );
    const out = join(dir, "results");
    await runAnalysis({ designFile: design, out, threads: 1, quiet: true }, quietLog);
    const summary = JSON.parse(readFileSync(join(out, "summary.json"), "utf8")).contrasts[0];
    expect(summary).toMatchObject({ mode: "exact", permutations: 2520, distinct_relabelings: 2520 });
    // Reference: every permutation of the 8 design rows, kept once per distinct sequence of rows
    // (Winkler et al. 2014, §2.6), each analysed by the naive Freedman–Lane refit: reduced model
    // Z = [1, sex] fitted by ml-matrix, residuals moved with the rows (Y*[π(s)] = R[s] + Zγ̂[π(s)]),
    // full model [1, patient, male] refitted by least squares.
    const X = groups.map((g, s) => [1, g === "patient" ? 1 : 0, sex[s] === "M" ? 1 : 0]);
    const rowType = X.map((row) => row.join(","));
    const y = new Matrix(data.map((row) => Array.from(row)));
    const z = new Matrix(X.map((row) => [row[0], row[2]]));
    const fitted = z.mmul(new QrDecomposition(z).solve(y));
    const residual = y.sub(fitted);
    const distinct = new Map<string, number[]>();
    for (const p of allPermutations(8)) {
      const sequence = p.map((source) => rowType[source]).join("|");
      if (!distinct.has(sequence)) distinct.set(sequence, p);
    }
    expect(distinct.size).toBe(2520);
    const E = data[0].length;
    const brute = [...distinct.values()].map((p) => {
      const yStar: number[][] = Array.from({ length: 8 }, () => new Array<number>(E));
      p.forEach((to, s) => {
        for (let e = 0; e < E; e++) yStar[to][e] = residual.get(s, e) + fitted.get(to, e);
      });
      return bruteForceMaxima(olsContrastT(X, yStar, [0, 1, 0]), regionCount, threshold, "both");
    });
    const rows = readNullRows(join(out, "effect", "null.tsv"));
    expect(rows.length).toBe(2520);
    // Tolerance 1e-9 relative here (a reduced fit, a relabeling and a full refit; as freedmanLane.test.ts).
    const a = sortRows(rows.map((r) => r.row));
    const b = sortRows(brute);
    a.forEach((row, i) => {
      expect(row.maxExtent, `sorted row ${i + 1}: max_extent`).toBe(b[i].maxExtent);
      expectClose(row.maxMass, b[i].maxMass, { rel: 1e-9, abs: 1e-12, label: `sorted row ${i + 1}: max_mass` });
      expectClose(row.maxStatistic, b[i].maxStatistic, { rel: 1e-9, abs: 1e-12, label: `sorted row ${i + 1}: max_statistic` });
    });
  });
});
