// `--permutations N --seed N` on run, check, strength (and through shard.json, merge): a trial run of a
// design without editing it. The anchor: a run of design A (permutations 500, seed 3) with
// `--permutations 200 --seed 7` must give byte for byte the null, edges and components of design B,
// which says permutations 200 and seed 7 in the file — so the override runs exactly the engine whose
// statistics the other tests check against R, ml-matrix and exact enumeration. The record of the
// override (summary.json, the warning, methods.md, report.html, shard.json) is checked as text.
//
// `plexus check`'s plan lines are checked against counts computed here from participants.tsv by plain
// combinatorics: with `model: group` and `blocks: site` (within), the distinct relabelings are the
// product over sites of C(n_site, patients_site); with whole blocks of equal size, the number of
// distinct arrangements of the blocks' group patterns; for a one-sample design on n participants, 2^n sign flips.
import { existsSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { groupDesignLines, readRows, runCli, writeDesignFile, writeSimulatedCohort } from "../unit/strength/strengthTestFiles.js";
import { Checkpoint } from "../../src/output/checkpoint.js";
import { hashInputs } from "../../src/output/provenance.js";
import { prepareAnalysis } from "../../src/run/prepareAnalysis.js";
import { runFingerprint } from "../../src/run/runFingerprint.js";

let root = "";
let designA = "";
let designB = "";
const CONTRASTS = ["up: group[patient] - group[control]", "down: group[control] - group[patient]"];
const out = (name: string) => path.join(root, name);
const read = (...parts: string[]) => readFileSync(path.join(root, ...parts), "utf8");
const summaryOf = (folder: string) => JSON.parse(read(folder, "summary.json"));

function design(name: string, inference: string[], model = "group + age"): string {
  return writeDesignFile(out(name), groupDesignLines({ cohort: "", regions: true, model, contrasts: CONTRASTS, inference }));
}

beforeAll(async () => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-overrides-"));
  writeSimulatedCohort(root, { regions: 7, patients: 6, controls: 6, kind: "correlation", effect: { regions: 3, size: 2 }, covariates: true }, 11);
  designA = design("a.yaml", ["method: components", "threshold: 2", "permutations: 500", "seed: 3"]);
  designB = design("b.yaml", ["method: components", "threshold: 2", "permutations: 200", "seed: 7"]);
  const overridden = await runCli(["run", designA, "--out", out("a-overridden"), "--permutations", "200", "--seed", "7", "--threads", "1"]);
  expect(overridden.code, overridden.stderr).toBe(0);
  const reference = await runCli(["run", designB, "--out", out("b"), "--threads", "1", "--quiet"]);
  expect(reference.code, reference.stderr).toBe(0);
});

afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

