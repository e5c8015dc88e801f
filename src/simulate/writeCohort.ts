import { existsSync, mkdirSync, mkdtempSync, readdirSync, renameSync, rmSync, rmdirSync, statSync, writeFileSync } from "node:fs";
import { basename, dirname, join, resolve } from "node:path";
import { InputError } from "../errors.js";
import { encodeNpy } from "../io/npy.js";
import type { SimulatedCohort } from "./simulateCohort.js";

export interface WriteCohortOptions {
  /** `tsv`: connectomes/<participant_id>.tsv, one per participant; `npy`: one connectomes.npy of shape (S, N, N). */
  format: "tsv" | "npy";
  /** Write planted.tsv (region_a, region_b labels) when the cohort has a planted effect. */
  plantedFile: boolean;
  /**
   * Replace the cohort files of an existing, non-empty folder. Only the files a
   * cohort consists of are removed (participants.tsv, regions.tsv, planted.tsv,
   * connectomes.npy and connectomes/*.tsv); anything else there is kept.
   */
  force?: boolean;
}

const COHORT_FILES = ["participants.tsv", "regions.tsv", "planted.tsv", "connectomes.npy"] as const;
const CONNECTOME_FOLDER = "connectomes";

function tsvText(header: readonly string[] | null, rows: readonly (readonly string[])[]): string {
  const lines = header ? [header.join("\t")] : [];
  for (const row of rows) lines.push(row.join("\t"));
  return `${lines.join("\n")}\n`;
}

/** A square matrix as tab-delimited text, numbers in shortest round-trip form. */
function matrixText(matrix: Float64Array, size: number): string {
  const lines: string[] = [];
  const cells: string[] = new Array<string>(size);
  for (let i = 0; i < size; i++) {
    for (let j = 0; j < size; j++) cells[j] = String(matrix[i * size + j]);
    lines.push(cells.join("\t"));
  }
  return `${lines.join("\n")}\n`;
}

function writeCohortFiles(folder: string, cohort: SimulatedCohort, options: WriteCohortOptions): void {
  const size = cohort.regions.length;
  writeFileSync(join(folder, "participants.tsv"), tsvText(cohort.participants.header, cohort.participants.rows));
  const regionRows = cohort.regions.map((region) => [
    region.label,
    region.x === undefined ? "n/a" : String(region.x),
    region.y === undefined ? "n/a" : String(region.y),
    region.z === undefined ? "n/a" : String(region.z),
    region.hemisphere ?? "n/a",
    region.system ?? "n/a",
  ]);
  writeFileSync(join(folder, "regions.tsv"), tsvText(["label", "x", "y", "z", "hemisphere", "system"], regionRows));
  if (options.format === "tsv") {
    mkdirSync(join(folder, CONNECTOME_FOLDER));
    cohort.participants.rows.forEach((row, k) => {
      writeFileSync(join(folder, CONNECTOME_FOLDER, `${row[0]}.tsv`), matrixText(cohort.matrices[k], size));
    });
  } else {
    const data = new Float64Array(cohort.matrices.length * size * size);
    cohort.matrices.forEach((matrix, k) => data.set(matrix, k * size * size));
    writeFileSync(join(folder, "connectomes.npy"), encodeNpy([cohort.matrices.length, size, size], data));
  }
  if (options.plantedFile && cohort.plantedEdges.length > 0) {
    const rows = cohort.plantedEdges.map(([i, j]) => [cohort.regions[i].label, cohort.regions[j].label]);
    writeFileSync(join(folder, "planted.tsv"), tsvText(["region_a", "region_b"], rows));
  }
}

/** Removes the files an earlier cohort left in `folder`, and nothing else. */
function removeCohortFiles(folder: string): void {
  for (const name of COHORT_FILES) rmSync(join(folder, name), { force: true });
  const connectomes = join(folder, CONNECTOME_FOLDER);
  if (existsSync(connectomes) && statSync(connectomes).isDirectory()) {
    for (const name of readdirSync(connectomes)) {
      if (name.endsWith(".tsv")) rmSync(join(connectomes, name), { force: true });
    }
    if (readdirSync(connectomes).length === 0) rmdirSync(connectomes);
  }
}

/** Moves every entry of `from` into `to` (merging into an existing connectomes/ folder), then removes `from`. */
function moveEntries(from: string, to: string): void {
  for (const name of readdirSync(from)) {
    const source = join(from, name);
    const target = join(to, name);
    if (statSync(source).isDirectory() && existsSync(target)) {
      for (const inner of readdirSync(source)) renameSync(join(source, inner), join(target, inner));
      rmdirSync(source);
    } else {
      renameSync(source, target);
    }
  }
  rmdirSync(from);
}

/**
 * Writes a simulated cohort to `dir`: participants.tsv, regions.tsv (label x y
 * z hemisphere system), the connectomes, and planted.tsv when there is an
 * effect. Files are written into a temporary sibling folder first and renamed
 * into place, so a failed run leaves no half-written cohort. Refuses an
 * existing non-empty folder unless `force`.
 */
export function writeCohort(dir: string, cohort: SimulatedCohort, options: WriteCohortOptions): void {
  const target = resolve(dir);
  let targetState: "absent" | "empty" | "full" = "absent";
  if (existsSync(target)) {
    if (!statSync(target).isDirectory()) {
      throw new InputError("the output path exists and is not a folder", { file: dir });
    }
    targetState = readdirSync(target).length === 0 ? "empty" : "full";
  }
  if (targetState === "full" && options.force !== true) {
    throw new InputError(
      "the output folder already exists and is not empty",
      { file: dir },
      "choose a new folder, or pass --force to replace the cohort files in it",
    );
  }
  const parent = dirname(target);
  mkdirSync(parent, { recursive: true });
  const staging = mkdtempSync(join(parent, `.plexus-tmp-${basename(target)}-`));
  try {
    writeCohortFiles(staging, cohort, options);
    if (targetState === "absent") {
      renameSync(staging, target);
    } else if (targetState === "empty") {
      rmdirSync(target);
      renameSync(staging, target);
    } else {
      removeCohortFiles(target);
      moveEntries(staging, target);
    }
  } catch (error) {
    rmSync(staging, { recursive: true, force: true });
    throw error;
  }
}
