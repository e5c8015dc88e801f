// An F contrast is shown and recorded with every row: `plexus check` prints the whole contrast
// matrix, summary.json's `vector` holds all rows (a t contrast keeps its flat vector), and the
// report names the whole matrix. The expected rows are written here by hand from the design.
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { groupDesignLines, runCli, writeDesignFile, writeSimulatedCohort } from "../unit/strength/strengthTestFiles.js";

let root = "";
let design = "";

beforeAll(() => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-rows-"));
  writeSimulatedCohort(root, { regions: 6, patients: 8, controls: 8, kind: "correlation", effect: null, covariates: true }, 11);
  design = writeDesignFile(
    path.join(root, "design.yaml"),
    groupDesignLines({
      cohort: "",
      model: "group + age + sex",
      contrasts: ["  patient_gt_control: group[patient] - group[control]", '  group_or_age: ["group[patient]", "age"]'],
      inference: ["  method: fdr"],
    }),
  );
});

afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

describe("F contrasts: every row shown and recorded", () => {
  it("check prints both rows of a two-row F contrast, and a t contrast as one vector", async () => {
    const result = await runCli(["check", design]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stdout).toContain("group_or_age: [\"group[patient]\",\"age\"]  ->  [[0, 1, 0, 0], [0, 0, 1, 0]]\n");
    expect(result.stdout).toContain("patient_gt_control: group[patient] - group[control]  ->  [0, 1, 0, 0]\n");
  });

  it("summary.json: vector holds every row of the F contrast (as rows does); the t contrast's vector is flat; the report shows the matrix", async () => {
    const out = path.join(root, "results");
    const result = await runCli(["run", design, "--out", out, "--threads", "1", "--quiet"]);
    expect(result.code, result.stderr).toBe(0);
    const summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
    const [t, f] = summary.contrasts;
    expect(t.vector).toEqual([0, 1, 0, 0]);
    expect(t.rows).toBeUndefined();
    expect(f.statistic).toBe("F");
    expect(f.vector).toEqual([[0, 1, 0, 0], [0, 0, 1, 0]]);
    expect(f.rows).toEqual([[0, 1, 0, 0], [0, 0, 1, 0]]);
    const html = readFileSync(path.join(out, "report.html"), "utf8");
    expect(html).toContain("C = [0, 1, 0, 0; 0, 0, 1, 0], df = 2 and 12.");
    expect(readFileSync(path.join(out, "methods.md"), "utf8")).toContain("C = [0, 1, 0, 0; 0, 0, 1, 0]");
  });
});
