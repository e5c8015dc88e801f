// The participants × edges table (src/io/edgeTable.ts, edgeColumnNames.ts): values and labels against
// tables written by Python's csv module (test/fixtures/text/make_text.py, version in expected.json), read
// through loadConnectomes and compared with the same cohort's plain text matrices; every naming rule and
// every error.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { describeReading } from "../../../src/io/arrays/describeReading.js";
import { loadConnectomes, type ConnectomeOptions, type ConnectomeSubject } from "../../../src/io/connectomes.js";
import { edgeColumns } from "../../../src/io/edgeColumnNames.js";
import { loadEdgeTable } from "../../../src/io/edgeTable.js";
import { expectInputError } from "./inputErrorAssertions.js";

const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), "../../fixtures/text");
const expected = JSON.parse(readFileSync(join(FIXTURES, "expected.json"), "utf8")) as {
  writer: string;
  labels: string[];
  participants: string[];
  matrices: Record<string, number[][]>;
  regions_shuffled: string[];
};
const PLAIN: ConnectomeOptions = { symmetrize: false, asymmetryTolerance: 0, transform: "none" };
const FISHER: ConnectomeOptions = { ...PLAIN, transform: "fisher-z" };
const subjects: ConnectomeSubject[] = expected.participants.map((id, row) => ({ id, tableRow: row, values: { participant_id: id } }));
const plainCohort = () => loadConnectomes({ kind: "template", template: "cohort/plain/{participant_id}.tsv", baseDir: FIXTURES }, subjects, PLAIN);
const table = (name: string, options: ConnectomeOptions = PLAIN, who: ConnectomeSubject[] = subjects) =>
  loadConnectomes({ kind: "file", path: join(FIXTURES, name) }, who, options);

function expectSameValues(actual: ArrayLike<number>, wanted: ArrayLike<number>, input: string): void {
  expect(actual.length, `${input}: length`).toBe(wanted.length);
  for (let k = 0; k < wanted.length; k++) {
    if (!Object.is(actual[k], wanted[k])) {
      throw new Error(`${input}[${k}]: expected ${wanted[k]}, actual ${actual[k]}, difference ${actual[k] - wanted[k]}, tolerance 0 (exact)`);
    }
  }
}

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "plexus-edge-table-"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A table written from inline text into the test's folder. */
function written(name: string, text: string): string {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
}

describe(`participants × edges tables written by ${expected.writer} (test/fixtures/text/make_text.py)`, () => {
  it("columns named by label pairs, in any order, matched to a regions table: the plain cohort's edges exactly", () => {
    const loaded = table("edges_by_label.csv", { ...PLAIN, regionTable: { labels: expected.labels, file: "regions.tsv" } });
    // Source: the same values Python wrote into cohort/plain/*.tsv, read by the matrix reader.
    expectSameValues(loaded.data, plainCohort().data, "edges_by_label.csv");
    expect(loaded.reading).toEqual({
      reader: "text table, participants × edges (comma-separated)",
      shape: [7, 10],
      labels: "regions table, matched to the file's labels",
    });
    expect(loaded.labels).toBeUndefined();
    expect(loaded.files).toEqual([join(FIXTURES, "edges_by_label.csv")]);
    expect(loaded.sha256?.[0]).toMatch(/^[0-9a-f]{64}$/);
  });

  it("the same table with a regions table in another order gives the edges in that order (Python's matrices taken in the table's order)", () => {
    const loaded = table("edges_by_label.csv", { ...PLAIN, regionTable: { labels: expected.regions_shuffled, file: "regions.tsv" } });
    const order = expected.regions_shuffled.map((label) => expected.labels.indexOf(label));
    const wanted: number[] = [];
    for (let i = 0; i < 5; i++) for (let j = i + 1; j < 5; j++) for (const id of expected.participants) wanted.push(expected.matrices[id][order[i]][order[j]]);
    expectSameValues(loaded.data, wanted, "reordered");
  });

  it("columns in plexus's edge order named by label pairs, without a regions table: the labels are read from the names", () => {
    const loaded = table("edges_in_order.tsv");
    expectSameValues(loaded.data, plainCohort().data, "edges_in_order.tsv");
    expect(loaded.labels).toEqual(expected.labels);
    expect(describeReading(loaded.reading)).toBe("text table, participants × edges (tab-separated), 6 × 10; labels from the file");
  });

  it("columns numbered 1-2, 1-3, …: the labels are the numbers", () => {
    const loaded = table("edges_numbered.csv");
    expectSameValues(loaded.data, plainCohort().data, "edges_numbered.csv");
    expect(loaded.labels).toEqual(["1", "2", "3", "4", "5"]);
  });

  it("reads only the participants analysed, in their order, whatever the rows' order", () => {
    const some = [subjects[4], subjects[1]];
    const loaded = table("edges_in_order.tsv", PLAIN, some);
    const wanted: number[] = [];
    for (let i = 0; i < 5; i++) for (let j = i + 1; j < 5; j++) for (const s of some) wanted.push(expected.matrices[s.id][i][j]);
    expectSameValues(loaded.data, wanted, "two participants");
  });

  it("fisher-z maps each value r to atanh(r), as for matrices (reference: Fisher 1915, z = ½ ln((1 + r) / (1 − r)), within 1e-14 absolute, which the log form's rounding needs near 0)", () => {
    const loaded = table("edges_in_order.tsv", FISHER);
    const matrices = loadConnectomes({ kind: "template", template: "cohort/plain/{participant_id}.tsv", baseDir: FIXTURES }, subjects, FISHER);
    expectSameValues(loaded.data, matrices.data, "table against matrices, both fisher-z");
    const plain = plainCohort().data;
    for (let k = 0; k < plain.length; k++) {
      const r = plain[k];
      const z = 0.5 * Math.log((1 + r) / (1 - r));
      const tolerance = 1e-14;
      if (!(Math.abs(loaded.data[k] - z) <= tolerance)) {
        throw new Error(`r = ${r}: expected ${z}, actual ${loaded.data[k]}, difference ${loaded.data[k] - z}, tolerance ${tolerance}`);
      }
    }
  });
});

