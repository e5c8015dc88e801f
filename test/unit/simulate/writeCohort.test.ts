import { createHash } from "node:crypto";
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, relative } from "node:path";
import { afterEach, describe, expect, it } from "vitest";
import { InputError } from "../../../src/errors.js";
import { parseMatrixText } from "../../../src/io/matrixText.js";
import { parseNpy } from "../../../src/io/npy.js";
import { parseRegions } from "../../../src/io/regions.js";
import type { SimulationOptions } from "../../../src/simulate/simulateCohort.js";
import { simulateCohort } from "../../../src/simulate/simulateCohort.js";
import { simulationRandom } from "../../../src/simulate/simulationRandom.js";
import { writeCohort } from "../../../src/simulate/writeCohort.js";

const OPTIONS: SimulationOptions = {
  regions: 8,
  patients: 3,
  controls: 2,
  kind: "correlation",
  effect: { regions: 3, size: 1 },
  covariates: true,
};

const scratch: string[] = [];
function scratchDir(): string {
  const dir = mkdtempSync(join(tmpdir(), "plexus-write-cohort-"));
  scratch.push(dir);
  return dir;
}
afterEach(() => {
  for (const dir of scratch.splice(0)) rmSync(dir, { recursive: true, force: true });
});

/** SHA-256 of every file under `dir`, keyed by relative path. */
function treeDigest(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (folder: string) => {
    for (const entry of readdirSync(folder, { withFileTypes: true })) {
      const full = join(folder, entry.name);
      if (entry.isDirectory()) walk(full);
      else out[relative(dir, full)] = createHash("sha256").update(readFileSync(full)).digest("hex");
    }
  };
  walk(dir);
  return out;
}

