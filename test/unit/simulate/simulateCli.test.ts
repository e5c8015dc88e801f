import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterEach, describe, expect, it } from "vitest";
import type { OutputSink } from "../../../src/cli/outputSink.js";
import { main } from "../../../src/cli/main.js";

interface Captured extends OutputSink {
  stdout: string;
  stderr: string;
}

function capture(): Captured {
  const sink: Captured = {
    stdout: "",
    stderr: "",
    errIsTerminal: false,
    out: (text) => {
      sink.stdout += text;
    },
    err: (text) => {
      sink.stderr += text;
    },
  };
  return sink;
}

const scratch: string[] = [];
function scratchDir(): string {
  const dir = mkdtempSync(join(tmpdir(), "plexus-simulate-cli-"));
  scratch.push(dir);
  return dir;
}
afterEach(() => {
  for (const dir of scratch.splice(0)) rmSync(dir, { recursive: true, force: true });
});

describe("plexus simulate", () => {
  it("writes a cohort and prints a one-line summary", async () => {
    const out = join(scratchDir(), "cohort");
    const sink = capture();
    const code = await main(
      ["simulate", "--out", out, "--seed", "5", "--regions", "10", "--patients", "4", "--controls", "3", "--effect-regions", "3"],
      sink,
    );
    expect(sink.stderr).toBe("");
    expect(code).toBe(0);
    expect(sink.stdout.trimEnd().split("\n")).toHaveLength(1);
    expect(sink.stdout).toContain("7 participants");
    expect(readdirSync(join(out, "connectomes"))).toHaveLength(7);
    expect(readFileSync(join(out, "planted.tsv"), "utf8").trimEnd().split("\n")).toHaveLength(4);
    const header = readFileSync(join(out, "participants.tsv"), "utf8").split("\n")[0];
    expect(header).toBe("participant_id\tgroup\tage\tsex\trecall_score\tsite");
  });

  it("--no-effect writes no planted.tsv; --no-covariates keeps participant_id and group; --format npy writes one array", async () => {
    const out = join(scratchDir(), "plain");
    const sink = capture();
    const code = await main(
      ["simulate", "--out", out, "--seed", "1", "--regions", "6", "--patients", "2", "--controls", "2", "--no-effect", "--no-covariates", "--format", "npy", "--kind", "counts"],
      sink,
    );
    expect(sink.stderr).toBe("");
    expect(code).toBe(0);
    expect(readdirSync(out).sort()).toEqual(["cohort.json", "connectomes.npy", "participants.tsv", "regions.tsv"]);
    expect(readFileSync(join(out, "participants.tsv"), "utf8").split("\n")[0]).toBe("participant_id\tgroup");
  });

  it("applies the defaults: 60 regions, 30 patients, 30 controls, correlation, a 6-region effect of d = 1.2, tsv", async () => {
    const out = join(scratchDir(), "defaults");
    const sink = capture();
    expect(await main(["simulate", "--out", out, "--seed", "3"], sink)).toBe(0);
    expect(sink.stdout).toBe(
      `plexus simulate: wrote 60 participants (30 patients, 30 controls), 60 regions, correlation matrices as tsv, planted 15 edges among 6 regions (d = 1.2), seed 3 to ${out}\n`,
    );
    expect(readdirSync(join(out, "connectomes"))).toHaveLength(60);
    expect(readFileSync(join(out, "connectomes", "sub-001.tsv"), "utf8").trimEnd().split("\n")).toHaveLength(60);
  });

  const mistakes: Array<[string[], string]> = [
    [["--seed", "1"], "--out"],
    [["--out", "X"], "--seed"],
    [["--out", "X", "--seed", "-3"], "--seed"],
    [["--out", "X", "--seed", "1", "--regions", "1"], "--regions"],
    [["--out", "X", "--seed", "1", "--regions", "6.5"], "--regions"],
    [["--out", "X", "--seed", "1", "--patients", "many"], "--patients"],
    [["--out", "X", "--seed", "1", "--patients", "0", "--controls", "0"], "--patients"],
    [["--out", "X", "--seed", "1", "--kind", "weights"], "--kind"],
    [["--out", "X", "--seed", "1", "--format", "csv"], "--format"],
    [["--out", "X", "--seed", "1", "--regions", "5", "--effect-regions", "6"], "--effect-regions"],
    [["--out", "X", "--seed", "1", "--effect-size", "0"], "--effect-size"],
    [["--out", "X", "--seed", "1", "--effect-size", "big"], "--effect-size"],
    [["--out", "X", "--seed", "1", "--effect-size", "1", "--no-effect"], "--effect-size"],
  ];
  for (const [args, key] of mistakes) {
    it(`exits 2 naming ${key} for: simulate ${args.join(" ")}`, async () => {
      const root = scratchDir();
      const sink = capture();
      const code = await main(["simulate", ...args.map((a) => (a === "X" ? join(root, "x") : a))], sink);
      expect(code).toBe(2);
      expect(sink.stderr).toContain(`'${key}'`);
      expect(sink.stderr).not.toContain("    at ");
      expect(existsSync(join(root, "x"))).toBe(false);
    });
  }

  it("exits 2 naming the folder when --out is not empty, and replaces its cohort with --force", async () => {
    const out = join(scratchDir(), "cohort");
    const args = ["simulate", "--out", out, "--seed", "2", "--regions", "6", "--patients", "2", "--controls", "2"];
    expect(await main(args, capture())).toBe(0);
    const sink = capture();
    expect(await main(args, sink)).toBe(2);
    expect(sink.stderr).toContain(out);
    expect(await main([...args, "--force"], capture())).toBe(0);
  });
});
