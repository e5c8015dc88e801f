// Thread, shard and resume invariance of the permutation inference, through the real binary
// (node bin/plexus.js, which runs the compiled dist/: build it first with
// `npx tsc -p tsconfig.build.json`). Relabeling k is a function of (seed, k) alone (Winkler et
// al. 2014, NeuroImage 92:381, and the project's design), so the number of threads, a split into
// shards merged in any order, or an interruption and --resume must give byte-identical result
// tables. The reference for each comparison is the uninterrupted single-thread run of the same
// design (common practice for reproducibility tests; no published source).
import { spawn, spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import { cpSync, existsSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEFAULT_CHUNK_SIZE, runAnalysis } from "../../src/run/runAnalysis.js";
import { runSimulation } from "../../src/simulate/runSimulation.js";
import { engineChunkSize } from "../../src/run/permutationInference.js";
import { scratchFolder } from "../unit/permute/cohortFiles.js";

/** The checkpoint file of the first chunk of design.yaml's 600 relabelings (chunks of 75: at least eight per run). */
const FIRST_CHUNK = `patient_gt_control.1-${engineChunkSize(600, { threads: 1, chunkSize: DEFAULT_CHUNK_SIZE, checkpoint: true }) + 1}.json`;

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), "../..");
const BIN = join(ROOT, "bin", "plexus.js");
const CONTRASTS = ["patient_gt_control", "age"];
const TABLES = ["null.tsv", "edges.tsv", "components.tsv"];

const scratch = scratchFolder("permutation-invariance");
afterAll(() => scratch.remove());
const at = (...parts: string[]) => join(scratch.dir, ...parts);

/** Runs the real binary in the scratch folder; returns the exit code and both streams. */
function plexus(...args: string[]): { code: number; stdout: string; stderr: string } {
  const result = spawnSync(process.execPath, [BIN, ...args], { cwd: scratch.dir, encoding: "utf8" });
  return { code: result.status ?? -1, stdout: result.stdout, stderr: result.stderr };
}

function expectOk(result: { code: number; stderr: string }, what: string): void {
  if (result.code !== 0) throw new Error(`${what} exited with ${result.code}:\n${result.stderr}`);
}

/** summary.json without the command line (which differs between the runs compared). */
function summaryOf(folder: string): unknown {
  const summary = JSON.parse(readFileSync(join(folder, "summary.json"), "utf8"));
  delete summary.command;
  return summary;
}

/** The result tables of a folder must be byte-identical to the reference folder's. */
function expectSameResults(folder: string, reference: string, what: string): void {
  for (const contrast of CONTRASTS) {
    for (const table of TABLES) {
      const actual = readFileSync(join(folder, contrast, table));
      const expected = readFileSync(join(reference, contrast, table));
      if (!actual.equals(expected)) {
        const digest = (b: Buffer) => createHash("sha256").update(b).digest("hex").slice(0, 16);
        throw new Error(`${what}: ${contrast}/${table} differs from the reference (sha256 ${digest(actual)} vs ${digest(expected)})`);
      }
    }
  }
  expect(summaryOf(folder), `${what}: summary.json (command line aside)`).toEqual(summaryOf(reference));
}

function design(name: string, permutations: number, seed: number): string {
  const file = at(name);
  writeFileSync(
    file,
    `subjects: cohort/participants.tsv
connectomes: cohort/connectomes/{participant_id}.tsv
regions: cohort/regions.tsv
model: group + age
levels:
  group: [control, patient]
contrasts:
  patient_gt_control: group[patient] - group[control]
  age: age
transform: fisher-z
inference:
  method: max-t
  threshold: 2.5
  tail: both
  permutations: ${permutations}
  seed: ${seed}
`,
  );
  return file;
}

beforeAll(() => {
  if (!existsSync(join(ROOT, "dist", "cli", "main.js")) || !existsSync(join(ROOT, "dist", "permute", "nullWorker.js"))) {
    throw new Error("dist/ is missing: run `npx tsc -p tsconfig.build.json` before these tests");
  }
  // An invented cohort: 24 regions, 14 + 14 subjects, a weak planted effect, age and site effects.
  runSimulation({
    out: at("cohort"),
    seed: 7,
    simulation: { regions: 24, patients: 14, controls: 14, kind: "correlation", effect: { regions: 5, size: 1 }, covariates: true },
    format: "tsv",
    force: false,
  });
  design("design.yaml", 600, 3);
  design("other-seed.yaml", 600, 4);
  expectOk(plexus("run", "design.yaml", "--out", "reference", "--threads", "1", "-q"), "reference run");
});

