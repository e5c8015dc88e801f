// Test helper for the report tests: a fixed simulated cohort (plexus's own simulator, seed 7)
// written to a temporary folder with a few hostile strings planted in it, analysed by
// runAnalysis into <dir>/results. Nothing here checks numbers; the tests do.
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { runAnalysis } from "../../../src/run/runAnalysis.js";
import { simulateCohort, type SimulationOptions } from "../../../src/simulate/simulateCohort.js";
import { simulationRandom } from "../../../src/simulate/simulationRandom.js";
import { writeCohort } from "../../../src/simulate/writeCohort.js";

/** A region label that is HTML (a script element) and must be shown as text. */
export const HTML_LABEL = "<script>alert(1)</script>";
/** A participant id and a site that a spreadsheet would run as formulas. */
export const FORMULA_ID = "=1+2";
export const FORMULA_SITE = "=cmd|' /C calc'!A0";

export interface AnalysedCohort {
  dir: string;
  results: string;
  remove: () => void;
}

export interface CohortVariant {
  /** Simulation settings over the defaults below. */
  simulation?: Partial<SimulationOptions>;
  seed?: number;
  /** Drop the coordinates from regions.tsv (keep hemisphere and system). */
  noCoordinates?: boolean;
  /** Plant the hostile strings (default true). */
  hostile?: boolean;
  /** Design body after the input paths (model, contrasts, inference). */
  design: string;
}

export const GOLDEN_DESIGN = [
  "model: group + age + sex + site",
  "levels:",
  "  group: [control, patient]",
  "contrasts:",
  "  patient_gt_control: group[patient] - group[control]",
  "  control_gt_patient: group[control] - group[patient]",
  "transform: fisher-z",
  "inference:",
  "  method: components",
  "  threshold: 3.0",
  "  size: extent",
  "  permutations: 400",
  "  seed: 3",
  "  alpha: 0.05",
  "",
].join("\n");

/**
 * Simulates 12 patients and 12 controls on 16 regions with a planted 5-region effect
 * (Cohen's d = 2), then plants: the HTML label on the first planted region, the formula id on
 * participant 3 (whose age is made missing, so it is excluded and listed), and the
 * formula site in place of "north".
 */
export async function analysedCohort(variant: CohortVariant): Promise<AnalysedCohort> {
  const dir = mkdtempSync(join(tmpdir(), "plexus-report-"));
  const remove = () => rmSync(dir, { recursive: true, force: true });
  try {
    const options: SimulationOptions = {
      regions: 16,
      patients: 12,
      controls: 12,
      kind: "correlation",
      effect: { regions: 5, size: 2 },
      covariates: true,
      ...variant.simulation,
    };
    const cohort = simulateCohort(options, simulationRandom(variant.seed ?? 7));
    if (variant.hostile ?? true) {
      // The first region of the planted effect, so the label shows up in the tables and figures.
      const planted = cohort.plantedEdges[0]?.[0] ?? 0;
      cohort.regions[planted] = { ...cohort.regions[planted], label: HTML_LABEL };
      const header = cohort.participants.header;
      const age = header.indexOf("age");
      const site = header.indexOf("site");
      const row = cohort.participants.rows[2];
      row[0] = FORMULA_ID;
      if (age >= 0) row[age] = "n/a";
      if (site >= 0) for (const r of cohort.participants.rows) if (r[site] === "north") r[site] = FORMULA_SITE;
    }
    const cohortDir = join(dir, "cohort");
    writeCohort(cohortDir, cohort, { format: "tsv", plantedFile: false });
    if (variant.noCoordinates) {
      const rows = cohort.regions.map((r) => [r.label, r.hemisphere ?? "n/a", r.system ?? "n/a"].join("\t"));
      writeFileSync(join(cohortDir, "regions.tsv"), `label\themisphere\tsystem\n${rows.join("\n")}\n`);
    }
    const designFile = join(dir, "design.yaml");
    writeFileSync(
      designFile,
      `subjects: cohort/participants.tsv\nconnectomes: cohort/connectomes/{participant_id}.tsv\nregions: cohort/regions.tsv\n${variant.design}`,
    );
    const results = join(dir, "results");
    await runAnalysis({ designFile, out: results, threads: 1, quiet: true }, { info() {}, warn() {} });
    return { dir, results, remove };
  } catch (error) {
    remove();
    throw error;
  }
}