describe("run --permutations --seed", () => {
  it("gives byte for byte the null, edges and components of a design that says permutations 200 and seed 7", () => {
    for (const contrast of ["up", "down"]) {
      for (const file of ["null.tsv", "edges.tsv", "components.tsv"]) {
        expect(read("a-overridden", contrast, file), `${contrast}/${file}`).toBe(read("b", contrast, file));
      }
    }
    const a = summaryOf("a-overridden");
    const b = summaryOf("b");
    expect(a.contrasts).toEqual(b.contrasts);
  });

  it("records the override in summary.json with the design's values; none in a run of the design as written", () => {
    const { inference } = summaryOf("a-overridden").options;
    expect(inference.permutations).toBe(200);
    expect(inference.seed).toBe(7);
    expect(inference.command_line_overrides).toEqual({ permutations: 200, seed: 7, design: { permutations: 500, seed: 3 } });
    expect(summaryOf("b").options.inference.command_line_overrides).toBeNull();
    expect(summaryOf("a-overridden").warnings.join("\n")).toContain("the command line overrides the inference of");
  });

  it("warns on stderr that the design says otherwise", async () => {
    const result = await runCli(["run", designA, "--out", out("a-seed-only"), "--seed", "8", "--threads", "1", "--quiet"]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stderr).toContain("plexus: warning: the command line overrides the inference of");
    expect(result.stderr).toContain("seed 8 (the design says 3)");
    expect(result.stderr).not.toContain("permutations (the design says");
    expect(summaryOf("a-seed-only").options.inference.command_line_overrides).toEqual({ seed: 8, design: { seed: 3 } });
    expect(read("a-seed-only", "methods.md")).toContain("The random seed (8) was given on the command line in place of the design file's (3).");
  });

  it("says so in one sentence of methods.md; nothing of the kind without the flags", () => {
    expect(read("a-overridden", "methods.md")).toContain(
      "The number of relabelings asked for (200) and the random seed (7) were given on the command line in place of the design file's (500 and 3).",
    );
    expect(read("b", "methods.md")).not.toContain("command line");
  });

  it("adds a row to the report's run summary", () => {
    const html = read("a-overridden", "report.html");
    expect(html).toContain("<dt>Command-line overrides</dt><dd>--permutations 200 (design: 500), --seed 7 (design: 3): the design file says otherwise</dd>");
    expect(read("b", "report.html")).not.toContain("Command-line overrides");
  });

  it("a flag equal to the design's value changes nothing and is not recorded", async () => {
    const result = await runCli(["run", designB, "--out", out("b-same"), "--permutations", "200", "--seed", "7", "--threads", "1", "--quiet"]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stderr).toBe("");
    expect(summaryOf("b-same").options.inference.command_line_overrides).toBeNull();
    expect(read("b-same", "up", "null.tsv")).toBe(read("b", "up", "null.tsv"));
  });

  it.each([
    [["--permutations", "0"], "--permutations takes a whole number from 1 to 10,000,000, found '0'"],
    [["--permutations", "12.5"], "--permutations takes a whole number"],
    [["--permutations", "lots"], "--permutations takes a whole number"],
    [["--seed", "-1"], "--seed takes a whole number ≥ 0"],
    [["--seed", "99999999999999999999"], "--seed takes a whole number ≥ 0"],
    [["--permutations", "10"], "key '--permutations': with 10 permutations no p-value can fall below"],
  ])("refuses %j with exit 2 naming the flag", async (flags, message) => {
    const result = await runCli(["run", designA, "--out", out(`bad-${flags.join("")}`), ...flags, "--threads", "1", "--quiet"]);
    expect(result.code, result.stderr).toBe(2);
    expect(result.stderr).toContain(message);
    expect(result.stderr).not.toMatch(/\n\s+at /);
    expect(existsSync(out(`bad-${flags.join("")}`))).toBe(false);
  });
});

describe("checkpoints with --permutations --seed", () => {
  it("a checkpoint made with the flags cannot be resumed without them (exit 2)", async () => {
    const target = out("resumed");
    const prepared = prepareAnalysis(designA, { overrides: { permutations: 200, seed: 7 } });
    const checkpoint = Checkpoint.create(target, runFingerprint(prepared, hashInputs(prepared.inputs)));
    const one = new Float64Array([1]);
    checkpoint.save("up", { from: 1, to: 2, maxExtent: one, maxMass: one, maxStatistic: one, extraNames: [], extra: [] });
    const without = await runCli(["run", designA, "--out", target, "--resume", "--threads", "1", "--quiet"]);
    expect(without.code).toBe(2);
    expect(without.stderr).toContain("the checkpoint was made for a different design, inputs, seed or options");
    const otherSeed = await runCli(["run", designA, "--out", target, "--resume", "--permutations", "200", "--seed", "8", "--threads", "1", "--quiet"]);
    expect(otherSeed.code).toBe(2);
    expect(Checkpoint.holdsChunks(target)).toBe(true);
  });
});

