// Never lose a user's data, never give a wrong answer with exit 0: what plexus may replace
// (--force replaces only what it wrote, recorded in plexus-files.json), outputs that are, hold or
// lie among the inputs (refused before any matrix is read), contrast names that collide with
// what plexus writes, locks on an output, and checkpoint advice that cannot send the user in a
// circle. In-process through `main(argv, sink)` on a small invented cohort; no statistics here.
import { spawnSync } from "node:child_process";
import { cpSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { OutputLock } from "../../src/output/outputLock.js";
import { RESERVED_TOP_LEVEL_NAMES } from "../../src/output/reservedNames.js";
import { WRITTEN_RECORD } from "../../src/output/writtenRecord.js";
import { Checkpoint } from "../../src/output/checkpoint.js";
import { runCli, writeSimulatedCohort } from "../unit/strength/strengthTestFiles.js";

let root = "";
let template = "";

const DESIGN = [
  "subjects: participants.tsv",
  "connectomes: connectomes/{participant_id}.tsv",
  "regions: regions.tsv",
  "model: group + age",
  "levels:",
  "  group: [control, patient]",
  "contrasts:",
  "  patient_gt_control: group[patient] - group[control]",
  "transform: fisher-z",
  "inference:",
  "  method: components",
  "  threshold: 2",
  "  permutations: 40",
  "  seed: 3",
];

beforeAll(() => {
  root = mkdtempSync(path.join(os.tmpdir(), "plexus-safety-"));
  template = path.join(root, "template");
  writeSimulatedCohort(template, { regions: 8, patients: 8, controls: 8, kind: "correlation", effect: null, covariates: true }, 11);
});
afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

/** A study folder laid out as users do: design.yaml, participants.tsv, regions.tsv, connectomes/*.tsv. */
function study(name: string, lines: string[] = DESIGN): { dir: string; design: string } {
  const dir = path.join(root, name);
  cpSync(template, dir, { recursive: true });
  const design = path.join(dir, "design.yaml");
  writeFileSync(design, `${lines.join("\n")}\n`);
  return { dir, design };
}

/** Every file below a folder with its bytes (links are listed, not followed). */
function snapshot(folder: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const entry of readdirSync(folder, { recursive: true, withFileTypes: true })) {
    const full = path.join(entry.parentPath, entry.name);
    if (entry.isFile()) out[path.relative(folder, full)] = readFileSync(full, "latin1");
    else if (entry.isSymbolicLink()) out[path.relative(folder, full)] = "(link)";
  }
  return out;
}

function expectUserError(result: { code: number; stderr: string }, ...parts: (string | RegExp)[]): void {
  expect(result.code, result.stderr).toBe(2);
  for (const part of parts) expect(result.stderr).toMatch(part);
  expect(result.stderr).not.toContain("    at ");
  expect(result.stderr).not.toContain(".plexus-tmp-");
}

const run = (design: string, out: string, ...flags: string[]) => runCli(["run", design, "--out", out, "--threads", "1", "-q", ...flags]);

