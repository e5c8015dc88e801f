// .npy files per participant (through a template) and an N × N × S .npy stack,
// written by numpy's own np.save (test/fixtures/npy/make_npy_cohort.py, numpy
// version in cohort.json), read to exactly the edge data of the same cohort as
// plain text (test/fixtures/npz/text/, each value as Python's repr).
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { loadConnectomes, type ConnectomeOptions, type ConnectomeSubject } from "../../../src/io/connectomes.js";
import { loadFixture } from "../../helpers/fixtures.js";

const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), "../../fixtures");
const cohort = loadFixture<{ numpy_version: string; participants: string[] }>("npy/cohort.json");
const subjects: ConnectomeSubject[] = cohort.participants.map((id, tableRow) => ({ id, tableRow, values: { participant_id: id } }));
const PLAIN: ConnectomeOptions = { symmetrize: false, asymmetryTolerance: 1e-9, transform: "none" };
const text = loadConnectomes({ kind: "template", template: "npz/text/{participant_id}.txt", baseDir: FIXTURES }, subjects, PLAIN);

describe("NumPy .npy per participant and N × N × S (numpy np.save)", () => {
  it("one .npy per participant through a template (C order, Fortran order, big-endian) equals the text cohort", () => {
    const loaded = loadConnectomes({ kind: "template", template: "npy/cohort/{participant_id}.npy", baseDir: FIXTURES }, subjects, PLAIN);
    expect(Array.from(loaded.data)).toEqual(Array.from(text.data)); // same doubles as numpy wrote them
    expect(loaded.reading).toMatchObject({ reader: "NumPy .npy", shape: [5, 5] });
  });
  it("an N × N × S stack is read with participants on the last axis, from its shape alone", () => {
    const loaded = loadConnectomes({ kind: "file", path: join(FIXTURES, "npy/stack/cohort_last.npy") }, subjects, { ...PLAIN, participantRowCount: 6 });
    expect(Array.from(loaded.data)).toEqual(Array.from(text.data));
    expect(loaded.reading).toMatchObject({ reader: "NumPy .npy", shape: [5, 5, 6], subjectsAxis: "last" });
  });
});
