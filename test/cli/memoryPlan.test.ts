// The memory plan and the time estimate (src/run/memoryPlan.ts, run/runEstimate.ts, cli/resourceLines.ts).
// A cohort that would not fit is refused with exit 2 before its matrices are loaded: no output folder is
// left, no input changes. The sizes `plexus check` prints are checked against S·E·8 bytes computed here from
// the cohort's own shape (participants.tsv rows, regions.tsv rows); the estimates' accuracy against measured
// runs is `npm run bench`'s (never a timed test).
import { createHash } from "node:crypto";
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { groupDesignLines, runCli, writeDesignFile, writeSimulatedCohort } from "../unit/strength/strengthTestFiles.js";

let root = "";
let design = "";
const SUBJECTS = 14;
const REGIONS = 9;

function digests(folder: string): Map<string, string> {
  const out = new Map<string, string>();
  for (const entry of readdirSync(folder, { recursive: true, withFileTypes: true })) {
    if (!entry.isFile()) continue;
    const file = path.join(entry.parentPath, entry.name);
    out.set(file, createHash("sha256").update(readFileSync(file)).digest("hex"));
  }
  return out;
}

beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-memory-"));
  writeSimulatedCohort(root, { regions: REGIONS, patients: 7, controls: 7, kind: "correlation", effect: { regions: 3, size: 1 }, covariates: true }, 5);
  design = writeDesignFile(
    path.join(root, "design.yaml"),
    groupDesignLines({ cohort: "", model: "group + age", contrasts: ["up: group[patient] - group[control]"], inference: ["method: components", "threshold: 2", "permutations: 200", "seed: 1"] }),
  );
});
afterAll(() => rmSync(root, { recursive: true, force: true }));

describe("a cohort that does not fit in memory", () => {
  it("is refused by run with exit 2 before any output is made, naming the sizes and what to request per shard", async () => {
    const before = digests(root);
    const out = path.join(root, "results");
    const result = await runCli(["run", design, "--out", out, "--memory", "0.1"]);
    expect(result.code).toBe(2);
    expect(result.stderr).toContain("this cohort does not fit in memory");
    expect(result.stderr).toContain(`${SUBJECTS} participants × ${(REGIONS * (REGIONS - 1)) / 2} edges`);
    expect(result.stderr).toContain("--memory gives 100 MB");
    expect(result.stderr).toMatch(/request \d+ GB per task/);
    expect(result.stderr).not.toMatch(/\n\s+at /); // no stack
    expect(existsSync(out)).toBe(false);
    expect(digests(root)).toEqual(before);
  });

  it("is refused by check too; a malformed --memory is a located error", async () => {
    const refused = await runCli(["check", design, "--memory", "0.2"]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain("does not fit in memory");
    const malformed = await runCli(["check", design, "--memory", "lots"]);
    expect(malformed.code).toBe(2);
    expect(malformed.stderr).toContain("--memory takes the gigabytes");
  });
});

describe("plexus check's resource lines", () => {
  it("prints the edge data's size (S·E·8 bytes), the peak, the limit and a time estimate per contrast", async () => {
    const result = await runCli(["check", design, "--memory", "16", "--threads", "2"]);
    expect(result.code, result.stderr).toBe(0);
    const edges = (REGIONS * (REGIONS - 1)) / 2;
    const bytes = SUBJECTS * edges * 8; // 14 × 36 × 8 = 4,032 bytes
    const memory = result.stdout.split("\n").find((line) => line.startsWith("memory "));
    expect(memory).toBe(
      `memory      edge data ${Math.round(bytes / 1e3)} kB (${SUBJECTS} participants × ${edges} edges in double precision); peak about 460 MB; --memory gives 16.00 GB`,
    );
    const time = result.stdout.split("\n").find((line) => line.startsWith("time "));
    expect(time).toMatch(/^time {8}about .+ on 2 threads of this machine: inputs read in .+ \(this check\), fit .+, up: 200 relabelings × [\d.]+ (µs|ms|s) on one thread, results .+ \(calibrated on invented data of this design's shape\)$/);
  });

  it("plans one shard of the permutations: its share of the relabelings and the memory to request per task", async () => {
    const result = await runCli(["check", design, "--shard", "2/4", "--threads", "1"]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stdout).toMatch(/request 1 GB per shard task \(each holds all the data\)/);
    // shard 2 of 4 of relabelings 1..200: floor(2·200/4) − floor(200/4) = 50
    expect(result.stdout).toMatch(/for shard 2\/4 on 1 thread of this machine: .*up: 50 relabelings/);
  });
});
