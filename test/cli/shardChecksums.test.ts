// Each shard folder records the SHA-256 of its files in shard.json, and `plexus merge` checks them
// before reading anything: a truncated null.tsv is blamed on its own shard (exit 2, no stack).
// The expected digests are computed here with node:crypto from the bytes on disk.
import { createHash } from "node:crypto";
import { cpSync, existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { groupDesignLines, runCli, writeDesignFile, writeSimulatedCohort } from "../unit/strength/strengthTestFiles.js";

let root = "";
const shard = (k: number) => path.join(root, `shard-${k}`);

beforeAll(async () => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-shard-sums-"));
  writeSimulatedCohort(root, { regions: 6, patients: 6, controls: 6, kind: "correlation", effect: null, covariates: true }, 3);
  const design = writeDesignFile(
    path.join(root, "design.yaml"),
    groupDesignLines({
      cohort: "",
      model: "group + age",
      contrasts: ["  up: group[patient] - group[control]", "  down: group[control] - group[patient]"],
      inference: ["  method: components", "  threshold: 2", "  permutations: 60", "  seed: 9"],
    }),
  );
  for (const k of [1, 2, 3]) {
    const result = await runCli(["run", design, "--out", shard(k), "--shard", `${k}/3`, "--threads", "1", "--quiet"]);
    expect(result.code, result.stderr).toBe(0);
  }
});

afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

/** A copy of shard k to damage, so the other tests see the shards intact. */
function copyOf(k: number, name: string): string {
  const copy = path.join(root, name);
  cpSync(shard(k), copy, { recursive: true });
  return copy;
}

function truncate(file: string): void {
  const text = readFileSync(file, "utf8");
  writeFileSync(file, text.slice(0, Math.floor(text.length / 2)));
}

describe("shard checksums", () => {
  it("shard.json lists every null.tsv with the SHA-256 of its bytes (node:crypto)", () => {
    for (const k of [1, 2, 3]) {
      const manifest = JSON.parse(readFileSync(path.join(shard(k), "shard.json"), "utf8"));
      expect(manifest.files.map((f: { path: string }) => f.path)).toEqual(["up/null.tsv", "down/null.tsv"]);
      for (const listed of manifest.files) {
        const digest = createHash("sha256").update(readFileSync(path.join(shard(k), listed.path))).digest("hex");
        expect(listed.sha256, `shard ${k} ${listed.path}`).toBe(digest);
      }
    }
  });

  it("intact shards merge (exit 0)", async () => {
    const result = await runCli(["merge", shard(3), shard(1), shard(2), "--out", path.join(root, "merged"), "--quiet"]);
    expect(result.code, result.stderr).toBe(0);
    expect(existsSync(path.join(root, "merged", "summary.json"))).toBe(true);
  });

  it("a shard run from a byte-identical copy of the study in another folder merges, with the same null as the shards run in place", async () => {
    const elsewhere = path.join(root, "copy-elsewhere");
    for (const name of ["participants.tsv", "regions.tsv", "connectomes", "design.yaml"]) {
      cpSync(path.join(root, name), path.join(elsewhere, name), { recursive: true });
    }
    const moved = path.join(root, "shard-2-elsewhere");
    const ran = await runCli(["run", path.join(elsewhere, "design.yaml"), "--out", moved, "--shard", "2/3", "--threads", "1", "--quiet"]);
    expect(ran.code, ran.stderr).toBe(0);
    const out = path.join(root, "merged-elsewhere");
    const result = await runCli(["merge", shard(1), moved, shard(3), "--out", out, "--quiet"]);
    expect(result.code, result.stderr).toBe(0);
    const reference = path.join(root, "merged-reference");
    expect((await runCli(["merge", shard(1), shard(2), shard(3), "--out", reference, "--quiet"])).code).toBe(0);
    for (const name of ["up/null.tsv", "down/null.tsv", "up/edges.tsv"]) {
      expect(readFileSync(path.join(out, name), "utf8"), name).toBe(readFileSync(path.join(reference, name), "utf8"));
    }
  });

  it("a truncated null.tsv of shard 2/3: exit 2, the message names shard 2/3 and its folder, no results folder", async () => {
    const damaged = copyOf(2, "damaged-2");
    truncate(path.join(damaged, "up", "null.tsv"));
    const out = path.join(root, "merged-damaged");
    const result = await runCli(["merge", shard(1), damaged, shard(3), "--out", out]);
    expect(result.code).toBe(2);
    expect(result.stderr).not.toContain("    at ");
    const firstLine = result.stderr.split("\n")[0];
    expect(firstLine).toBe(
      `plexus: error: ${path.join(damaged, "up", "null.tsv")}: null.tsv of shard 2/3 is damaged or truncated: its SHA-256 differs from shard.json`,
    );
    expect(result.stderr).not.toContain(shard(3));
    expect(existsSync(out)).toBe(false);
  });

  it("a shard.json without checksums (or with a path leaving the folder) is refused, naming the shard", async () => {
    const old = copyOf(2, "no-sums-2");
    const manifestFile = path.join(old, "shard.json");
    const manifest = JSON.parse(readFileSync(manifestFile, "utf8"));
    delete manifest.files;
    writeFileSync(manifestFile, JSON.stringify(manifest));
    const escaping = copyOf(3, "escaping-3");
    const other = JSON.parse(readFileSync(path.join(escaping, "shard.json"), "utf8"));
    other.files[0].path = "../shard-1/up/null.tsv";
    writeFileSync(path.join(escaping, "shard.json"), JSON.stringify(other));
    const result = await runCli(["merge", shard(1), old, escaping, "--out", path.join(root, "merged-no-sums")]);
    expect(result.code).toBe(2);
    expect(result.stderr).toContain(`${manifestFile}: shard.json of shard 2/3 lists no SHA-256 of its files`);
    expect(result.stderr).toContain(`${path.join(escaping, "shard.json")}: shard.json of shard 3/3: files[0] is not a file inside the shard folder`);
  });

  it("two damaged shards are both reported in one error", async () => {
    const one = copyOf(1, "damaged-1");
    const three = copyOf(3, "damaged-3");
    truncate(path.join(one, "down", "null.tsv"));
    writeFileSync(path.join(three, "up", "null.tsv"), `${readFileSync(path.join(three, "up", "null.tsv"), "utf8")}61\t0\t0\t0\n`);
    const result = await runCli(["merge", three, shard(2), one, "--out", path.join(root, "merged-two")]);
    expect(result.code).toBe(2);
    expect(result.stderr).toContain(`${path.join(one, "down", "null.tsv")}: null.tsv of shard 1/3 is damaged or truncated`);
    expect(result.stderr).toContain(`${path.join(three, "up", "null.tsv")}: null.tsv of shard 3/3 is damaged or truncated`);
    expect(result.stderr.indexOf("shard 1/3")).toBeLessThan(result.stderr.indexOf("shard 3/3"));
    expect(result.stderr).toContain("(2 problems in all)");
  });
});
