// A classic permutation slip: a run that changes its inputs (a shuffled data array, residuals
// written over the data, a design matrix permuted in place). Checked here by SHA-256 checksums of
// every array before and after (common practice; no published source), and end to end: each
// contrast of a two-contrast run must have the null distribution of a run of that contrast alone.
import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import seedrandom from "seedrandom";
import { afterAll, describe, expect, it } from "vitest";
import { computeNullRange } from "../../../src/permute/nullRange.js";
import { fitAll, observeContrast } from "../../../src/run/analyzeContrasts.js";
import { setupNull } from "../../../src/run/permutationInference.js";
import { prepareAnalysis } from "../../../src/run/prepareAnalysis.js";
import { runAnalysis } from "../../../src/run/runAnalysis.js";
import { normalDraw, scratchFolder, writeDesign, writeTinyCohort } from "./cohortFiles.js";

const scratch = scratchFolder("inputs-unchanged");
afterAll(() => scratch.remove());

function checksum(values: ArrayLike<number> | ArrayBufferView): string {
  const view = ArrayBuffer.isView(values) ? values : Float64Array.from(values);
  return createHash("sha256").update(new Uint8Array(view.buffer, view.byteOffset, view.byteLength)).digest("hex");
}

function fileChecksum(file: string): string {
  return createHash("sha256").update(readFileSync(file)).digest("hex");
}

const regionCount = 6;
const S = 13;
const random = seedrandom("inputs-unchanged");
const groups = Array.from({ length: S }, (_, s) => (s % 3 === 0 ? "patient" : "control"));
const ages = Array.from({ length: S }, () => String(Math.round(50 + 10 * normalDraw(random))));
writeTinyCohort(scratch.dir, {
  columns: ["group", "age"],
  rows: groups.map((g, s) => [`sub-${s + 1}`, g, ages[s]]),
  regionCount,
  edges: groups.map(() => Float64Array.from({ length: 15 }, () => Math.round(normalDraw(random) * 1e6) / 1e6)),
});
const designBody = (contrasts: string, scheme = "auto") => `model: group + age
levels:
  group: [control, patient]
contrasts:
${contrasts}
inference:
  threshold: 1
  size: mass
  tail: both
  permutations: 150
  seed: 5
  scheme: ${scheme}
`;
const BOTH = "  patient_gt_control: group[patient] - group[control]\n  age: age";

describe("computeNullRange changes none of its inputs", () => {
  for (const scheme of ["permute", "sign-flip"]) {
    it(`${scheme}: data, design, observed statistics, residuals and effect vectors keep their checksums`, () => {
      const prepared = prepareAnalysis(writeDesign(scratch.dir, `unit-${scheme}.yaml`, designBody(BOTH, scheme)));
      const fit = fitAll(prepared);
      const data = checksum(prepared.connectomes.data);
      const design = checksum(prepared.matrix.values);
      for (const contrast of prepared.contrasts) {
        const observed = observeContrast(prepared, fit, contrast);
        const statistic = checksum(observed.statistics.statistic);
        const setup = setupNull(prepared, observed);
        expect(checksum(prepared.connectomes.data), "data after setupNull").toBe(data);
        const { context } = setup;
        const before = {
          residuals: checksum(context.kernel.residuals),
          sumSquares: checksum(context.kernel.sumSquares),
          valid: checksum(context.kernel.valid),
          vectors: context.vectors.map((v) => checksum(v)),
          observed: checksum(context.observed),
          regions: [checksum(context.regionA), checksum(context.regionB)],
          plan: JSON.stringify(context.plan),
        };
        const first = computeNullRange(context, 1, 151);
        const after = {
          residuals: checksum(context.kernel.residuals),
          sumSquares: checksum(context.kernel.sumSquares),
          valid: checksum(context.kernel.valid),
          vectors: context.vectors.map((v) => checksum(v)),
          observed: checksum(context.observed),
          regions: [checksum(context.regionA), checksum(context.regionB)],
          plan: JSON.stringify(context.plan),
        };
        expect(after).toEqual(before);
        expect(checksum(prepared.connectomes.data), "data after computeNullRange").toBe(data);
        expect(checksum(prepared.matrix.values), "design after computeNullRange").toBe(design);
        expect(checksum(observed.statistics.statistic), "observed t after computeNullRange").toBe(statistic);
        // And a second pass over the same context gives the same rows (nothing drifted).
        const second = computeNullRange(context, 1, 151);
        expect(checksum(second.maxMass)).toBe(checksum(first.maxMass));
        expect(checksum(second.maxStatistic)).toBe(checksum(first.maxStatistic));
      }
    });
  }
});

describe("runAnalysis changes no input and contrasts do not leak into each other", () => {
  it("input files keep their checksums; each contrast's null.tsv equals that of a run of it alone", async () => {
    const files = ["participants.tsv", ...groups.map((_, s) => join("connectomes", `sub-${s + 1}.tsv`))].map((f) => join(scratch.dir, f));
    const before = files.map(fileChecksum);
    const quiet = { info() {}, warn() {} };
    const both = writeDesign(scratch.dir, "both.yaml", designBody(BOTH));
    await runAnalysis({ designFile: both, out: join(scratch.dir, "both"), threads: 1, quiet: true }, quiet);
    expect(files.map(fileChecksum)).toEqual(before);
    for (const [name, line] of [
      ["patient_gt_control", "  patient_gt_control: group[patient] - group[control]"],
      ["age", "  age: age"],
    ]) {
      const alone = writeDesign(scratch.dir, `${name}.yaml`, designBody(line));
      await runAnalysis({ designFile: alone, out: join(scratch.dir, name), threads: 1, quiet: true }, quiet);
      for (const table of ["null.tsv", "edges.tsv", "components.tsv"]) {
        const inBoth = readFileSync(join(scratch.dir, "both", name, table), "utf8");
        const inAlone = readFileSync(join(scratch.dir, name, name, table), "utf8");
        expect(inBoth, `${name}/${table}: two-contrast run vs run of ${name} alone`).toBe(inAlone);
      }
    }
  });
});
