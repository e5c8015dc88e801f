// runAnalysis writes the report from what writeResults still holds (the texts it wrote and
// each contrast's edge columns), not from the results folder read back. The reference is the
// report made the old way, from the folder on disk: `reportFiles(loadResults(folder))`
// (src/output/report/loadResults.ts, the reader `plexus report` uses). Every report file the run
// wrote must equal it byte for byte (tolerance: none), over the inference methods, an F
// contrast, a threshold sweep, and the hostile labels and ids of the report test cohort.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { loadResults } from "../../../src/output/report/loadResults.js";
import { reportFiles } from "../../../src/output/report/writeReport.js";
import { analysedCohort, GOLDEN_DESIGN, type AnalysedCohort } from "../report/reportCohort.js";

const design = (contrasts: string[], inference: string[]): string =>
  [
    "model: group + age + sex + site",
    "levels:",
    "  group: [control, patient]",
    "contrasts:",
    ...contrasts.map((c) => `  ${c}`),
    "transform: fisher-z",
    "inference:",
    ...inference.map((line) => `  ${line}`),
    "",
  ].join("\n");

const DESIGNS: [string, string][] = [
  ["components (the golden report's design: hostile label, id and site)", GOLDEN_DESIGN],
  [
    "a threshold sweep with an F contrast",
    design(["patient_gt_control: group[patient] - group[control]", "site_any: site"], ["method: components", "threshold: [2.5, 3.0, 3.5]", "permutations: 200", "seed: 2"]),
  ],
  ["threshold-free enhancement", design(["patient_gt_control: group[patient] - group[control]"], ["method: threshold-free", "permutations: 200", "seed: 4"])],
  ["max-t, two-sided, mass", design(["patient_vs_control: group[patient] - group[control]"], ["method: max-t", "tail: both", "size: mass", "permutations: 200", "seed: 5"])],
  ["fdr (no permutations), with an F contrast", design(["patient_gt_control: group[patient] - group[control]", "site_any: site"], ["method: fdr", "fdr: by"])],
];

const cohorts: AnalysedCohort[] = [];
afterAll(() => cohorts.forEach((c) => c.remove()));

describe("the report runAnalysis writes equals the report read back from the results folder (reference: loadResults from disk)", () => {
  for (const [name, body] of DESIGNS) {
    it(name, async () => {
      const cohort = await analysedCohort({ design: body });
      cohorts.push(cohort);
      const expected = reportFiles(loadResults(cohort.results));
      expect(expected.size).toBeGreaterThan(5);
      for (const [file, text] of expected) {
        const written = readFileSync(join(cohort.results, file), "utf8");
        if (written !== text) {
          const a = written.split("\n");
          const e = text.split("\n");
          const line = a.findIndex((l, k) => l !== e[k]);
          throw new Error(`${file} differs at line ${line + 1} (tolerance: none)\n  expected ${JSON.stringify(e[line])}\n  actual   ${JSON.stringify(a[line])}`);
        }
      }
    });
  }
});