describe("shards with --permutations --seed", () => {
  it("shard.json records the overrides; merge applies them and gives the design-B null byte for byte", async () => {
    for (const k of [1, 2]) {
      const result = await runCli(["run", designA, "--out", out(`shard-${k}`), "--shard", `${k}/2`, "--permutations", "200", "--seed", "7", "--threads", "1", "--quiet"]);
      expect(result.code, result.stderr).toBe(0);
      expect(JSON.parse(read(`shard-${k}`, "shard.json")).command_line_overrides).toEqual({ permutations: 200, seed: 7 });
    }
    const merged = await runCli(["merge", out("shard-2"), out("shard-1"), "--out", out("merged"), "--quiet"]);
    expect(merged.code, merged.stderr).toBe(0);
    for (const contrast of ["up", "down"]) expect(read("merged", contrast, "null.tsv")).toBe(read("b", contrast, "null.tsv"));
    expect(summaryOf("merged").options.inference.command_line_overrides).toEqual({ permutations: 200, seed: 7, design: { permutations: 500, seed: 3 } });
    expect(read("merged", "methods.md")).toContain("were given on the command line in place of the design file's (500 and 3).");
  });

  it("merge refuses shards run with different overrides (exit 2), naming the flags", async () => {
    const other = await runCli(["run", designA, "--out", out("shard-2-seed-8"), "--shard", "2/2", "--permutations", "200", "--seed", "8", "--threads", "1", "--quiet"]);
    expect(other.code, other.stderr).toBe(0);
    const merged = await runCli(["merge", out("shard-1"), out("shard-2-seed-8"), "--out", out("merged-mixed"), "--quiet"]);
    expect(merged.code).toBe(2);
    expect(merged.stderr).toContain("this shard ran with --permutations 200 --seed 8 on the command line, the first shard with --permutations 200 --seed 7");
    const plain = await runCli(["run", designA, "--out", out("shard-2-plain"), "--shard", "2/2", "--threads", "1", "--quiet"]);
    expect(plain.code, plain.stderr).toBe(0);
    const mixed = await runCli(["merge", out("shard-1"), out("shard-2-plain"), "--out", out("merged-plain"), "--quiet"]);
    expect(mixed.code).toBe(2);
    expect(mixed.stderr).toContain("this shard ran with no --permutations or --seed on the command line");
    expect(existsSync(out("merged-mixed"))).toBe(false);
    expect(existsSync(out("merged-plain"))).toBe(false);
  });
});