describe("threads: --threads 1 and --threads 2 write byte-identical results (600 relabelings)", () => {
  it("null.tsv, edges.tsv (with p_fwe) and components.tsv of both contrasts", () => {
    expectOk(plexus("run", "design.yaml", "--out", "two-threads", "--threads", "2", "-q"), "--threads 2");
    expectSameResults(at("two-threads"), at("reference"), "--threads 2");
    const summary = JSON.parse(readFileSync(at("reference", "summary.json"), "utf8"));
    expect(summary.contrasts.map((c: { mode: string; permutations: number }) => [c.mode, c.permutations])).toEqual([
      ["monte-carlo", 600],
      ["monte-carlo", 600],
    ]);
    expect(readFileSync(at("reference", "patient_gt_control", "edges.tsv"), "utf8").split("\n")[0]).toContain("p_fwe");
  });
});

describe("shards: 3 shards merged in shuffled order equal one run", () => {
  beforeAll(() => {
    for (const k of [1, 2, 3]) expectOk(plexus("run", "design.yaml", "--out", `shard-${k}`, "--shard", `${k}/3`, "-q"), `shard ${k}/3`);
    expectOk(plexus("run", "other-seed.yaml", "--out", "other-seed-shard-2", "--shard", "2/3", "-q"), "shard 2/3 of seed 4");
  });

  it("merge shard-2 shard-3 shard-1 is byte-identical to the single run", () => {
    expectOk(plexus("merge", "shard-2", "shard-3", "shard-1", "--out", "merged", "-q"), "merge");
    expectSameResults(at("merged"), at("reference"), "merged shards");
  });

  it("a missing shard: exit 2, naming it", () => {
    const result = plexus("merge", "shard-3", "shard-1", "--out", "merged-missing");
    expect(result.code, result.stderr).toBe(2);
    expect(result.stderr).toMatch(/shard 2\/3 missing/);
    expect(result.stderr).not.toMatch(/\n\s+at /); // a message, no stack trace
    expect(existsSync(at("merged-missing"))).toBe(false);
  });

  it("a repeated shard: exit 2, saying it is given twice", () => {
    const result = plexus("merge", "shard-1", "shard-2", "shard-2", "shard-3", "--out", "merged-twice");
    expect(result.code, result.stderr).toBe(2);
    expect(result.stderr).toMatch(/shard 2\/3 is given twice/);
    expect(result.stderr).not.toMatch(/\n\s+at /);
  });

  it("a shard from another seed: exit 2, naming that shard and the mismatch", () => {
    const result = plexus("merge", "shard-1", "other-seed-shard-2", "shard-3", "--out", "merged-other-seed");
    expect(result.code, result.stderr).toBe(2);
    expect(result.stderr).toContain("other-seed-shard-2");
    expect(result.stderr).toMatch(/different design, inputs, seed or options/);
    expect(result.stderr).not.toMatch(/\n\s+at /);
  });
});