describe("--out may not be an input, hold one, or lie inside a folder of inputs (with or without --force)", () => {
  it("the study folder, the matrix folder, a folder inside it, the folder above: refused, nothing touched", async () => {
    const { dir, design } = study("overlap");
    const before = snapshot(dir);
    const outs = [dir, path.join(dir, "connectomes"), path.join(dir, "connectomes", "res"), path.join(dir, "connectomes", "..", ".."), path.join(dir, "participants.tsv")];
    for (const out of outs) {
      for (const force of [[], ["--force"]]) {
        const result = await run(design, out, ...force);
        expectUserError(result, /--out/, /input/);
      }
    }
    expect(snapshot(dir)).toEqual(before);
    expect(readdirSync(root).filter((name) => name.startsWith("."))).toEqual([]);
  });

  it("is refused before any matrix is read (a broken matrix is not what the user hears about)", async () => {
    const { dir, design } = study("overlap-first");
    writeFileSync(path.join(dir, "connectomes", "sub-002.tsv"), "not a matrix\n");
    expectUserError(await run(design, path.join(dir, "connectomes"), "--force"), /input folder/);
    // The same run into a proper folder meets the broken matrix.
    expectUserError(await run(design, path.join(dir, "results")), /sub-002\.tsv/);
    expect(existsSync(path.join(dir, "results"))).toBe(false);
  });

  it("a symbolic link cannot hide an input folder", async () => {
    const { dir, design } = study("overlap-link");
    symlinkSync(path.join(dir, "connectomes"), path.join(dir, "matrices"), "dir");
    symlinkSync(dir, path.join(root, "overlap-alias"), "dir");
    expectUserError(await run(design, path.join(dir, "matrices", "res"), "--force"), /input folder/);
    expectUserError(await run(design, path.join(root, "overlap-alias", "connectomes"), "--force"), /input folder/);
    expectUserError(await run(design, path.join(root, "overlap-alias"), "--force"), /input/);
    expect(readdirSync(path.join(dir, "connectomes")).every((name) => name.endsWith(".tsv"))).toBe(true);
  });

  it("the usual layout works: --out study/results, then again with --force", async () => {
    const { dir, design } = study("overlap-usual");
    const out = path.join(dir, "results");
    expect((await run(design, out)).code).toBe(0);
    const forced = await run(design, out, "--force");
    expect(forced.code, forced.stderr).toBe(0);
    expect(existsSync(path.join(out, "patient_gt_control", "edges.tsv"))).toBe(true);
    expect(existsSync(path.join(out, WRITTEN_RECORD))).toBe(true);
  });

  it("merge: --out inside a shard folder, or the shard folder itself, is refused", async () => {
    const { dir, design } = study("overlap-merge");
    for (const k of [1, 2]) expect((await run(design, path.join(dir, `shard-${k}`), "--shard", `${k}/2`)).code).toBe(0);
    const shards = [path.join(dir, "shard-1"), path.join(dir, "shard-2")];
    const before = snapshot(shards[0]);
    for (const out of [path.join(shards[0], "merged"), shards[1]]) {
      expectUserError(await runCli(["merge", ...shards, "--out", out, "--force", "-q"]), /input/);
    }
    expect(snapshot(shards[0])).toEqual(before);
    expect((await runCli(["merge", ...shards, "--out", path.join(dir, "merged"), "-q"])).code).toBe(0);
  });

  it("strength and extract: --out among the inputs (the matrices, the --from results folder) is refused", async () => {
    const { dir, design } = study("overlap-strength");
    expectUserError(await runCli(["strength", design, "--out", path.join(dir, "connectomes"), "--force", "-q", "--threads", "1"]), /input/);
    expect((await run(design, path.join(dir, "results"))).code).toBe(0);
    const from = path.join(dir, "results", "patient_gt_control");
    for (const out of [path.join(dir, "participants.tsv"), path.join(dir, "connectomes", "values.tsv"), path.join(dir, "results", "values.tsv")]) {
      expectUserError(await runCli(["extract", design, "--system", "amber", "--from", from, "--out", out, "--force", "-q"]), /input/);
    }
  });
});

