// Test helpers for the permutation tests: tiny cohorts written from inline values into a
// temporary folder (participants.tsv, one tab-separated matrix per subject, a design file),
// an independent edge-wise least-squares fit with ml-matrix, and an independent search for
// connected components by breadth-first search. Nothing here calls plexus's own numerics.
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Matrix, QrDecomposition, inverse } from "ml-matrix";

/** A fresh temporary folder and a function removing it. */
export function scratchFolder(prefix: string): { dir: string; remove: () => void } {
  const dir = mkdtempSync(join(tmpdir(), `plexus-${prefix}-`));
  return { dir, remove: () => rmSync(dir, { recursive: true, force: true }) };
}

export interface TinyCohort {
  /** Column names after participant_id. */
  columns: string[];
  /** One row per subject: participant_id, then the columns. */
  rows: string[][];
  regionCount: number;
  /** Upper-triangle edge values per subject, in the i < j row-major order (edge 0 = (0,1)). */
  edges: Float64Array[];
}

/** Writes participants.tsv and connectomes/<id>.tsv (symmetric, diagonal 0) into `dir`. */
export function writeTinyCohort(dir: string, cohort: TinyCohort): void {
  mkdirSync(join(dir, "connectomes"), { recursive: true });
  const header = ["participant_id", ...cohort.columns].join("\t");
  writeFileSync(join(dir, "participants.tsv"), `${[header, ...cohort.rows.map((r) => r.join("\t"))].join("\n")}\n`);
  const N = cohort.regionCount;
  cohort.rows.forEach((row, s) => {
    const m = new Float64Array(N * N);
    let e = 0;
    for (let i = 0; i < N; i++) {
      for (let j = i + 1; j < N; j++, e++) {
        m[i * N + j] = cohort.edges[s][e];
        m[j * N + i] = cohort.edges[s][e];
      }
    }
    const lines: string[] = [];
    for (let i = 0; i < N; i++) lines.push(Array.from(m.subarray(i * N, (i + 1) * N), String).join("\t"));
    writeFileSync(join(dir, "connectomes", `${row[0]}.tsv`), `${lines.join("\n")}\n`);
  });
}

/** Writes a design file; `body` is YAML after the subjects and connectomes keys. */
export function writeDesign(dir: string, name: string, body: string): string {
  const file = join(dir, name);
  writeFileSync(file, `subjects: participants.tsv\nconnectomes: connectomes/{participant_id}.tsv\n${body}`);
  return file;
}

/** A standard normal draw by Box–Muller (Box & Muller 1958, Ann. Math. Stat. 29:610). */
export function normalDraw(random: () => number): number {
  let u = 0;
  while (u === 0) u = random();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random());
}

/** Region pairs (i < j) in edge order. */
export function edgeList(regionCount: number): [number, number][] {
  const out: [number, number][] = [];
  for (let i = 0; i < regionCount; i++) for (let j = i + 1; j < regionCount; j++) out.push([i, j]);
  return out;
}

/**
 * The contrast's t at every edge by ordinary least squares (ml-matrix's QR least squares for β,
 * the inverse of X'X for the variance): t = c'β̂ / √(σ̂² c'(X'X)⁻¹c), σ̂² = RSS/(S − p).
 * `data` is subject-major: data[s][e].
 */
export function olsContrastT(design: number[][], data: number[][], contrast: number[]): Float64Array {
  const x = new Matrix(design);
  const y = new Matrix(data);
  const beta = new QrDecomposition(x).solve(y);
  const residual = y.sub(x.mmul(beta));
  const S = x.rows;
  const p = x.columns;
  const xtxInv = inverse(x.transpose().mmul(x));
  const c = Matrix.columnVector(contrast);
  const variance = c.transpose().mmul(xtxInv).mmul(c).get(0, 0);
  const E = y.columns;
  const out = new Float64Array(E);
  for (let e = 0; e < E; e++) {
    let rss = 0;
    let estimate = 0;
    for (let s = 0; s < S; s++) rss += residual.get(s, e) ** 2;
    for (let j = 0; j < p; j++) estimate += contrast[j] * beta.get(j, e);
    out[e] = estimate / Math.sqrt((rss / (S - p)) * variance);
  }
  return out;
}

/** One-sample t of each edge: mean / (sd / √n) (Student 1908). */
export function oneSampleT(data: number[][]): Float64Array {
  const S = data.length;
  const E = data[0].length;
  const out = new Float64Array(E);
  for (let e = 0; e < E; e++) {
    let mean = 0;
    for (let s = 0; s < S; s++) mean += data[s][e];
    mean /= S;
    let ss = 0;
    for (let s = 0; s < S; s++) ss += (data[s][e] - mean) ** 2;
    out[e] = mean / Math.sqrt(ss / (S - 1) / S);
  }
  return out;
}