describe("check prints the inference that would run", () => {
  /** participants.tsv rows as objects. */
  function participants(): Record<string, string>[] {
    const [header, ...rows] = readRows(path.join(root, "participants.tsv"));
    return rows.map((row) => Object.fromEntries(header.map((name, k) => [name, row[k]])));
  }
  const binomial = (n: number, k: number) => {
    let value = 1;
    for (let j = 1; j <= k; j++) value = (value * (n - k + j)) / j;
    return Math.round(value);
  };

  it("Monte Carlo plan with the command line's count and seed, each marked with the design's value", async () => {
    // Distinct permutations of the design rows (group, age): 12! over the factorial of each repeated row's count.
    const rows = participants().map((r) => `${r.group}|${r.age}`);
    const factorial = (n: number): number => (n <= 1 ? 1 : n * factorial(n - 1));
    const distinct = [...new Set(rows)].reduce((value, row) => value / factorial(rows.filter((r) => r === row).length), factorial(rows.length));
    const result = await runCli(["check", designA, "--permutations", "200", "--seed", "7"]);
    expect(result.code, result.stderr).toBe(0);
    const lines = result.stdout.split("\n");
    const at = lines.indexOf("plan        up (t contrast)");
    expect(at).toBeGreaterThan(0);
    expect(lines.slice(at, at + 7)).toEqual([
      "plan        up (t contrast)",
      "  method       components: connected subnetworks by extent, family-wise p from the largest extent per relabeling; alpha 0.05",
      "  threshold    t > 2",
      `  relabelings  200 drawn at random (Monte Carlo) of ${distinct.toLocaleString("en-US")} distinct (command line; the design says 500)`,
      "  seed         7 (command line; the design says 3)",
      "  scheme       permutation: Freedman–Lane permutation of the reduced-model residuals",
      "  blocks       none (one block: every participant exchangeable)",
    ]);
    expect(lines).toContain("plan        down (t contrast)");
    expect(result.stderr).toContain("the command line overrides the inference of");
  });

  it("exact enumeration within blocks: all M relabelings, M = ∏ over sites of C(n_site, patients_site)", async () => {
    const file = design("blocks-within.yaml", ["method: max-t", "threshold: [2, 2.5]", "tail: both", "permutations: 100000", "seed: 4", "blocks: site"], "group");
    const rows = participants();
    const sites = [...new Set(rows.map((r) => r.site))];
    const expected = sites
      .map((site) => rows.filter((r) => r.site === site))
      .reduce((product, members) => product * binomial(members.length, members.filter((r) => r.group === "patient").length), 1);
    const result = await runCli(["check", file]);
    expect(result.code, result.stderr).toBe(0);
    const lines = result.stdout.split("\n");
    const at = lines.indexOf("plan        up (t contrast)");
    expect(lines.slice(at + 1, at + 7)).toEqual([
      "  method       max-t: each edge against the largest statistic per relabeling (components by extent as well); alpha 0.05",
      "  threshold    |t| > 2; sweep also at |t| > 2.5",
      `  relabelings  all ${expected.toLocaleString("en-US")} distinct relabelings, enumerated exactly (no more than the 100,000 permutations asked for)`,
      "  seed         4 (not used: exact enumeration draws nothing at random)",
      "  scheme       permutation: Freedman–Lane permutation of the reduced-model residuals",
      `  blocks       site: ${sites.length} blocks, relabelings within each block`,
    ]);
  });

  it("whole blocks: the count of distinct arrangements of the blocks' group patterns", async () => {
    const file = design("blocks-whole.yaml", ["method: components", "permutations: 5000", "blocks: site", "block_permutation: whole"], "group");
    const rows = participants();
    const sites = [...new Set(rows.map((r) => r.site))];
    // Each block's pattern is its members' group labels in table order; blocks with the same pattern are interchangeable.
    const patterns = sites.map((site) => rows.filter((r) => r.site === site).map((r) => r.group).join(","));
    const tally = [...new Set(patterns)].map((p) => patterns.filter((q) => q === p).length);
    const factorial = (n: number): number => (n <= 1 ? 1 : n * factorial(n - 1));
    const expected = tally.reduce((value, k) => value / factorial(k), factorial(sites.length));
    expect(expected).toBeGreaterThan(1); // the simulated sites differ in their order of patients and controls
    const result = await runCli(["check", file]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stdout).toContain(`  relabelings  all ${expected.toLocaleString("en-US")} distinct relabelings, enumerated exactly`);
    expect(result.stdout).toContain(`  blocks       site: ${sites.length} blocks, whole blocks exchanged as units`);
  });

  it("one-sample design: 2^n sign flips, the scheme named with its reason; fdr: no relabelings", async () => {
    const n = participants().length;
    const lines = (method: string) => [
      "subjects: participants.tsv",
      "connectomes: connectomes/{participant_id}.tsv",
      "model: 1",
      "contrasts:",
      "  mean_up: [1]",
      "transform: fisher-z",
      "inference:",
      `  method: ${method}`,
      "  permutations: 100000",
      "  threshold: 2.5",
    ];
    const flips = await runCli(["check", writeDesignFile(out("one-sample.yaml"), lines("components")), "--seed", "12"]);
    expect(flips.code, flips.stderr).toBe(0);
    expect(flips.stdout).toContain(`  relabelings  all ${(2 ** n).toLocaleString("en-US")} distinct relabelings, enumerated exactly (no more than the 100,000 permutations asked for)`);
    expect(flips.stdout).toContain("  seed         12 (not used: exact enumeration draws nothing at random) (command line; the design says 1)");
    expect(flips.stdout).toContain("  scheme       sign-flip: the contrast tests the constant term (one-sample design), so signs are flipped");
    const fdr = await runCli(["check", writeDesignFile(out("one-sample-fdr.yaml"), lines("fdr")), "--seed", "3"]);
    expect(fdr.code, fdr.stderr).toBe(0);
    expect(fdr.stderr).toContain("--seed 3 changes nothing here: the inference of");
    expect(fdr.stderr).toContain("(method fdr) draws no relabelings");
    expect(fdr.stdout).toContain("plan        mean_up (t contrast)\n  method       fdr: false discovery rate over edges (Benjamini–Hochberg) on the t distribution's p-values; alpha 0.05\n  relabelings  none (fdr draws no relabelings)\n");
  });
});