describe("resume: an interrupted run continued with --resume equals an uninterrupted run", () => {
  const checkpointOf = (out: string) => at(`.${out}.plexus-checkpoint`);
  const chunkFiles = (out: string) =>
    existsSync(checkpointOf(out)) ? readdirSync(checkpointOf(out)).filter((f) => /^[\w.-]+\.\d+-\d+\.json$/.test(f)) : [];

  it("killed with SIGKILL after its first checkpoint chunk (5000 relabelings, threads 1), then --resume --threads 2", async () => {
    design("long.yaml", 5000, 9);
    const child = spawn(process.execPath, [BIN, "run", "long.yaml", "--out", "killed", "--threads", "1", "-q"], { cwd: scratch.dir, stdio: "ignore" });
    const exited = new Promise<number | null>((done) => child.on("exit", (code) => done(code)));
    let killedEarly = false;
    await new Promise<void>((done) => {
      const poll = setInterval(() => {
        if (chunkFiles("killed").length > 0 && !killedEarly) {
          killedEarly = child.kill("SIGKILL");
          clearInterval(poll);
          done();
        }
      }, 2);
      child.on("exit", () => {
        clearInterval(poll);
        done();
      });
    });
    await exited;
    // If the machine was so slow that the child finished first, the test cannot show anything.
    expect(killedEarly, "the run finished before it could be killed").toBe(true);
    expect(existsSync(at("killed", "summary.json"))).toBe(false);
    const saved = chunkFiles("killed");
    expect(saved.length).toBeGreaterThan(0);
    expect(saved.length).toBeLessThan((2 * 5000) / DEFAULT_CHUNK_SIZE); // 2 contrasts × 5000 relabelings in chunks: not all done
    expectOk(plexus("run", "long.yaml", "--out", "killed", "--resume", "--threads", "2", "-q"), "--resume");
    expect(existsSync(checkpointOf("killed")), "the checkpoint is removed after a finished run").toBe(false);
    expectOk(plexus("run", "long.yaml", "--out", "long-reference", "--threads", "1", "-q"), "uninterrupted run");
    for (const contrast of CONTRASTS) {
      for (const table of TABLES) {
        expect(readFileSync(at("killed", contrast, table), "utf8"), `${contrast}/${table}`).toBe(
          readFileSync(at("long-reference", contrast, table), "utf8"),
        );
      }
    }
  });

  describe("with a checkpoint left by a run whose progress callback throws after the first chunk", () => {
    beforeAll(async () => {
      let advanced = 0;
      const failing = {
        start() {},
        advance() {
          if (++advanced === 1) throw new Error("interrupted after the first chunk");
        },
        finish() {},
      };
      await expect(
        runAnalysis({ designFile: at("design.yaml"), out: at("interrupted"), threads: 1 }, { info() {}, warn() {} }, failing),
      ).rejects.toThrow("interrupted after the first chunk");
      expect(chunkFiles("interrupted")).toEqual([FIRST_CHUNK]);
      cpSync(checkpointOf("interrupted"), at("saved-checkpoint"), { recursive: true });
    });

    const restore = (out: string) => cpSync(at("saved-checkpoint"), checkpointOf(out), { recursive: true });

    it("without --resume: exit 2 with the hint to add --resume (or --force)", () => {
      restore("interrupted");
      const result = plexus("run", "design.yaml", "--out", "interrupted", "-q");
      expect(result.code, result.stderr).toBe(2);
      expect(result.stderr).toContain("--resume");
      expect(result.stderr).toContain(checkpointOf("interrupted"));
      expect(result.stderr).not.toMatch(/\n\s+at /);
      expect(chunkFiles("interrupted").length).toBe(1); // the checkpoint is left as it was
    });

    it("a tampered chunk: exit 2 naming the file", () => {
      cpSync(at("saved-checkpoint"), checkpointOf("tampered"), { recursive: true });
      const chunk = join(checkpointOf("tampered"), FIRST_CHUNK);
      const record = JSON.parse(readFileSync(chunk, "utf8"));
      record.rows = record.rows.replace(/"maxExtent":\[(\d+)/, (_: string, n: string) => `"maxExtent":[${Number(n) + 1}`);
      writeFileSync(chunk, JSON.stringify(record));
      const result = plexus("run", "design.yaml", "--out", "tampered", "--resume", "-q");
      expect(result.code, result.stderr).toBe(2);
      expect(result.stderr).toContain(chunk);
      expect(result.stderr).toMatch(/damaged/);
      expect(result.stderr).not.toMatch(/\n\s+at /);
      expect(existsSync(at("tampered", "summary.json"))).toBe(false);
    });

    it("--resume (threads 2) gives byte-identical results to the uninterrupted run, and really reuses the chunk", () => {
      restore("interrupted");
      expectOk(plexus("run", "design.yaml", "--out", "interrupted", "--resume", "--threads", "2", "-q"), "--resume");
      expectSameResults(at("interrupted"), at("reference"), "--resume");
      // A chunk with a valid checksum but changed rows shows up in null.tsv: the chunk is read, not recomputed.
      cpSync(at("saved-checkpoint"), checkpointOf("forged"), { recursive: true });
      const chunk = join(checkpointOf("forged"), FIRST_CHUNK);
      const record = JSON.parse(readFileSync(chunk, "utf8"));
      const rows = JSON.parse(record.rows);
      rows.maxExtent[0] = 999;
      record.rows = JSON.stringify(rows);
      record.sha256 = createHash("sha256").update(record.rows).digest("hex");
      writeFileSync(chunk, JSON.stringify(record));
      expectOk(plexus("run", "design.yaml", "--out", "forged", "--resume", "-q"), "--resume with a forged chunk");
      const firstRow = readFileSync(at("forged", "patient_gt_control", "null.tsv"), "utf8").split("\n")[1].split("\t");
      expect(firstRow[0]).toBe("1");
      expect(firstRow[1]).toBe("999");
    });
  });
});
