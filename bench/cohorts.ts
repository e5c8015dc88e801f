import { spawnSync } from "node:child_process";
import { closeSync, existsSync, mkdirSync, openSync, readFileSync, rmSync, writeFileSync, writeSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { encodeNpy } from "../src/io/npy.js";
import { runSimulation } from "../src/simulate/runSimulation.js";
import { uniformSource } from "./uniformSource.js";

/**
 * The invented cohorts the benchmark reads, made once into bench/.cache
 * (gitignored) and reused: a file `.complete` marks a finished cohort.
 *   cohort-400      400 regions, 100 patients + 100 controls with age and sex, one text matrix each
 *                   (plexus's simulator, seed 4242, a planted 8-region subnetwork);
 *   cohort-400-npy  the same cohort as one .npy stack, and (bench/containerStacks.py) as one MATLAB .mat
 *                   file (N × N × S) and one HDF5 file (S × N × N);
 *   cohort-1000     1,000 regions, 500 subjects, one .npy stack of 500 × 1000 × 1000 (4 GB) of
 *                   uniform noise, written one matrix at a time so it is never held whole;
 *   population-<S>x<N>  S participants at 21 sites with group, age and sex, one float32 .npy stack
 *                   (S × N × N) of uniform noise with a site offset and a patient shift, written one
 *                   matrix at a time (scenario D: 10,000 × 333, 4.4 GB; and 2,000 × 1,000, 8 GB).
 */
export const CACHE = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../../.cache"); // from bench/.build/bench/

function complete(folder: string): boolean {
  return existsSync(path.join(folder, ".complete"));
}

function markComplete(folder: string): void {
  writeFileSync(path.join(folder, ".complete"), `${new Date().toISOString()}\n`);
}

export function ensureSimulatedCohort(format: "tsv" | "npy", log: (line: string) => void): string {
  const folder = path.join(CACHE, format === "tsv" ? "cohort-400" : "cohort-400-npy");
  if (complete(folder)) return folder;
  log(`making ${folder} with the simulator (once)`);
  rmSync(folder, { recursive: true, force: true });
  mkdirSync(folder, { recursive: true });
  runSimulation({
    out: folder,
    seed: 4242,
    simulation: {
      regions: 400,
      patients: 100,
      controls: 100,
      kind: "correlation",
      effect: { regions: 8, size: 1.2 },
      covariates: true,
    },
    format,
    force: true,
  });
  markComplete(folder);
  return folder;
}

/**
 * The header of a version 1.0 .npy file of little-endian float64 in C order
 * (NEP 1, "A Simple File Format for NumPy Arrays"), laid out as encodeNpy lays
 * it out (checkNpyHeader compares the two), so the data can follow one matrix
 * at a time instead of being encoded whole.
 */
function npyHeader(shape: number[], descr: "<f8" | "<f4" = "<f8"): Uint8Array {
  const shapeText = `(${shape.join(", ")})`;
  let dict = `{'descr': '${descr}', 'fortran_order': False, 'shape': ${shapeText}, }`;
  const unpadded = 10 + dict.length + 1;
  dict += " ".repeat((64 - (unpadded % 64)) % 64) + "\n";
  const out = new Uint8Array(10 + dict.length);
  out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0], 0);
  new DataView(out.buffer).setUint16(8, dict.length, true);
  for (let k = 0; k < dict.length; k++) out[10 + k] = dict.charCodeAt(k);
  return out;
}

/** Checks npyHeader against plexus's own encoder on a small array (same header bytes). */
function checkNpyHeader(): void {
  const shape = [3, 4, 4];
  const reference = encodeNpy(shape, new Float64Array(48));
  const header = npyHeader(shape);
  const same = header.every((byte, k) => byte === reference[k]) && reference.length === header.length + 48 * 8;
  if (!same) throw new Error("bench: the streamed .npy header differs from encodeNpy's");
}

export function ensureLargeCohort(log: (line: string) => void): string {
  const folder = path.join(CACHE, "cohort-1000");
  if (complete(folder)) return folder;
  const S = 500;
  const N = 1000;
  log(`making ${folder}: ${S} matrices of ${N} × ${N} in one .npy stack (${((S * N * N * 8) / 1e9).toFixed(1)} GB, once)`);
  checkNpyHeader();
  rmSync(folder, { recursive: true, force: true });
  mkdirSync(folder, { recursive: true });
  const random = uniformSource(1000);
  const rows = ["participant_id\tgroup\tage\tsex"];
  for (let s = 0; s < S; s++) {
    const id = `sub-${String(s + 1).padStart(4, "0")}`;
    rows.push(`${id}\t${s < S / 2 ? "patient" : "control"}\t${(55 + 30 * random()).toFixed(1)}\t${random() < 0.5 ? "F" : "M"}`);
  }
  writeFileSync(path.join(folder, "participants.tsv"), `${rows.join("\n")}\n`);
  const file = openSync(path.join(folder, "connectomes.npy"), "w");
  try {
    writeSync(file, npyHeader([S, N, N]));
    const matrix = new Float64Array(N * N);
    const bytes = new Uint8Array(matrix.buffer);
    for (let s = 0; s < S; s++) {
      const shift = s < S / 2 ? 0.35 : 0;
      for (let i = 0; i < N; i++) {
        matrix[i * N + i] = 0;
        for (let j = i + 1; j < N; j++) {
          // A patient shift on the edges among the first 10 regions, noise elsewhere.
          const value = random() - 0.5 + (i < 10 && j < 10 ? shift : 0);
          matrix[i * N + j] = value;
          matrix[j * N + i] = value;
        }
      }
      writeSync(file, bytes);
    }
  } finally {
    closeSync(file);
  }
  markComplete(folder);
  return folder;
}