export interface NullRow {
  maxExtent: number;
  maxMass: number;
  maxStatistic: number;
}

/**
 * Largest supra-threshold component by breadth-first search over regions, for each sign the
 * tail looks at (upper: t > u; lower: −t > u; both: each sign on its own, never mixed), with
 * extent = edge count and mass = Σ (sign·t − u) (the component measures of the network-based
 * statistic: Zalesky, Fornito & Bullmore 2010, NeuroImage 53:1197); the maximum statistic is
 * max sign·t (|t| when two-tailed). Extent and mass are maximised independently.
 */
export function bruteForceMaxima(
  t: ArrayLike<number>,
  regionCount: number,
  threshold: number,
  tail: "upper" | "lower" | "both",
): NullRow {
  const pairs = edgeList(regionCount);
  const signs = tail === "both" ? [1, -1] : tail === "lower" ? [-1] : [1];
  let maxExtent = 0;
  let maxMass = 0;
  let maxStatistic = -Infinity;
  for (const sign of signs) {
    for (let e = 0; e < t.length; e++) if (Number.isFinite(t[e])) maxStatistic = Math.max(maxStatistic, sign * t[e]);
    const adjacency: { to: number; edge: number }[][] = Array.from({ length: regionCount }, () => []);
    pairs.forEach(([i, j], e) => {
      if (sign * t[e] > threshold) {
        adjacency[i].push({ to: j, edge: e });
        adjacency[j].push({ to: i, edge: e });
      }
    });
    const seen = new Uint8Array(regionCount);
    for (let start = 0; start < regionCount; start++) {
      if (seen[start] || adjacency[start].length === 0) continue;
      const edges = new Set<number>();
      const queue = [start];
      seen[start] = 1;
      while (queue.length > 0) {
        const node = queue.shift()!;
        for (const { to, edge } of adjacency[node]) {
          edges.add(edge);
          if (!seen[to]) {
            seen[to] = 1;
            queue.push(to);
          }
        }
      }
      let mass = 0;
      for (const e of edges) mass += sign * t[e] - threshold;
      maxExtent = Math.max(maxExtent, edges.size);
      maxMass = Math.max(maxMass, mass);
    }
  }
  return { maxExtent, maxMass, maxStatistic: maxStatistic === -Infinity ? NaN : maxStatistic };
}

/** A TSV file as rows of cells (header first). */
export function readTsv(file: string): string[][] {
  return readFileSync(file, "utf8").trimEnd().split("\n").map((line) => line.split("\t"));
}

/** null.tsv as rows of numbers (permutation, max_extent, max_mass, max_statistic); empty cells are NaN. */
export function readNullRows(file: string): { k: number; row: NullRow }[] {
  const [header, ...rows] = readTsv(file);
  if (header.join(",") !== "permutation,max_extent,max_mass,max_statistic") throw new Error(`unexpected null.tsv header ${header}`);
  const num = (cell: string) => (cell === "" ? NaN : Number(cell));
  return rows.map((r) => ({ k: Number(r[0]), row: { maxExtent: num(r[1]), maxMass: num(r[2]), maxStatistic: num(r[3]) } }));
}

/** Rows sorted by (statistic, extent, mass), for comparing two multisets of null rows. */
export function sortRows(rows: NullRow[]): NullRow[] {
  return [...rows].sort((a, b) => a.maxStatistic - b.maxStatistic || a.maxExtent - b.maxExtent || a.maxMass - b.maxMass);
}

/** Every k-subset of 0..n−1, in lexicographic order. */
export function subsets(n: number, k: number): number[][] {
  const out: number[][] = [];
  const pick = (from: number, chosen: number[]) => {
    if (chosen.length === k) {
      out.push([...chosen]);
      return;
    }
    for (let i = from; i < n; i++) pick(i + 1, [...chosen, i]);
  };
  pick(0, []);
  return out;
}

/** Every permutation of 0..n−1 (Heap's algorithm would do; plain recursion is clearer). */
export function allPermutations(n: number): number[][] {
  const out: number[][] = [];
  const used = new Uint8Array(n);
  const walk = (prefix: number[]) => {
    if (prefix.length === n) {
      out.push([...prefix]);
      return;
    }
    for (let i = 0; i < n; i++) {
      if (used[i]) continue;
      used[i] = 1;
      prefix.push(i);
      walk(prefix);
      prefix.pop();
      used[i] = 0;
    }
  };
  walk([]);
  return out;
}
