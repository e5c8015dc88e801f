import { createHash } from "node:crypto";
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join, relative, resolve } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, describe, expect, it } from "vitest";
import { readDesign } from "../../../src/io/designFile.js";
import { runSimulation } from "../../../src/simulate/runSimulation.js";

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), "../../..");
const DEMO = join(ROOT, "demo-cohort");
/** Files and folders in demo-cohort/ that are not written by the simulator (formats/ is written from the cohort by its own script; coverage/, prepost/ and sessions/ are further invented cohorts, each made by its own script). */
const NOT_GENERATED = new Set(["README.md", "make.sh", "formats", "coverage", "prepost", "sessions"]);

function treeDigest(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (folder: string) => {
    for (const entry of readdirSync(folder, { withFileTypes: true })) {
      const full = join(folder, entry.name);
      if (NOT_GENERATED.has(relative(dir, full))) continue;
      if (entry.isDirectory()) walk(full);
      else {
        out[relative(dir, full)] = createHash("sha256").update(readFileSync(full)).digest("hex");
      }
    }
  };
  walk(dir);
  return out;
}

const scratch = mkdtempSync(join(tmpdir(), "plexus-demo-cohort-"));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

describe("demo-cohort/", () => {
  it("is exactly what make.sh's command writes (seed 2026, 30 + 30, 60 regions, d = 1.2 on 6 regions)", () => {
    const makeScript = readFileSync(join(DEMO, "make.sh"), "utf8");
    expect(makeScript).toContain(
      "--seed 2026 \\\n  --regions 60 --patients 30 --controls 30 --kind correlation \\\n  --effect-regions 6 --effect-size 1.2 --format tsv --force",
    );
    const out = join(scratch, "demo");
    runSimulation({
      out,
      seed: 2026,
      simulation: {
        regions: 60,
        patients: 30,
        controls: 30,
        kind: "correlation",
        effect: { regions: 6, size: 1.2 },
        covariates: true,
      },
      format: "tsv",
      force: false,
    });
    const expected = treeDigest(out);
    expect(Object.keys(expected)).toHaveLength(64); // 60 matrices, participants, regions, planted, cohort.json
    expect(treeDigest(DEMO)).toEqual(expected);
  });

  it("README.md names every planted region and the columns of participants.tsv", () => {
    const readme = readFileSync(join(DEMO, "README.md"), "utf8");
    const planted = readFileSync(join(DEMO, "planted.tsv"), "utf8").trimEnd().split("\n").slice(1);
    for (const label of new Set(planted.flatMap((line) => line.split("\t")))) expect(readme).toContain(`\`${label}\``);
    const header = readFileSync(join(DEMO, "participants.tsv"), "utf8").split("\n")[0].split("\t");
    for (const column of header) expect(readme).toContain(`\`${column}\``);
  });
});

describe("designs/ on the demo cohort", () => {
  for (const name of ["clinic-contrast", "symptom-within-patients", "one-sample", "clinic-from-mat", "clinic-from-labelled-csv", "clinic-from-cifti", "clinic-cohort-table", "clinic-effect-sizes"]) {
    it(`designs/${name}.yaml reads as a design whose files exist`, () => {
      const design = readDesign(join(ROOT, "designs", `${name}.yaml`));
      expect(existsSync(resolve(design.baseDir, design.subjects))).toBe(true);
      expect(existsSync(resolve(design.baseDir, design.regions as string))).toBe(true);
      expect(existsSync(resolve(design.baseDir, design.connectomes.replace("{participant_id}", "sub-001")))).toBe(true);
      expect(design.transform).toBe("fisher-z");
    });
  }
});

describe("the worked designs of select and cohort_table", () => {
  it("symptom-within-patients analyses the patients only: controls are not selected, none is excluded", async () => {
    const { prepareAnalysis } = await import("../../../src/run/prepareAnalysis.js");
    const prepared = prepareAnalysis(join(ROOT, "designs", "symptom-within-patients.yaml"));
    expect(prepared.kept).toHaveLength(30);
    expect(prepared.excluded).toEqual([]);
    expect(prepared.notSelected).toHaveLength(30);
    expect(new Set(prepared.notSelected.map((x) => x.reason))).toEqual(new Set(["not selected (group: control)"]));
    expect(prepared.warnings).toEqual([]);
    expect(prepared.cohortTable).toEqual({ by: null, byFrom: "none", variables: ["recall_score", "age", "sex", "site"] });
  });

  it("clinic-cohort-table groups Table 1 by group and describes columns outside the model", async () => {
    const { prepareAnalysis } = await import("../../../src/run/prepareAnalysis.js");
    const prepared = prepareAnalysis(join(ROOT, "designs", "clinic-cohort-table.yaml"));
    expect(prepared.cohortTable).toEqual({ by: "group", byFrom: "design", variables: ["age", "sex", "site", "recall_score"] });
  });
});