describe("edge column names", () => {
  const place = { file: "t.csv", line: 1 };
  it("with a regions table: any joint character, either order, spaces around the joint", () => {
    const columns = edgeColumns(["b | a", "c_a", "b—c"], place, { labels: ["a", "b", "c"], file: "r.tsv" });
    expect(Array.from(columns.edgeOfColumn)).toEqual([0, 1, 2]);
  });

  it("with a regions table: a name with two readings, none, the same region twice, an edge twice, an edge missing", () => {
    const regions = { labels: ["a", "a_b", "b_c", "c"], file: "r.tsv" };
    expectInputError(() => edgeColumns(["a_b_c"], place, regions), { file: "t.csv", line: 1, column: 2, message: ["can be read as 'a' and 'b_c', or 'a_b' and 'c'"] });
    const three = { labels: ["a", "b", "c"], file: "r.tsv" };
    expectInputError(() => edgeColumns(["a~b", "a+c", "b~c"], place, three), { file: "t.csv", line: 1, column: 3, message: ["'a+c' does not name two regions of the regions table (r.tsv)"] });
    expectInputError(() => edgeColumns(["a~a", "a~c", "b~c"], place, three), { file: "t.csv", line: 1, column: 2, message: ["names the region 'a' twice"] });
    expectInputError(() => edgeColumns(["a~b", "b-a", "b~c"], place, three), { file: "t.csv", line: 1, column: 3, message: ["same edge as column 2 ('a~b')"] });
    expectInputError(() => edgeColumns(["a~b", "b~c"], place, three), { file: "t.csv", line: 1, message: ["no column for 1 of the 3 edges", "'a' – 'c'"] });
  });

  it("without one: labels read from names in edge order, with joints inside labels", () => {
    const columns = edgeColumns(["left_a~left_b", "left_a~right c", "left_b~right c"], place);
    expect(columns.labels).toEqual(["left_a", "left_b", "right c"]);
    expect(Array.from(columns.edgeOfColumn)).toEqual([0, 1, 2]);
  });

  it("without one: a count that is no N(N−1)/2, another order, an ambiguous reading, no joint", () => {
    expectInputError(() => edgeColumns(["a-b", "a-c"], place), { file: "t.csv", line: 1, message: ["2 edge columns, which is no count N(N−1)/2"] });
    expectInputError(() => edgeColumns(["a-b", "b-c", "a-c"], place), { file: "t.csv", line: 1, column: 3, message: ["'b-c' (edge column 2 of 3) does not fit plexus's edge order"] });
    expectInputError(() => edgeColumns(["a-b", "a-c", "c-b"], place), { file: "t.csv", line: 1, column: 4, message: ["'c-b'", "expected 'b' and 'c' joined"] });
    expectInputError(() => edgeColumns(["x_y_z"], place), { file: "t.csv", line: 1, column: 2, message: ["can be read in 2 ways"] });
    expectInputError(() => edgeColumns(["xyz"], place), { file: "t.csv", line: 1, column: 2, message: ["does not join two region labels"] });
  });
});