/** Sites of the population cohorts. */
export const POPULATION_SITES = 21;

/**
 * Scenario D's cohorts: `subjects` participants (a third patients) at 21 sites, one
 * float32 .npy stack of uniform noise plus a site offset and, among the first 10
 * regions, a patient shift; written one matrix at a time, never held whole.
 */
export function ensurePopulationCohort(subjects: number, regions: number, log: (line: string) => void): string {
  const folder = path.join(CACHE, `population-${subjects}x${regions}`);
  if (complete(folder)) return folder;
  const S = subjects;
  const N = regions;
  log(`making ${folder}: ${S} matrices of ${N} × ${N} in one float32 .npy stack (${((S * N * N * 4) / 1e9).toFixed(1)} GB, once)`);
  rmSync(folder, { recursive: true, force: true });
  mkdirSync(folder, { recursive: true });
  const random = uniformSource(S * 7 + N);
  const rows = ["participant_id\tgroup\tage\tsex\tsite"];
  const patient: boolean[] = [];
  const site: number[] = [];
  for (let s = 0; s < S; s++) {
    const id = `sub-${String(s + 1).padStart(5, "0")}`;
    patient.push(random() < 1 / 3);
    site.push(Math.floor(random() * POPULATION_SITES));
    const siteName = `site${String(site[s] + 1).padStart(2, "0")}`;
    rows.push(`${id}\t${patient[s] ? "patient" : "control"}\t${(45 + 30 * random()).toFixed(1)}\t${random() < 0.5 ? "F" : "M"}\t${siteName}`);
  }
  writeFileSync(path.join(folder, "participants.tsv"), `${rows.join("\n")}\n`);
  const file = openSync(path.join(folder, "connectomes.npy"), "w");
  try {
    writeSync(file, npyHeader([S, N, N], "<f4"));
    const matrix = new Float32Array(N * N);
    const bytes = new Uint8Array(matrix.buffer);
    for (let s = 0; s < S; s++) {
      const offset = (site[s] - POPULATION_SITES / 2) * 0.01;
      const shift = patient[s] ? 0.08 : 0;
      for (let i = 0; i < N; i++) {
        matrix[i * N + i] = 0;
        for (let j = i + 1; j < N; j++) {
          const value = random() - 0.5 + offset + (i < 10 && j < 10 ? shift : 0);
          matrix[i * N + j] = value;
          matrix[j * N + i] = value;
        }
      }
      writeSync(file, bytes);
    }
  } finally {
    closeSync(file);
  }
  markComplete(folder);
  return folder;
}

export interface DesignOptions {
  model: string;
  permutations: number;
  connectomes: string;
  transform?: "fisher-z";
}

/** Writes a design file into the cohort folder and returns its path. */
/**
 * The .npy cohort's stack again as connectomes.mat and connectomes.h5 (bench/containerStacks.py,
 * with SciPy and h5py); the writers' versions, or undefined (with a note) when no Python has them.
 */
export function ensureContainerStacks(npyFolder: string, log: (line: string) => void): Record<string, string> | undefined {
  const marker = path.join(npyFolder, ".containers-complete");
  if (existsSync(marker)) return JSON.parse(readFileSync(marker, "utf8")) as Record<string, string>;
  const script = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../../containerStacks.py");
  log(`making ${npyFolder}/connectomes.mat and connectomes.h5 from its .npy stack (once)`);
  for (const python of ["/usr/bin/python3", "python3"]) {
    const result = spawnSync(python, [script, npyFolder], { encoding: "utf8" });
    if (!result.error && result.status === 0) {
      const versions = result.stdout.trim().split("\n").pop()!;
      writeFileSync(marker, versions);
      return JSON.parse(versions) as Record<string, string>;
    }
  }
  log("no .mat or HDF5 reading rows (a python3 with numpy, scipy and h5py is needed: Debian's python3-scipy, python3-h5py)");
  return undefined;
}

export function writeBenchDesign(folder: string, name: string, options: DesignOptions): string {
  const file = path.join(folder, `${name}.yaml`);
  const lines = [
    "# Written by bench/cohorts.ts for npm run bench.",
    "subjects: participants.tsv",
    `connectomes: ${options.connectomes}`,
    `model: ${options.model}`,
    "levels:",
    "  group: [control, patient]",
    "contrasts:",
    "  patient_gt_control: group[patient] - group[control]",
    ...(options.transform ? [`transform: ${options.transform}`] : []),
    "inference:",
    "  method: components",
    "  threshold: 3.0",
    "  size: extent",
    `  permutations: ${options.permutations}`,
    "  seed: 1",
    "",
  ];
  writeFileSync(file, lines.join("\n"));
  return file;
}
