// Blocks that make a contrast untestable are refused by `plexus check`, before any permutation:
// permuting within blocks cannot move a tested column that is constant within every block
// (blocking on the very group being compared), so its null would be the observed value alone.
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { groupDesignLines, runCli, writeDesignFile, writeSimulatedCohort } from "../unit/strength/strengthTestFiles.js";

let root = "";

beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-blocks-"));
  writeSimulatedCohort(root, { regions: 6, patients: 8, controls: 8, kind: "correlation", effect: null, covariates: true }, 21);
});

afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

function design(name: string, contrasts: string[], inference: string[]): string {
  return writeDesignFile(
    path.join(root, name),
    groupDesignLines({
      cohort: "",
      model: "group + age",
      contrasts,
      inference: ["method: components", "threshold: 2", "permutations: 100", "seed: 4", ...inference],
    }),
  );
}

describe("exchangeability blocks and the tested columns", () => {
  it("blocks: group with a group contrast is refused at check, naming inference.blocks", async () => {
    const file = design("blocked-on-group.yaml", ["up: group[patient] - group[control]"], ["blocks: group"]);
    const result = await runCli(["check", file]);
    expect(result.code, result.stderr).toBe(2);
    expect(result.stderr).toContain("key 'inference.blocks'");
    expect(result.stderr).toContain("'up' tests columns that do not vary within any exchangeability block");
    expect(result.stderr).not.toContain("    at ");
  });

  it("blocks: group still allows a contrast on age, which varies within each group", async () => {
    const file = design("age-within-group.yaml", ["older: age"], ["blocks: group"]);
    const result = await runCli(["check", file]);
    expect(result.code, result.stderr).toBe(0);
  });

  it("blocks: group with whole-block permutation is not refused for this reason", async () => {
    const file = design("whole-groups.yaml", ["up: group[patient] - group[control]"], ["blocks: group", "block_permutation: whole"]);
    const result = await runCli(["check", file]);
    expect(result.stderr).not.toContain("do not vary within any exchangeability block");
  });
});