describe("--force replaces only a folder plexus wrote, holding nothing else", () => {
  it("a folder of the user's own (a thesis) is refused with what was found; nothing is deleted", async () => {
    const { dir, design } = study("force-precious");
    const precious = path.join(dir, "precious");
    mkdirSync(path.join(precious, "chapters"), { recursive: true });
    writeFileSync(path.join(precious, "thesis.docx"), "my thesis");
    writeFileSync(path.join(precious, "chapters", "one.md"), "chapter one");
    const before = snapshot(precious);
    expectUserError(await run(design, precious, "--force"), /plexus-files\.json/, /thesis\.docx|chapters/);
    expect(snapshot(precious)).toEqual(before);
  });

  it("a results folder with a file added, or a file changed by hand, is refused naming it; clean again, it is replaced", async () => {
    const { dir, design } = study("force-results");
    const out = path.join(dir, "results");
    expect((await run(design, out)).code).toBe(0);
    writeFileSync(path.join(out, "patient_gt_control", "notes.txt"), "my notes");
    expectUserError(await run(design, out, "--force"), /1 file|a file/, /plexus did not write/, /notes\.txt/);
    expect(readFileSync(path.join(out, "patient_gt_control", "notes.txt"), "utf8")).toBe("my notes");
    rmSync(path.join(out, "patient_gt_control", "notes.txt"));

    const methods = path.join(out, "methods.md");
    writeFileSync(methods, `${readFileSync(methods, "utf8")}\nMy edits.\n`);
    expectUserError(await run(design, out, "--force"), /changed since plexus wrote/, /methods\.md/);
    expect(readFileSync(methods, "utf8")).toContain("My edits.");
    rmSync(methods);
    expect((await run(design, out, "--force")).code).toBe(0);
  });

  it("plexus report keeps the record right: after a report, --force still replaces the folder; a user's file in the report's place is kept", async () => {
    const { dir, design } = study("force-report");
    const out = path.join(dir, "results");
    expect((await run(design, out)).code).toBe(0);
    const reported = await runCli(["report", out, "--median"]);
    expect(reported.code, reported.stderr).toBe(0);
    const record = JSON.parse(readFileSync(path.join(out, WRITTEN_RECORD), "utf8"));
    expect(record.tool.name).toBe("plexus");
    expect(Object.keys(record.files)).toContain("tables.md");
    expect((await run(design, out, "--force")).code).toBe(0);

    writeFileSync(path.join(out, "tables.md"), "my own tables");
    expectUserError(await runCli(["report", out]), /not written by plexus or changed/, /tables\.md/);
    expect(readFileSync(path.join(out, "tables.md"), "utf8")).toBe("my own tables");
    expect(readdirSync(out).filter((name) => name.startsWith("."))).toEqual([]);
  });

  it("strength and power: a folder of the user's own is refused with --force", async () => {
    const { dir, design } = study("force-others");
    const precious = path.join(dir, "precious");
    mkdirSync(precious);
    writeFileSync(path.join(precious, "thesis.docx"), "my thesis");
    expectUserError(await runCli(["strength", design, "--out", precious, "--force", "-q", "--threads", "1"]), /thesis\.docx/);
    expectUserError(
      await runCli(["power", "--out", precious, "--force", "-q", "--regions", "6", "--per-group", "5", "--cohorts", "2", "--permutations", "0", "--threads", "1"]),
      /thesis\.docx/,
    );
    expect(readdirSync(precious)).toEqual(["thesis.docx"]);
    const power = path.join(dir, "power");
    const args = ["power", "--out", power, "-q", "--regions", "6", "--per-group", "5", "--cohorts", "2", "--permutations", "0", "--threads", "1"];
    expect((await runCli(args)).code).toBe(0);
    expect((await runCli([...args, "--force"])).code).toBe(0);
  });
});

describe("contrast names that collide with what plexus writes, or are no portable folder name, are refused at check", () => {
  const names = ["figures", "tables", "summary.json", "Report.html", "plexus-files.json", "shard.json", "con", "a.", "a/b", "..", ".hidden"];
  it.each(names)("'%s'", async (name) => {
    const lines = [...DESIGN];
    lines[7] = `  ${name}: group[patient] - group[control]`;
    const { design } = study(`name-${names.indexOf(name)}`, lines);
    expectUserError(await runCli(["check", design]), new RegExp(`${design.replace(/[.*+?^${}()|[\]\\/]/g, "\\$&")}:8`), `contrasts.${name}`);
  });

  it("every name run, report, shard and strength write at the top level is on the reserved list", async () => {
    const { dir, design } = study("name-list");
    expect((await run(design, path.join(dir, "results"))).code).toBe(0);
    expect((await run(design, path.join(dir, "shard"), "--shard", "1/1")).code).toBe(0);
    expect((await runCli(["strength", design, "--out", path.join(dir, "strength"), "-q", "--threads", "1"])).code).toBe(0);
    for (const folder of ["results", "shard", "strength"]) {
      const written = readdirSync(path.join(dir, folder)).filter((name) => name !== "patient_gt_control");
      for (const name of written) expect(RESERVED_TOP_LEVEL_NAMES, `${folder}/${name}`).toContain(name);
    }
  });
});