describe("writeCohort", () => {
  it("writes participants.tsv, regions.tsv, connectomes/<id>.tsv and planted.tsv, leaving no staging folder", () => {
    const root = scratchDir();
    const out = join(root, "cohort");
    const cohort = simulateCohort(OPTIONS, simulationRandom(1));
    writeCohort(out, cohort, { format: "tsv", plantedFile: true });

    expect(readdirSync(root)).toEqual(["cohort"]);
    expect(readdirSync(out).sort()).toEqual(["cohort.json", "connectomes", "participants.tsv", "planted.tsv", "regions.tsv"]);
    expect(readdirSync(join(out, "connectomes")).sort()).toEqual(
      ["sub-001", "sub-002", "sub-003", "sub-004", "sub-005"].map((id) => `${id}.tsv`),
    );

    const participants = readFileSync(join(out, "participants.tsv"), "utf8");
    const lines = participants.trimEnd().split("\n").map((line) => line.split("\t"));
    expect(lines[0]).toEqual(cohort.participants.header);
    expect(lines.slice(1)).toEqual(cohort.participants.rows);

    const regions = parseRegions(readFileSync(join(out, "regions.tsv"), "utf8"), "regions.tsv", 8);
    expect(regions).toEqual(cohort.regions);
    expect(readFileSync(join(out, "regions.tsv"), "utf8").split("\n")[0]).toBe("label\tx\ty\tz\themisphere\tsystem");

    cohort.participants.rows.forEach((row, k) => {
      const text = readFileSync(join(out, "connectomes", `${row[0]}.tsv`), "utf8");
      expect(text.split("\n")[0].split("\t")).toHaveLength(8);
      const parsed = parseMatrixText(text, `${row[0]}.tsv`);
      expect(parsed.size).toBe(8);
      // Round trip is exact: String(x) is the shortest text that reads back as x (ECMA-262 Number::toString).
      expect(Array.from(parsed.values)).toEqual(Array.from(cohort.matrices[k]));
    });

    const planted = readFileSync(join(out, "planted.tsv"), "utf8").trimEnd().split("\n");
    expect(planted[0]).toBe("region_a\tregion_b");
    expect(planted.slice(1)).toEqual(
      cohort.plantedEdges.map(([i, j]) => `${cohort.regions[i].label}\t${cohort.regions[j].label}`),
    );
  });

  it("writes count matrices as plain integers", () => {
    const out = join(scratchDir(), "counts");
    const cohort = simulateCohort({ ...OPTIONS, kind: "counts" }, simulationRandom(4));
    writeCohort(out, cohort, { format: "tsv", plantedFile: true });
    const text = readFileSync(join(out, "connectomes", "sub-001.tsv"), "utf8");
    for (const cell of text.trimEnd().split(/[\t\n]/)) expect(cell).toMatch(/^\d+$/);
  });

  it("writes connectomes.npy of shape (S, N, N) that reads back exactly", () => {
    const out = join(scratchDir(), "npy");
    const cohort = simulateCohort(OPTIONS, simulationRandom(2));
    writeCohort(out, cohort, { format: "npy", plantedFile: true });
    expect(readdirSync(out).sort()).toEqual(["cohort.json", "connectomes.npy", "participants.tsv", "planted.tsv", "regions.tsv"]);
    const bytes = readFileSync(join(out, "connectomes.npy"));
    // Magic string and version byte from the NPY format description (NumPy documentation, numpy.lib.format).
    expect(Array.from(bytes.subarray(0, 6))).toEqual([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]);
    const array = parseNpy(new Uint8Array(bytes), "connectomes.npy");
    expect(array.shape).toEqual([5, 8, 8]);
    const expected = new Float64Array(5 * 64);
    cohort.matrices.forEach((matrix, k) => expected.set(matrix, k * 64));
    expect(Array.from(array.data)).toEqual(Array.from(expected));
  });

  it("writes no planted.tsv without an effect, or when plantedFile is false", () => {
    const first = join(scratchDir(), "none");
    writeCohort(first, simulateCohort({ ...OPTIONS, effect: null }, simulationRandom(3)), { format: "tsv", plantedFile: true });
    expect(existsSync(join(first, "planted.tsv"))).toBe(false);
    const second = join(scratchDir(), "off");
    writeCohort(second, simulateCohort(OPTIONS, simulationRandom(3)), { format: "tsv", plantedFile: false });
    expect(existsSync(join(second, "planted.tsv"))).toBe(false);
  });

  it("writes byte-identical files for the same seed and different ones for another seed", () => {
    const root = scratchDir();
    for (const [name, seed] of [
      ["a", 2026],
      ["b", 2026],
      ["c", 2027],
    ] as const) {
      writeCohort(join(root, name), simulateCohort(OPTIONS, simulationRandom(seed)), { format: "tsv", plantedFile: true });
    }
    expect(treeDigest(join(root, "b"))).toEqual(treeDigest(join(root, "a")));
    expect(treeDigest(join(root, "c"))["connectomes/sub-001.tsv"]).not.toBe(treeDigest(join(root, "a"))["connectomes/sub-001.tsv"]);
  });

  it("writes into an existing empty folder", () => {
    const out = join(scratchDir(), "empty");
    mkdirSync(out);
    writeCohort(out, simulateCohort(OPTIONS, simulationRandom(1)), { format: "tsv", plantedFile: true });
    expect(existsSync(join(out, "participants.tsv"))).toBe(true);
  });

  it("refuses a non-empty folder with an InputError naming it, and leaves it untouched", () => {
    const root = scratchDir();
    const out = join(root, "taken");
    mkdirSync(out);
    writeFileSync(join(out, "notes.txt"), "keep me");
    const cohort = simulateCohort(OPTIONS, simulationRandom(1));
    let caught: unknown;
    try {
      writeCohort(out, cohort, { format: "tsv", plantedFile: true });
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(InputError);
    expect((caught as InputError).location.file).toBe(out);
    expect((caught as InputError).format()).toContain(out);
    expect(readdirSync(out)).toEqual(["notes.txt"]);
    expect(readdirSync(root)).toEqual(["taken"]);
  });

  it("refuses a path that is a file", () => {
    const file = join(scratchDir(), "a-file");
    writeFileSync(file, "x");
    expect(() =>
      writeCohort(file, simulateCohort(OPTIONS, simulationRandom(1)), { format: "tsv", plantedFile: true }),
    ).toThrow(InputError);
  });

  it("with force, replaces the cohort files (stale ones included) and keeps everything else", () => {
    const out = join(scratchDir(), "again");
    writeCohort(out, simulateCohort({ ...OPTIONS, patients: 6 }, simulationRandom(1)), { format: "tsv", plantedFile: true });
    writeFileSync(join(out, "README.md"), "about this cohort");
    const smaller = simulateCohort({ ...OPTIONS, effect: null }, simulationRandom(5));
    writeCohort(out, smaller, { format: "tsv", plantedFile: true, force: true });
    expect(readdirSync(out).sort()).toEqual(["README.md", "cohort.json", "connectomes", "participants.tsv", "regions.tsv"]);
    expect(readdirSync(join(out, "connectomes"))).toHaveLength(5);
    expect(readFileSync(join(out, "README.md"), "utf8")).toBe("about this cohort");

    const fresh = join(scratchDir(), "fresh");
    writeCohort(fresh, smaller, { format: "tsv", plantedFile: true });
    const { ["README.md"]: _readme, ...replaced } = treeDigest(out);
    expect(replaced).toEqual(treeDigest(fresh));

    writeCohort(out, smaller, { format: "npy", plantedFile: true, force: true });
    expect(readdirSync(out).sort()).toEqual(["README.md", "cohort.json", "connectomes.npy", "participants.tsv", "regions.tsv"]);
  });

  it("with force, refuses a folder holding a user's own cohort files and changes nothing there", () => {
    const out = join(scratchDir(), "users-study");
    mkdirSync(join(out, "connectomes"), { recursive: true });
    writeFileSync(join(out, "participants.tsv"), "participant_id\tgroup\nreal-01\tpatient\n");
    writeFileSync(join(out, "connectomes", "real-01.tsv"), "1\t0.5\n0.5\t1\n");
    const before = treeDigest(out);
    let caught: unknown;
    try {
      writeCohort(out, simulateCohort(OPTIONS, simulationRandom(2)), { format: "tsv", plantedFile: true, force: true });
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(InputError);
    expect((caught as InputError).format()).toContain("participants.tsv");
    expect(treeDigest(out)).toEqual(before);
  });

  it("with force, refuses to overwrite a simulated file the user has edited since", () => {
    const out = join(scratchDir(), "edited");
    writeCohort(out, simulateCohort(OPTIONS, simulationRandom(1)), { format: "tsv", plantedFile: true });
    writeFileSync(join(out, "participants.tsv"), `${readFileSync(join(out, "participants.tsv"), "utf8")}# my notes\n`);
    const before = treeDigest(out);
    expect(() =>
      writeCohort(out, simulateCohort(OPTIONS, simulationRandom(3)), { format: "tsv", plantedFile: true, force: true }),
    ).toThrow(/did not write or that were changed since \(participants\.tsv\)/);
    expect(treeDigest(out)).toEqual(before);
  });
});