describe("the worked design designs/clinic-within-site.yaml", () => {
  it("check prints its plan: Monte Carlo within the demo cohort's 3 sites, seed from the command line", async () => {
    const file = path.resolve(__dirname, "..", "..", "designs", "clinic-within-site.yaml");
    const result = await runCli(["check", file, "--seed", "7"]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stdout).toContain(
      [
        "plan        patient_gt_control (t contrast)",
        "  method       components: connected subnetworks by extent, family-wise p from the largest extent per relabeling; alpha 0.05",
        "  threshold    t > 3",
        "  relabelings  5,000 drawn at random (Monte Carlo) of more than 2^53 distinct",
        "  seed         7 (command line; the design says 1)",
        "  scheme       permutation: Freedman–Lane permutation of the reduced-model residuals",
        "  blocks       site: 3 blocks, relabelings within each block",
      ].join("\n"),
    );
  });
});

describe("strength --permutations --seed", () => {
  it("records the override in summary.json and results.md, with the warning", async () => {
    const result = await runCli(["strength", designA, "--out", out("strength"), "--permutations", "99", "--seed", "5", "--threads", "1", "--quiet"]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stderr).toContain("99 permutations (the design says 500) and seed 5 (the design says 3)");
    const summary = summaryOf("strength");
    expect(summary.options.inference.command_line_overrides).toEqual({ permutations: 99, seed: 5, design: { permutations: 500, seed: 3 } });
    expect(summary.contrasts[0].permutations).toBe(99);
    expect(summary.contrasts[0].seed).toBe(5);
    expect(read("strength", "results.md")).toContain("were given on the command line in place of the design file's (500 and 3).");
  });
});

describe("extract writes every participants column once", () => {
  it("the model columns and the blocks column first, the others after the edge sets, none twice", async () => {
    const file = design("extract.yaml", ["method: components", "permutations: 100", "blocks: site"], "group + age");
    const target = out("extracted.tsv");
    const result = await runCli(["extract", file, "--pairs", writeEdgeList(), "--out", target, "--quiet"]);
    expect(result.code, result.stderr).toBe(0);
    const [header, ...rows] = readRows(target);
    expect(header).toEqual(["participant_id", "group", "age", "site", "pairs_edges", "sex", "recall_score"]);
    const table = readRows(path.join(root, "participants.tsv"));
    const column = (name: string) => table.slice(1).map((r) => r[table[0].indexOf(name)]);
    for (const name of ["group", "age", "site", "sex", "recall_score"]) {
      expect(rows.map((r) => r[header.indexOf(name)]), name).toEqual(column(name));
    }
  });
});

function writeEdgeList(): string {
  const regions = readRows(path.join(root, "regions.tsv"));
  const label = regions[0].indexOf("label");
  return writeDesignFile(out("edges.tsv"), ["region_a\tregion_b", `${regions[1][label]}\t${regions[2][label]}`]);
}
