// Shared by the strength tests: a capturing CLI sink, simulated cohorts written to disk, and
// independent readers of the files (participants, regions, matrices as text → Fisher z with
// Math.atanh, diagonal set to 0). Nothing here calls plexus's own readers or numerics.
import { existsSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import tCdf from "@stdlib/stats-base-dists-t-cdf";
import { inverse, Matrix, pseudoInverse } from "ml-matrix";
import { main } from "../../../src/cli/main.js";
import type { OutputSink } from "../../../src/cli/outputSink.js";
import { simulateCohort, type SimulationOptions } from "../../../src/simulate/simulateCohort.js";
import { simulationRandom } from "../../../src/simulate/simulationRandom.js";
import { writeCohort } from "../../../src/simulate/writeCohort.js";

/** Runs the CLI in-process and keeps what it writes. */
export async function runCli(argv: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = "";
  let stderr = "";
  const sink: OutputSink = { out: (text) => void (stdout += text), err: (text) => void (stderr += text), errIsTerminal: false };
  const code = await main(argv, sink);
  return { code, stdout, stderr };
}

/** Simulates a cohort with `simulateCohort(options, simulationRandom(seed))` and writes it to `dir`; `prefix` renames the IDs (sub-001 → prefix-001). */
export function writeSimulatedCohort(dir: string, options: SimulationOptions, seed: number, extra: { format?: "tsv" | "npy"; prefix?: string } = {}): void {
  const cohort = simulateCohort(options, simulationRandom(seed));
  if (extra.prefix) cohort.participants.rows.forEach((row) => (row[0] = row[0].replace("sub-", `${extra.prefix}-`)));
  writeCohort(dir, cohort, { format: extra.format ?? "tsv", plantedFile: true });
}

/** Writes a design file from its lines; returns its path. */
export function writeDesignFile(file: string, lines: string[]): string {
  writeFileSync(file, `${lines.join("\n")}\n`);
  return file;
}

export function readRows(file: string): string[][] {
  return readFileSync(file, "utf8")
    .split("\n")
    .filter((line) => line !== "")
    .map((line) => line.split("\t"));
}

export function readTable(file: string): { header: string[]; rows: string[][] } {
  const [header, ...rows] = readRows(file);
  return { header, rows };
}

/** A numeric column by name; empty cells are NaN. */
export function numberColumn(table: { header: string[]; rows: string[][] }, name: string): number[] {
  const k = table.header.indexOf(name);
  if (k < 0) throw new Error(`no column ${name} in ${table.header.join(",")}`);
  return table.rows.map((r) => (r[k] === "" ? NaN : Number(r[k])));
}

export interface FisherCohort {
  /** participants.tsv rows without the header: participant_id, group, age, sex, … */
  rows: string[][];
  labels: string[];
  systems: string[];
  /** Per participant, the N × N matrix of atanh(r) with a zero diagonal. */
  matrices: number[][][];
}

/** Reads a simulated correlation cohort (one text matrix per participant) from `dir`. */
export function readFisherCohort(dir: string): FisherCohort {
  const rows = readRows(path.join(dir, "participants.tsv")).slice(1);
  const regions = existsSync(path.join(dir, "regions.tsv")) ? readTable(path.join(dir, "regions.tsv")) : { header: [], rows: [] };
  const matrices = rows.map((row) =>
    readRows(path.join(dir, "connectomes", `${row[0]}.tsv`)).map((cells, i) => cells.map((c, j) => (i === j ? 0 : Math.atanh(Number(c))))),
  );
  return {
    rows,
    labels: regions.rows.map((r) => r[regions.header.indexOf("label")]),
    systems: regions.rows.map((r) => r[regions.header.indexOf("system")]),
    matrices,
  };
}

/** Nodal strength per region from full matrices: strength[i][s] = Σ_j m_s[i][j]. */
export function rowSums(matrices: number[][][], transform: (w: number) => number = (w) => w): number[][] {
  return matrices[0].map((_, i) => matrices.map((m) => m[i].reduce((sum, w) => sum + transform(w), 0)));
}

export interface OlsReference {
  estimate: number[];
  se: number[];
  t: number[];
  p: number[];
  partialR: number[];
  df: number;
}

/**
 * The contrast's statistics per measure by ordinary least squares with ml-matrix 6.15.1
 * (pseudoInverse, the SVD route, for β; inverse(X'X) for the contrast variance), the t tails from
 * @stdlib/stats-base-dists-t-cdf 0.2.3 (upper tail as cdf(−t) by symmetry, two-sided 2·cdf(−|t|)),
 * and partial r = t/√(t² + df) (Rosenthal 1994). `measures[m]` holds measure m over the subjects.
 */
export function olsReference(design: number[][], measures: number[][], contrast: number[], tail: "upper" | "lower" | "both"): OlsReference {
  const X = new Matrix(design);
  const pinv = pseudoInverse(X);
  const c = Matrix.columnVector(contrast);
  const factor = c.transpose().mmul(inverse(X.transpose().mmul(X))).mmul(c).get(0, 0);
  const df = X.rows - X.columns;
  const out: OlsReference = { estimate: [], se: [], t: [], p: [], partialR: [], df };
  for (const y of measures) {
    const Y = Matrix.columnVector(y);
    const beta = pinv.mmul(Y);
    const rss = Y.sub(X.mmul(beta)).to1DArray().reduce((sum, r) => sum + r * r, 0);
    const estimate = c.transpose().mmul(beta).get(0, 0);
    const se = Math.sqrt((rss / df) * factor);
    const t = estimate / se;
    out.estimate.push(estimate);
    out.se.push(se);
    out.t.push(t);
    out.p.push(tail === "upper" ? tCdf(-t, df) : tail === "lower" ? tCdf(t, df) : 2 * tCdf(-Math.abs(t), df));
    out.partialR.push(t / Math.sqrt(t * t + df));
  }
  return out;
}

/** X = [1, patient, age, male] from participants.tsv rows (participant_id, group, age, sex, …). */
export function clinicDesign(rows: string[][]): number[][] {
  return rows.map((r) => [1, r[1] === "patient" ? 1 : 0, Number(r[2]), r[3] === "M" ? 1 : 0]);
}

/**
 * The lines of a design file for a simulated cohort in the folder `cohort` (relative to the
 * design; "" for the design's own folder): group coded control-first, Fisher z, the given model,
 * contrasts (`name: expression`) and inference options (`key: value`).
 */
export function groupDesignLines(options: { cohort: string; npy?: boolean; regions?: boolean; model: string; contrasts: string[]; inference: string[] }): string[] {
  const at = (file: string) => (options.cohort === "" ? file : `${options.cohort}/${file}`);
  return [
    `subjects: ${at("participants.tsv")}`,
    `connectomes: ${at(options.npy ? "connectomes.npy" : "connectomes/{participant_id}.tsv")}`,
    ...(options.regions ? [`regions: ${at("regions.tsv")}`] : []),
    `model: ${options.model}`,
    "levels:",
    "  group: [control, patient]",
    "contrasts:",
    ...options.contrasts.map((c) => `  ${c}`),
    "transform: fisher-z",
    "inference:",
    ...options.inference.map((o) => `  ${o}`),
  ];
}
