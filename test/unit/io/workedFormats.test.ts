// The worked designs that read the demo cohort from other tools' files
// (designs/clinic-from-*.yaml; the files written by SciPy's savemat, Python's
// csv module and nibabel, demo-cohort/formats/make_formats.py) read exactly the
// edge values of the cohort's own text matrices (designs/clinic-contrast.yaml).
import { dirname, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { prepareAnalysis } from "../../../src/run/prepareAnalysis.js";

const DESIGNS = join(resolve(dirname(fileURLToPath(import.meta.url)), "../../.."), "designs");

describe("designs/clinic-from-*.yaml read the demo cohort's own values", () => {
  const reference = prepareAnalysis(join(DESIGNS, "clinic-contrast.yaml"));
  const cases = [
    ["clinic-from-mat", "MATLAB 5 .mat (compressed)", "last"],
    ["clinic-from-labelled-csv", "text (comma-separated, header row and label column)", undefined],
    ["clinic-from-cifti", "CIFTI-2 parcellated connectivity", undefined],
  ] as const;
  for (const [name, reader, axis] of cases) {
    it(`${name}.yaml: the same edge values, regions and warnings as the text matrices`, () => {
      const prepared = prepareAnalysis(join(DESIGNS, `${name}.yaml`));
      expect(prepared.connectomes.reading.reader).toBe(reader);
      expect(prepared.connectomes.reading.subjectsAxis).toBe(axis);
      expect(prepared.regions).toEqual(reference.regions);
      expect(prepared.connectomes.edgeCount).toBe(reference.connectomes.edgeCount);
      expect(Buffer.from(prepared.connectomes.data.buffer).equals(Buffer.from(reference.connectomes.data.buffer))).toBe(true);
    });
  }
  it("the labelled CSV's alphabetical order is reordered to the regions table's, and said once", () => {
    const prepared = prepareAnalysis(join(DESIGNS, "clinic-from-labelled-csv.yaml"));
    expect(prepared.connectomes.reading.reordered).toBe(true);
    expect(prepared.warnings.filter((w) => w.includes("reordered"))).toHaveLength(1);
  });
});
