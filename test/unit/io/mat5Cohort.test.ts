import { readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { edgePairs } from "../../../src/edges/edgeIndex.js";
import { loadConnectomes, type ConnectomeOptions, type ConnectomeSource, type ConnectomeSubject } from "../../../src/io/connectomes.js";
import { expectInputError } from "./inputErrorAssertions.js";

/**
 * The invented cohort of test/fixtures/mat5/cohort (6 participants, 5 regions),
 * read through loadConnectomes from .mat stacks in both axis orders and from
 * one .mat file per participant, written by SciPy and by GNU Octave, must give
 * exactly the edge data of the same matrices as text (make_mat5.py writes the
 * text with Python's repr, so it holds the same doubles), and those equal
 * NumPy's matrices in expected.json.
 */
const COHORT = join(dirname(fileURLToPath(import.meta.url)), "../../fixtures/mat5/cohort");
const expected = JSON.parse(readFileSync(join(COHORT, "../expected.json"), "utf8")) as {
  cohort: { participants: string[]; regions: number; matrices: number[][] };
};
const PLAIN: ConnectomeOptions = { symmetrize: false, asymmetryTolerance: 1e-9, transform: "none", participantRowCount: 6 };
const subjects: ConnectomeSubject[] = expected.cohort.participants.map((id, tableRow) => ({ id, tableRow, values: { participant_id: id } }));

function load(source: ConnectomeSource, who = subjects) {
  return loadConnectomes(source, who, PLAIN);
}

function expectIdentical(actual: Float64Array, wanted: Float64Array, input: string): void {
  expect(actual.length, `${input}: length`).toBe(wanted.length);
  for (let k = 0; k < wanted.length; k++) {
    if (!Object.is(actual[k], wanted[k])) {
      throw new Error(`${input}[${k}]: expected ${wanted[k]}, actual ${actual[k]}, difference ${actual[k] - wanted[k]}, tolerance 0 (identical bits)`);
    }
  }
}

const text = load({ kind: "template", template: "{participant_id}.txt", baseDir: COHORT });

describe("a cohort saved as .mat reads exactly as the same cohort saved as text", () => {
  it("the text matrices are NumPy's (source: expected.json, written by make_mat5.py from numpy arrays)", () => {
    const n = expected.cohort.regions;
    const { edgeCount, regionA, regionB } = edgePairs(n);
    const wanted = new Float64Array(edgeCount * subjects.length);
    for (let e = 0; e < edgeCount; e++) {
      for (let s = 0; s < subjects.length; s++) wanted[e * subjects.length + s] = expected.cohort.matrices[s][regionA[e] * n + regionB[e]];
    }
    expectIdentical(text.data, wanted, "text cohort");
  });

  it.each([
    ["scipy_stack_nns.mat", { variable: "conn" }, [5, 5, 6], "last", "MATLAB 5 .mat (compressed)"],
    ["scipy_stack_snn.mat", { variable: "conn" }, [6, 5, 5], "first", "MATLAB 5 .mat (compressed)"],
    ["scipy_stack_snn.mat", {}, [6, 5, 5], "first", "MATLAB 5 .mat (compressed)"], // its other variable is text, never a candidate
    ["octave_stack_nns.mat", { variable: "conn" }, [5, 5, 6], "last", "MATLAB 5 .mat (compressed)"], // Octave save -v7
    ["octave_stack_snn.mat", {}, [6, 5, 5], "first", "MATLAB 5 .mat"], // Octave save -v6
  ] as const)("the stack %s (choice %j)", (file, choice, shape, axis, reader) => {
    const loaded = load({ kind: "file", path: join(COHORT, file), choice });
    expectIdentical(loaded.data, text.data, file);
    expect(loaded.reading).toEqual({ reader, variable: "conn", shape, subjectsAxis: axis, labels: "numbered 1 … N" });
  });

  it.each([
    ["{participant_id}.mat", { variable: "conn" }, "MATLAB 5 .mat"], // SciPy savemat
    ["octave/{participant_id}.mat", {}, "MATLAB 5 .mat (compressed)"], // Octave save -v7
  ])("one file per participant, %s (choice %j)", (template, choice, reader) => {
    const loaded = load({ kind: "template", template, baseDir: COHORT, choice });
    expectIdentical(loaded.data, text.data, template);
    expect(loaded.files).toHaveLength(6);
    expect(loaded.reading).toEqual({ reader, variable: "conn", shape: [5, 5], labels: "numbered 1 … N" });
  });

  it("a stack read for some participants only gives their matrices", () => {
    const two = [subjects[4], subjects[1]];
    const fromStack = load({ kind: "file", path: join(COHORT, "scipy_stack_nns.mat") }, two);
    const fromText = load({ kind: "template", template: "{participant_id}.txt", baseDir: COHORT }, two);
    expectIdentical(fromStack.data, fromText.data, "participants 5 and 2");
  });

  it("a variable the stack lacks is an error listing what it holds", () => {
    const path = join(COHORT, "scipy_stack_snn.mat");
    expectInputError(() => load({ kind: "file", path, choice: { variable: "connectivity" } }), {
      file: path,
      key: "connectomes.variable",
      message: ["MATLAB 5 .mat (compressed) file has no variable 'connectivity'", "it holds conn (6 × 5 × 5 double), note (1 × 15 char)"],
    });
  });

  it("the text variable, chosen, is refused as not numeric", () => {
    const path = join(COHORT, "scipy_stack_snn.mat");
    expectInputError(() => load({ kind: "file", path, choice: { variable: "note" } }), {
      file: path,
      key: "connectomes.variable",
      message: ["variable note (1 × 15 char) is not a numeric array"],
    });
  });
});
