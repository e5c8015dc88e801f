// Ctrl-C (SIGINT) and SIGTERM during a run, with the real binary (node bin/plexus.js, which
// runs the compiled dist/ that `npm test` builds): the temporary folder beside --out and the lock
// are removed, the checkpoint is kept (so --resume can continue), and the exit code is 128 + the
// signal's number (130, 143), as shells report a process ended by that signal.
import { spawn } from "node:child_process";
import { existsSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { OutputLock } from "../../src/output/outputLock.js";
import { Checkpoint } from "../../src/output/checkpoint.js";
import { writeSimulatedCohort } from "../unit/strength/strengthTestFiles.js";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..", "..");
const BIN = path.join(ROOT, "bin", "plexus.js");
let dir = "";

beforeAll(() => {
  if (!existsSync(path.join(ROOT, "dist", "cli", "main.js"))) throw new Error("dist/ is missing: run `npx tsc -p tsconfig.build.json` before these tests");
  dir = mkdtempSync(path.join(os.tmpdir(), "plexus-interrupt-"));
  writeSimulatedCohort(dir, { regions: 10, patients: 10, controls: 10, kind: "correlation", effect: null, covariates: true }, 21);
  writeFileSync(
    path.join(dir, "design.yaml"),
    [
      "subjects: participants.tsv",
      "connectomes: connectomes/{participant_id}.tsv",
      "model: group + age",
      "contrasts:",
      "  up: group[patient] - group[control]",
      "inference:",
      "  method: components",
      "  threshold: 2",
      "  permutations: 2000000",
      "",
    ].join("\n"),
  );
});
afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

async function waitFor(condition: () => boolean, what: string): Promise<void> {
  for (let i = 0; i < 600; i++) {
    if (condition()) return;
    await new Promise((resolve) => setTimeout(resolve, 50));
  }
  throw new Error(`timed out waiting for ${what}`);
}

describe("a run interrupted by a signal cleans up after itself and keeps its checkpoint", () => {
  it.each([
    ["SIGINT", 130],
    ["SIGTERM", 143],
  ] as const)("%s: exit %d, no temporary folder, no lock, the checkpoint kept", async (signal, code) => {
    const out = path.join(dir, `results-${signal}`);
    const child = spawn(process.execPath, [BIN, "run", "design.yaml", "--out", out, "--threads", "1", "-q"], { cwd: dir, stdio: ["ignore", "ignore", "pipe"] });
    let stderr = "";
    child.stderr.on("data", (chunk) => (stderr += chunk));
    const exited = new Promise<number | null>((resolve) => child.on("exit", (status) => resolve(status)));
    const staging = () => readdirSync(dir).filter((name) => name.startsWith(`.${path.basename(out)}.plexus-tmp-`));
    await waitFor(() => staging().length > 0, "the temporary folder");
    await waitFor(() => Checkpoint.holdsChunks(out), "a first checkpoint chunk");
    expect(existsSync(OutputLock.fileFor(out))).toBe(true);
    child.kill(signal);
    expect(await exited, stderr).toBe(code);
    expect(stderr).toContain(`plexus: interrupted by ${signal}`);
    expect(stderr).toContain("add --resume to continue");
    expect(staging()).toEqual([]);
    expect(existsSync(OutputLock.fileFor(out))).toBe(false);
    expect(existsSync(out)).toBe(false);
    expect(Checkpoint.holdsChunks(out)).toBe(true);
  }, 60_000);
});