describe("locks: one process at a time writes an output", () => {
  it("a second run on the same --out is refused (exit 2) naming the process that holds it; the first finishes", async () => {
    const lines = DESIGN.map((line) => (line.includes("permutations") ? "  permutations: 30000" : line));
    const { dir, design } = study("lock-busy", lines);
    const out = path.join(dir, "results");
    const first = run(design, out);
    const lock = OutputLock.fileFor(out);
    for (let i = 0; i < 500 && !existsSync(lock); i++) await new Promise((resolve) => setTimeout(resolve, 10));
    expect(existsSync(lock)).toBe(true);
    const second = await run(design, out, "--force");
    expectUserError(second, new RegExp(`process ${process.pid} on ${os.hostname()}, started \\d{4}-`));
    expect((await first).code).toBe(0);
    expect(existsSync(lock)).toBe(false);
    expect(existsSync(path.join(out, "patient_gt_control", "edges.tsv"))).toBe(true);
  }, 60_000);

  it("a lock left by a process that no longer runs is taken over, with a warning", async () => {
    const { dir, design } = study("lock-stale");
    const out = path.join(dir, "results");
    const gone = spawnSync(process.execPath, ["-e", "process.stdout.write(String(process.pid))"], { encoding: "utf8" });
    const deadPid = Number(gone.stdout);
    writeFileSync(OutputLock.fileFor(out), JSON.stringify({ tool: "plexus", pid: deadPid, host: os.hostname(), started: "2026-01-01T00:00:00.000Z" }));
    const result = await runCli(["run", design, "--out", out, "--threads", "1"]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stderr).toContain(`plexus: warning: took over the lock of ${out} left by process ${deadPid}`);
    expect(existsSync(OutputLock.fileFor(out))).toBe(false);
  });
});

describe("checkpoint advice never loops", () => {
  const lines = [...DESIGN.slice(0, 7), "  mean: intercept", "inference:", "  method: components", "  threshold: 2", "  permutations: 40", "  scheme: permute"];

  it("a design error met after the permutations were planned leaves no checkpoint: the same error again, with or without --resume", async () => {
    const { dir, design } = study("checkpoint-error", lines);
    const out = path.join(dir, "results");
    for (const flags of [[], [], ["--resume"], ["--force"]]) {
      const result = await run(design, out, ...flags);
      expectUserError(result, /constant term/);
      expect(result.stderr).not.toContain("--resume");
      expect(existsSync(Checkpoint.folderFor(out))).toBe(false);
      expect(existsSync(out)).toBe(false);
    }
  });

  it("a checkpoint of other inputs: --resume says --force; following the advice ends in results", async () => {
    const { dir, design } = study("checkpoint-other");
    const out = path.join(dir, "results");
    const other = Checkpoint.create(out, "another-fingerprint");
    const one = Float64Array.of(1);
    other.save("patient_gt_control", { from: 1, to: 2, maxExtent: one, maxMass: one, maxStatistic: one, extraNames: [], extra: [] });
    const plain = await run(design, out);
    expectUserError(plain, /add --resume to continue it, or --force to start over/);
    const resumed = await run(design, out, "--resume");
    expectUserError(resumed, /different design/, /run without --resume and with --force/);
    expect((await run(design, out, "--force")).code).toBe(0);
    expect(existsSync(Checkpoint.folderFor(out))).toBe(false);
  });

  it("an empty checkpoint (no finished permutations) is replaced without asking, with or without --resume", async () => {
    const { dir, design } = study("checkpoint-empty");
    for (const flags of [[], ["--resume"]]) {
      const out = path.join(dir, `results${flags.length}`);
      Checkpoint.create(out, "another-fingerprint");
      const result = await run(design, out, ...flags);
      expect(result.code, result.stderr).toBe(0);
      expect(existsSync(Checkpoint.folderFor(out))).toBe(false);
    }
  });
});
