import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync as realWriteFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";

// Fault injection: the file system reports a full disk (ENOSPC) on the n-th
// write inside a plexus staging folder. Only writes of results are affected.
const fault = vi.hoisted(() => ({ failAfter: -1, writes: 0 }));
vi.mock("node:fs", async (importOriginal) => {
  const fs = await importOriginal<typeof import("node:fs")>();
  const writeFileSync = (file: Parameters<typeof fs.writeFileSync>[0], ...rest: unknown[]) => {
    if (typeof file === "string" && file.includes(".plexus-tmp-") && fault.failAfter >= 0) {
      fault.writes++;
      if (fault.writes > fault.failAfter) {
        const error = new Error("ENOSPC: no space left on device, write") as NodeJS.ErrnoException;
        error.code = "ENOSPC";
        throw error;
      }
    }
    return (fs.writeFileSync as (...args: unknown[]) => void)(file, ...rest);
  };
  return { ...fs, default: { ...fs, writeFileSync }, writeFileSync };
});

const { main } = await import("../../src/cli/main.js");

function capture() {
  const sink = { stdout: "", stderr: "", out: (t: string) => void (sink.stdout += t), err: (t: string) => void (sink.stderr += t), errIsTerminal: false };
  return sink;
}

/** Every file below a folder with its content, for before/after comparison. */
function snapshot(folder: string): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (dir: string) => {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      const full = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(full);
      else out[path.relative(folder, full)] = readFileSync(full, "utf8");
    }
  };
  walk(folder);
  return out;
}

describe("results are atomic: a full disk leaves earlier results exactly as they were", () => {
  let base: string;
  beforeAll(async () => {
    base = mkdtempSync(path.join(os.tmpdir(), "plexus-atomic-"));
    const sink = capture();
    expect(await main(["simulate", "--out", path.join(base, "cohort"), "--seed", "3", "--regions", "8", "--patients", "6", "--controls", "6"], sink)).toBe(0);
    realWriteFileSync(
      path.join(base, "design.yaml"),
      [
        "subjects: cohort/participants.tsv",
        "connectomes: cohort/connectomes/{participant_id}.tsv",
        "regions: cohort/regions.tsv",
        "model: group + age",
        "transform: fisher-z",
        "contrasts:",
        "  up: group[patient] - group[control]",
        "inference:",
        "  method: components",
        "  threshold: 2",
        "  permutations: 99",
      ].join("\n"),
    );
  });
  afterAll(() => rmSync(base, { recursive: true, force: true }));

  it("ENOSPC on any write: exit 2 naming the file, earlier folder untouched, no staging folder left", async () => {
    const out = path.join(base, "results");
    fault.failAfter = -1;
    expect(await main(["run", path.join(base, "design.yaml"), "--out", out, "-q", "--threads", "1"], capture())).toBe(0);
    const before = snapshot(out);
    for (const failAfter of [0, 1, 2, 4]) {
      fault.failAfter = failAfter;
      fault.writes = 0;
      const sink = capture();
      const code = await main(["run", path.join(base, "design.yaml"), "--out", out, "--force", "-q", "--threads", "1"], sink);
      expect(code).toBe(2);
      expect(sink.stderr).toMatch(/disk is full/);
      expect(sink.stderr).not.toMatch(/\n\s+at /);
      expect(snapshot(out)).toEqual(before);
      expect(readdirSync(base).filter((name) => name.includes(".plexus-tmp-"))).toEqual([]);
    }
    fault.failAfter = -1;
  });
});