describe("a participants × edges table that breaks the rules is an InputError naming file, line and column", () => {
  const header = "participant_id\ta-b\ta-c\tb-c\n";
  const load = (text: string, options: ConnectomeOptions = PLAIN, who = subjects.slice(0, 2)) => loadEdgeTable(written("t.tsv", text), who, options);

  it("a participant with no row, and rows of others ignored (their cells unread)", () => {
    const error = expectInputError(() => load(header + "sub-01\t0.1\t0.2\t0.3\nsub-77\tn/a\t\tx\n"), {
      file: join(dir, "t.tsv"),
      message: ["participant 'sub-02' has no row"],
    });
    expect(error.problems).toHaveLength(1);
  });

  it("an empty, non-numeric, non-finite or missing-code cell of a participant analysed, all at once", () => {
    const error = expectInputError(() => load(header + "sub-01\t\tabc\t1e999\nsub-02\tn/a\t0.1\tNaN\n"), {
      file: join(dir, "t.tsv"),
      line: 2,
      column: 2,
      message: ["the cell '' of edge 'a-b' is empty"],
    });
    expect(error.format()).toContain("t.tsv:2:3: the cell 'abc' of edge 'a-c' is not a number");
    expect(error.format()).toContain("t.tsv:2:4: the cell '1e999' of edge 'b-c' is not finite");
    expect(error.format()).toContain("t.tsv:3:2: the cell 'n/a' of edge 'a-b' is not a number");
    expect(error.format()).toContain("t.tsv:3:4: the cell 'NaN' of edge 'b-c' is not a number");
  });

  it("a row with too few cells, a repeated ID, an empty ID", () => {
    const error = expectInputError(() => load(header + "sub-01\t0.1\t0.2\nsub-02\t0.1\t0.2\t0.3\nsub-02\t0.1\t0.2\t0.3\n\t1\t2\t3\n"), {
      file: join(dir, "t.tsv"),
      line: 2,
      message: ["expected 4 cells (as in the header on line 1) but found 3"],
    });
    expect(error.format()).toContain("t.tsv:4:1: participant 'sub-02' has a second row here (the first is on line 3)");
    expect(error.format()).toContain("t.tsv:5:1: the participant ID (first cell) is empty");
  });

  it("fisher-z on a value of ±1 or beyond", () => {
    expectInputError(() => load(header + "sub-01\t1\t0.2\t0.3\nsub-02\t0.1\t0.2\t-0.3\n", FISHER), {
      file: join(dir, "t.tsv"),
      line: 2,
      column: 2,
      message: ["'1' of edge 'a-b' is not strictly between -1 and 1"],
    });
  });

  it("a header with one column, an empty, repeated or unsafe name; an empty file", () => {
    expectInputError(() => load("participant_id\nsub-01\n"), { file: join(dir, "t.tsv"), line: 1, message: ["header has one column"] });
    const error = expectInputError(() => load("participant_id\ta-b\t\ta-b\ta\u001bc\n"), { file: join(dir, "t.tsv"), line: 1, column: 3, message: ["column 3 of the header has no name"] });
    expect(error.format()).toContain("t.tsv:1:4: the column name 'a-b' appears twice (also column 2)");
    expect(error.format()).toContain("t.tsv:1:5: the column name 'a\\x1bc' has a control character");
    expectInputError(() => load("\n  \n"), { file: join(dir, "t.tsv"), line: 1, message: ["empty"] });
  });

  it("quoted cells: a name holding the separator, a quoted number", () => {
    const loaded = loadEdgeTable(written("q.csv", 'id,"a, x~b"\nsub-01,"0.25"\n'), [subjects[0]], { ...PLAIN, regionTable: { labels: ["a, x", "b"], file: "r.tsv" } });
    expect(Array.from(loaded.data)).toEqual([0.25]);
    // Without a regions table the one name reads two ways ("a," + "x~b", or "a, x" + "b"): refused.
    expectInputError(() => loadEdgeTable(join(dir, "q.csv"), [subjects[0]], PLAIN), { file: join(dir, "q.csv"), line: 1, column: 2, message: ["can be read in 2 ways"] });
  });

  it("bytes that are not text are named", () => {
    expectInputError(() => load("participant_id\ta-b\nsub-01\t0.\u00001\n"), { file: join(dir, "t.tsv"), line: 2, message: ["binary data (a NUL byte on line 2)"] });
  });

  it("variable or subjects_axis given for a text table", () => {
    const path = written("v.tsv", header + "sub-01\t0.1\t0.2\t0.3\n");
    expectInputError(() => loadConnectomes({ kind: "file", path, choice: { variable: "conn" } }, [subjects[0]], PLAIN), {
      file: path,
      key: "connectomes.variable",
      message: ["participants × edges table, which has no variables"],
    });
  });
});
