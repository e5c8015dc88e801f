import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, renameSync, rmSync, rmdirSync, statSync, writeFileSync } from "node:fs";
import { basename, dirname, join, relative, resolve, sep } from "node:path";
import { InputError } from "../errors.js";
import { encodeNpy } from "../io/npy.js";
import { sha256File } from "../common/sha256.js";
import type { SimulatedCohort } from "./simulateCohort.js";

export interface WriteCohortOptions {
  /** `tsv`: connectomes/<participant_id>.tsv, one per participant; `npy`: one connectomes.npy of shape (S, N, N). */
  format: "tsv" | "npy";
  /** Write planted.tsv (region_a, region_b labels) when the cohort has a planted effect. */
  plantedFile: boolean;
  /**
   * Replace a cohort that plexus simulated earlier into an existing folder.
   * Only files listed in its record (cohort.json) and unchanged since are
   * removed; anything else there is kept, and a file the new cohort would
   * overwrite that plexus did not write (or that was edited) is refused.
   */
  force?: boolean;
}

const CONNECTOME_FOLDER = "connectomes";
/** The record of the files a simulated cohort consists of, with their SHA-256, written beside them. */
export const COHORT_RECORD = "cohort.json";
const WRITTEN_BY = "plexus simulate";

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
  const files: Record<string, string> = {};
  for (const name of filesUnder(folder)) files[name] = sha256File(join(folder, name));
  writeFileSync(join(folder, COHORT_RECORD), `${JSON.stringify({ written_by: WRITTEN_BY, files }, null, 2)}\n`);
}

/** Relative paths ('/'-separated) of the files under `folder`, sorted. */
function filesUnder(folder: string): string[] {
  const names: string[] = [];
  const walk = (dir: string) => {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      const full = join(dir, entry.name);
      if (entry.isDirectory()) walk(full);
      else names.push(relative(folder, full).split(sep).join("/"));
    }
  };
  walk(folder);
  return names.sort();
}

/** The files of an earlier simulated cohort in `folder`, from its record; empty when there is none or it is not plexus's. */
function recordedFiles(folder: string): Map<string, string> {
  try {
    const record = JSON.parse(readFileSync(join(folder, COHORT_RECORD), "utf8")) as { written_by?: unknown; files?: unknown };
    if (record.written_by !== WRITTEN_BY || typeof record.files !== "object" || record.files === null) return new Map();
    return new Map(Object.entries(record.files as Record<string, unknown>).filter((e): e is [string, string] => typeof e[1] === "string"));
  } catch {
    return new Map();
  }
}

/**
 * The files of `folder` that writing the cohort in `staging` would replace, when
 * any of them is not an unchanged file of an earlier simulated cohort: refused.
 */
function refuseForeignFiles(folder: string, staging: string, dir: string): void {
  const recorded = recordedFiles(folder);
  const foreign: string[] = [];
  for (const name of filesUnder(staging)) {
    const target = join(folder, name);
    if (!existsSync(target)) continue;
    if (name === COHORT_RECORD ? recorded.size === 0 : recorded.get(name) !== sha256File(target)) foreign.push(name);
  }
  if (foreign.length > 0) {
    throw new InputError(
      `the folder holds ${foreign.length} file${foreign.length > 1 ? "s" : ""} that plexus simulate did not write or that were changed since (${foreign.slice(0, 5).join(", ")}${foreign.length > 5 ? ", …" : ""}); --force replaces only an unchanged simulated cohort`,
      { file: dir },
      "choose a new folder; nothing was changed",
    );
  }
}

/** Removes the unchanged files an earlier simulated cohort left in `folder` (from its record), and nothing else. */
function removeCohortFiles(folder: string): void {
  const recorded = recordedFiles(folder);
  for (const [name, hash] of recorded) {
    const file = join(folder, name);
    if (existsSync(file) && statSync(file).isFile() && sha256File(file) === hash) rmSync(file);
  }
  if (recorded.size > 0) rmSync(join(folder, COHORT_RECORD), { force: true });
  const connectomes = join(folder, CONNECTOME_FOLDER);
  if (existsSync(connectomes) && statSync(connectomes).isDirectory() && readdirSync(connectomes).length === 0) rmdirSync(connectomes);
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
 * existing non-empty folder unless `force`, and with `force` replaces only the
 * unchanged files of an earlier simulated cohort (cohort.json lists them).
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
      refuseForeignFiles(target, staging, dir);
      removeCohortFiles(target);
      moveEntries(staging, target);
    }
  } catch (error) {
    rmSync(staging, { recursive: true, force: true });
    throw error;
  }
}
