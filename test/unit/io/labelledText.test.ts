// Labelled text matrices (src/io/matrixTextLayout.ts, matrixTextLabels.ts, matrixText.ts, textLabelPlan.ts):
// values and labels against files written by Python's csv module (test/fixtures/text/make_text.py, which
// records its version in expected.json), every error of the header / label-column rule, the byte reader
// against the text reader, loading a cohort end to end, and binary files met on the text path.
import { Buffer } from "node:buffer";
import { copyFileSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import fc from "fast-check";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { InputError } from "../../../src/errors.js";
import { describeReading } from "../../../src/io/arrays/describeReading.js";
import { loadConnectomes, type ConnectomeOptions, type ConnectomeSubject } from "../../../src/io/connectomes.js";
import { parallelLoading } from "../../../src/io/matrixBlocks.js";
import { parseMatrixBytes, parseMatrixText, type ParsedMatrixText } from "../../../src/io/matrixText.js";
import { encodeNpy } from "../../../src/io/npy.js";
import { parseMatrixFile } from "../../../src/io/textMatrixFile.js";
import { expectInputError } from "./inputErrorAssertions.js";

const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), "../../fixtures/text");
interface Expected {
  writer: string;
  labels: string[];
  participants: string[];
  matrices: Record<string, number[][]>;
  files: Record<string, { participant: string; labels: string[] }>;
  regions_shuffled: string[];
}
const expected = JSON.parse(readFileSync(join(FIXTURES, "expected.json"), "utf8")) as Expected;
const PLAIN: ConnectomeOptions = { symmetrize: false, asymmetryTolerance: 0, transform: "none" };

/** Bit-exact comparison (tolerance 0) printing the input, expected, actual and difference on failure. */
function expectSameValues(actual: ArrayLike<number>, wanted: ArrayLike<number>, input: string): void {
  expect(actual.length, `${input}: length`).toBe(wanted.length);
  for (let k = 0; k < wanted.length; k++) {
    if (!Object.is(actual[k], wanted[k])) {
      throw new Error(`${input}[${k}]: expected ${wanted[k]}, actual ${actual[k]}, difference ${actual[k] - wanted[k]}, tolerance 0 (exact)`);
    }
  }
}

const rowMajor = (m: number[][]): number[] => m.flat();
const bytesOf = (text: string): Uint8Array => Buffer.from(text, "utf8");

/** The same result (labels included) or the same InputError from the byte reader and the text reader. */
function bothReaders(text: string, file = "m.csv"): ParsedMatrixText {
  let fromText: ParsedMatrixText | InputError;
  let fromBytes: ParsedMatrixText | InputError;
  try {
    fromText = parseMatrixText(text, file, { allowNonFiniteDiagonal: true });
  } catch (error) {
    if (!(error instanceof InputError)) throw error;
    fromText = error;
  }
  try {
    fromBytes = parseMatrixBytes(bytesOf(text), file, { allowNonFiniteDiagonal: true });
  } catch (error) {
    if (!(error instanceof InputError)) throw error;
    fromBytes = error;
  }
  const show = (r: ParsedMatrixText | InputError): string =>
    r instanceof InputError
      ? `InputError ${JSON.stringify([r.message, r.location, r.hint])}`
      : JSON.stringify({ size: r.size, values: Array.from(r.values, String), rowLines: r.rowLines, labels: r.labels ?? null });
  expect(show(fromBytes), `input ${JSON.stringify(text)}: parseMatrixBytes (actual) against parseMatrixText (reference)`).toBe(show(fromText));
  if (fromText instanceof InputError) throw fromText;
  return fromText;
}

describe(`labelled matrices written by ${expected.writer} (test/fixtures/text/make_text.py)`, () => {
  it.each(Object.keys(expected.files))("%s: its labels and every value", (name) => {
    const entry = expected.files[name];
    const matrix = parseMatrixFile(readFileSync(join(FIXTURES, name)), name, {});
    expect(matrix.labels?.names).toEqual(entry.labels);
    // Source: the values Python wrote (repr, exact), kept in expected.json.
    expectSameValues(matrix.values, rowMajor(expected.matrices[entry.participant]), name);
    bothReaders(readFileSync(join(FIXTURES, name), "utf8"), name);
  });

  it.each(expected.participants)("%s: its pandas-style .csv and its plain .tsv hold the same matrix", (id) => {
    const labelled = parseMatrixFile(readFileSync(join(FIXTURES, `cohort/pandas/${id}.csv`)), id, {});
    const plain = parseMatrixFile(readFileSync(join(FIXTURES, `cohort/plain/${id}.tsv`)), id, {});
    expect(labelled.labels?.names).toEqual(expected.labels);
    expect(labelled.labels?.layout).toBe("comma-separated, header row and label column");
    expect(plain.labels).toBeUndefined();
    expectSameValues(labelled.values, rowMajor(expected.matrices[id]), `pandas ${id}`);
    expectSameValues(plain.values, rowMajor(expected.matrices[id]), `plain ${id}`);
  });

  it("the layouts are told apart as the rule says", () => {
    const layout = (name: string): string | undefined => parseMatrixFile(readFileSync(join(FIXTURES, name)), name, {}).labels?.layout;
    expect(layout("header_only.csv")).toBe("comma-separated, header row");
    expect(layout("label_column.tsv")).toBe("tab-separated, label column");
    expect(layout("quoted_labels.csv")).toBe("comma-separated, header row and label column");
    expect(layout("numeric_labels.csv")).toBe("comma-separated, header row and label column");
  });
});

describe("the header row and label column rule (byte reader checked against the text reader)", () => {
  const values = [1, 0.5, 0.5, 1];
  it.each([
    ["a header of labels, space-separated", "a b\n1 0.5\n0.5 1\n", ["a", "b"], [2, 3]],
    ["a label column, whitespace-separated", "a 1 0.5\nb 0.5 1\n", ["a", "b"], [1, 2]],
    ["both, with a text corner cell", "region,a,b\na,1,0.5\nb,0.5,1\n", ["a", "b"], [2, 3]],
    ["both, with an empty corner cell (pandas)", ",a,b\na,1,0.5\nb,0.5,1\n", ["a", "b"], [2, 3]],
    ["both, header without a corner cell", "a\tb\na\t1\t0.5\nb\t0.5\t1\n", ["a", "b"], [2, 3]],
    ["a tab-separated file with an empty corner and labels holding spaces", "\tleft lobe\tright lobe\nleft lobe\t1\t0.5\nright lobe\t0.5 \t 1\n", ["left lobe", "right lobe"], [2, 3]],
    ["quoted labels holding the separator and a quote", '"x, y","say ""hi"""\n1,0.5\n0.5,1\n', ["x, y", 'say "hi"'], [2, 3]],
    ["quoted labels in a whitespace-separated file", '"left lobe" "right lobe"\n"left lobe" 1 0.5\n"right lobe" 0.5 1\n', ["left lobe", "right lobe"], [2, 3]],
    ["labels that are numbers, under an empty corner", ",7,8\n7,1,0.5\n8,0.5,1\n", ["7", "8"], [2, 3]],
    ["every label quoted under a quoted empty corner (R's write.csv)", '"","a","b"\n"a",1,0.5\n"b",0.5,1\n', ["a", "b"], [2, 3]],
    ["a quoted label that is a number", '"7" 1 0.5\n"8" 0.5 1\n', ["7", "8"], [1, 2]],
    ["labels trimmed, blank lines, CRLF and a byte-order mark", "\uFEFF\r\n ,  a ,b \r\n\r\n a ,1,0.5\r\nb,0.5,1\r\n", ["a", "b"], [4, 5]],
  ])("%s", (_name, text, labels, rowLines) => {
    const matrix = bothReaders(text);
    expect(matrix.labels?.names).toEqual(labels);
    expect(matrix.rowLines).toEqual(rowLines);
    expectSameValues(matrix.values, values, text);
  });

  it("a plain matrix has no labels, nan and inf words included", () => {
    const matrix = bothReaders("nan 1\n1 -inf\n");
    expect(matrix.labels).toBeUndefined();
    expect(bothReaders("1,2\n3,4\n").labels).toBeUndefined();
  });

  it("labels sit at their header cells, or at their rows' first cells", () => {
    expect(bothReaders(",a,b\na,1,0.5\nb,0.5,1\n").labels?.places).toEqual([
      { line: 1, column: 2 },
      { line: 1, column: 3 },
    ]);
    expect(bothReaders("\na 1 0.5\n\nb 0.5 1\n").labels?.places).toEqual([
      { line: 2, column: 1 },
      { line: 4, column: 1 },
    ]);
  });

  it("random labelled matrices in random layouts read the same with either reader", () => {
    const shape = fc.record({
      size: fc.integer({ min: 1, max: 4 }),
      separator: fc.constantFrom(",", "\t", " ", " , ", "  \t"),
      header: fc.constantFrom("none", "labels", "corner", "empty corner"),
      labelColumn: fc.boolean(),
      quote: fc.boolean(),
      eol: fc.constantFrom("\n", "\r\n"),
    });
    const label = fc.constantFrom("a", "b", "north_1", "x y", "7", "-1", "nan", "", "q\"r", "é", "a,b", "a\tb");
    const cell = fc.constantFrom("1", "0.5", "-2e-3", "x", "", "nan");
    fc.assert(
      fc.property(shape, fc.array(label, { minLength: 4, maxLength: 4 }), fc.array(cell, { minLength: 16, maxLength: 16 }), (s, labels, cells) => {
        const q = (text: string): string => (s.quote ? `"${text.replace(/"/g, '""')}"` : text);
        const lines: string[] = [];
        const names = labels.slice(0, s.size).map(q);
        if (s.header === "labels") lines.push(names.join(s.separator));
        if (s.header === "corner") lines.push(["region", ...names].join(s.separator));
        if (s.header === "empty corner") lines.push(["", ...names].join(s.separator));
        for (let i = 0; i < s.size; i++) {
          const row = cells.slice(i * s.size, (i + 1) * s.size);
          lines.push((s.labelColumn ? [names[i], ...row] : row).join(s.separator));
        }
        const text = lines.join(s.eol) + s.eol;
        try {
          bothReaders(text);
        } catch (error) {
          if (!(error instanceof InputError)) throw error;
        }
      }),
      { numRuns: 3000 },
    );
  });
});

describe("a file that breaks the rule is an InputError that explains it", () => {
  it("a first line mixing text and numbers (a typo in a plain matrix)", () => {
    const error = expectInputError(() => bothReaders("0.1,0.2x,0.3\n0.2,1,0.4\n0.3,0.4,1\n"), {
      file: "m.csv",
      line: 1,
      column: 2,
      message: ["'0.2x'", "read as a header row", "'0.1') is a number"],
    });
    expect(error.hint).toMatch(/correct cell 2/);
  });

  it("a header whose count fits no layout", () => {
    expectInputError(() => bothReaders("a,b,c\n1,0.5\n0.5,1\n"), {
      file: "m.csv",
      line: 1,
      message: ["header row has 3 cells but the rows hold 2 numbers", "2 labels"],
    });
    expectInputError(() => bothReaders("r,a,b,c\na,1,0.5\nb,0.5,1\n"), {
      file: "m.csv",
      line: 1,
      message: ["header row has 4 cells", "after their label", "a corner cell and 2 labels"],
    });
  });

  it("a header row and a label column naming other regions, or another order", () => {
    expectInputError(() => bothReaders(",a,b\nb,1,0.5\na,0.5,1\n"), {
      file: "m.csv",
      line: 2,
      column: 1,
      message: ["row 1 is labelled 'b'", "column 1 of the header (line 1, cell 2) is 'a'", "same regions in the same order"],
    });
  });

  it("a number where a label is expected, saying why a label is", () => {
    expectInputError(() => bothReaders("a 1 0.5\n0.5 0.5 1\n"), {
      file: "m.csv",
      line: 2,
      column: 1,
      message: ["row 2 begins with '0.5', a number, where its label is expected", "line 1 begins with 'a', which is not a number"],
    });
  });

  it("a label where a number is expected, saying why no label is", () => {
    expectInputError(() => bothReaders("1 0.5\nL_Visual_1 0.5 1\n"), {
      file: "m.csv",
      line: 2,
      column: 1,
      message: ["'L_Visual_1'", "not a number", "the first row (line 1) begins with a number, so the file has no label column"],
    });
  });

  it("empty, repeated and unsafe labels, all at once", () => {
    const error = expectInputError(() => bothReaders(",a,,a,b\x1b\nx,1,0,0,0\ny,0,1,0,0\nz,0,0,1,0\nw,0,0,0,1\n"), {
      file: "m.csv",
      line: 1,
      column: 3,
      message: ["header cell 2 is empty"],
    });
    expect(error.format()).toMatch(/m\.csv:1:4: the region label 'a' appears twice \(also at line 1, column 2\)/);
    expect(error.format()).toMatch(/m\.csv:1:5: region label 'b\\x1b' has a control character/);
    expectInputError(() => bothReaders(",a,b\n,1,0.5\nb,0.5,1\n"), { file: "m.csv", line: 2, column: 1, message: ["row 1 has an empty first cell where its label is expected", "header row's first cell (line 1) is empty"] });
    expectInputError(() => bothReaders("a 1 0.5\na 0.5 1\n"), { file: "m.csv", line: 2, column: 1, message: ["'a' appears twice"] });
  });

  it("quotes left open or followed by text", () => {
    expectInputError(() => bothReaders('"a,b\n1,2\n'), { file: "m.csv", line: 1, column: 1, message: ["does not close"] });
    expectInputError(() => bothReaders('"a"x,b\n1,2\n3,4\n'), { file: "m.csv", line: 1, column: 1, message: ["text after its closing double quote"] });
  });

  it("a header with no rows below it, and a label with no numbers after it", () => {
    expectInputError(() => bothReaders("a,b\n\n"), { file: "m.csv", line: 1, message: ["header row is followed by no rows of numbers"] });
    expectInputError(() => bothReaders("a 1 0.5\nb\n"), { file: "m.csv", line: 2, column: 2, message: ["label 'b' but no numbers"] });
  });

  it("a labelled matrix that is not square says so below its header", () => {
    expectInputError(() => bothReaders("a,b,c\n1,0.5,0\n0.5,1,0\n"), { file: "m.csv", line: 3, message: ["2 rows of 3 values", "below the header row on line 1"] });
    expectInputError(() => bothReaders(",a,b\na,1,0.5\nb,0.5\n"), { file: "m.csv", line: 3, column: 3, message: ["1 values after its label, expected 2"] });
  });

  it("labels that are numbers the rule cannot see (tab-separated, unquoted) get a hint", () => {
    expectInputError(() => bothReaders("\t1\t2\n1\t1\t0.5\n2\t0.5\t1\n"), {
      file: "m.csv",
      line: 2,
      column: 3,
      message: ["row 2 has more than 2 values"],
      hint: /labels that are numbers, put them in double quotes/,
    });
  });

  it("a bad number in a labelled row is located at its file column", () => {
    expectInputError(() => bothReaders(",a,b\na,1,0.5\nb,oops,1\n"), { file: "m.csv", line: 3, column: 2, message: ["'oops' at row 2, column 1 is not a number"] });
  });
});

describe("binary files on the text path", () => {
  const npy = encodeNpy([2, 2], new Float64Array([1, 0.5, 0.5, 1]));
  const mat = Buffer.concat([Buffer.from("MATLAB 5.0 MAT-file, Platform: invented".padEnd(124, " "), "latin1"), Buffer.from([0, 1, 0x49, 0x4d]), Buffer.alloc(64)]);
  const hdf5 = Buffer.concat([Buffer.from([0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a]), Buffer.alloc(64)]);
  const zip = Buffer.concat([Buffer.from([0x50, 0x4b, 0x03, 0x04]), Buffer.alloc(64)]);
  it.each([
    ["a NumPy .npy array", npy],
    ["a MATLAB .mat file", mat],
    ["an HDF5 file", hdf5],
    ["a zip archive", zip],
  ])("%s is named, never quoted as a cell", (format, bytes) => {
    const error = expectInputError(() => parseMatrixFile(bytes, "m.txt", {}), { file: "m.txt", message: [`this file is ${format}`, "not a text matrix"] });
    expect(error.hint).toMatch(/first participant's file decides how every file is read/);
    expect(error.message).not.toMatch(/cell/);
  });

  it("a NUL byte, and bytes that are not UTF-8 in a label, are named with their line", () => {
    expectInputError(() => parseMatrixFile(bytesOf("1 2\n3 \u00004\n"), "m.txt", {}), { file: "m.txt", line: 2, message: ["binary data", "NUL byte on line 2"] });
    const latin1Label = Buffer.concat([Buffer.from("a 1 0.5\nb"), Buffer.from([0xe9]), Buffer.from(" 0.5 1\n")]);
    expectInputError(() => parseMatrixFile(latin1Label, "m.txt", {}), { file: "m.txt", line: 2, message: ["not valid UTF-8"] });
  });
});

describe("loadConnectomes: a cohort of labelled text matrices", () => {
  let dir: string;
  const subjects: ConnectomeSubject[] = expected.participants.map((id, row) => ({ id, tableRow: row, values: { participant_id: id } }));
  const shuffledTable = { labels: expected.regions_shuffled, file: join(FIXTURES, "regions_shuffled.tsv") };
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), "plexus-labelled-text-"));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  const saved = { ...parallelLoading };
  afterEach(() => Object.assign(parallelLoading, saved));

  const load = (folder: string, extension: string, options: ConnectomeOptions = PLAIN, base = FIXTURES) =>
    loadConnectomes({ kind: "template", template: `${folder}/{participant_id}.${extension}`, baseDir: base }, subjects, options);

  /** A copy of the pandas cohort in a temporary folder, with some files changed. */
  function cohortCopy(name: string, change: Record<string, string | Uint8Array> = {}): string {
    const folder = join(dir, name);
    mkdirSync(folder, { recursive: true });
    for (const id of expected.participants) copyFileSync(join(FIXTURES, `cohort/pandas/${id}.csv`), join(folder, `${id}.csv`));
    for (const [id, content] of Object.entries(change)) writeFileSync(join(folder, `${id}.csv`), content);
    return folder;
  }

  it("gives exactly the edge data of the plain-text cohort, and the files' labels", () => {
    const labelled = load("cohort/pandas", "csv");
    const plain = load("cohort/plain", "tsv");
    expectSameValues(labelled.data, plain.data, "labelled against plain");
    expect(labelled.labels).toEqual(expected.labels);
    expect(plain.labels).toBeUndefined();
    expect(labelled.reading).toEqual({ reader: "text (comma-separated, header row and label column)", shape: [5, 5], labels: "file" });
    expect(describeReading(labelled.reading)).toBe("text (comma-separated, header row and label column), 5 × 5; labels from the file");
  });

  it("the same, bit for bit, when the worker thread reads the files (reordered to a regions table)", () => {
    const many: ConnectomeSubject[] = Array.from({ length: 40 }, (_, k) => {
      const id = expected.participants[k % 6];
      return { id, tableRow: k, values: { participant_id: id } };
    });
    const source = { kind: "template" as const, template: "cohort/pandas/{participant_id}.csv", baseDir: FIXTURES };
    const options = { ...PLAIN, regionTable: shuffledTable };
    parallelLoading.minimumBytes = Infinity;
    const oneThread = loadConnectomes(source, many, options);
    parallelLoading.minimumBytes = 0;
    parallelLoading.callingThreadLoads = false;
    const worker = loadConnectomes(source, many, options);
    expect(worker.reading.reordered).toBe(true);
    expectSameValues(worker.data, oneThread.data, "worker against one thread");
  });

  it("reorders rows and columns to a regions table in another order (checked against Python's matrices taken in the table's order)", () => {
    const loaded = load("cohort/pandas", "csv", { ...PLAIN, regionTable: shuffledTable });
    expect(loaded.reading).toEqual({
      reader: "text (comma-separated, header row and label column)",
      shape: [5, 5],
      labels: "regions table, matched to the file's labels",
      reordered: true,
    });
    expect(loaded.labels).toBeUndefined();
    const order = expected.regions_shuffled.map((label) => expected.labels.indexOf(label));
    const S = subjects.length;
    const wanted: number[] = [];
    for (let i = 0; i < 5; i++) {
      for (let j = i + 1; j < 5; j++) for (const id of expected.participants) wanted.push(expected.matrices[id][order[i]][order[j]]);
    }
    expect(wanted.length).toBe(10 * S);
    expectSameValues(loaded.data, wanted, "reordered edges");
  });

  it("with a regions table in the files' order nothing is reordered", () => {
    const loaded = load("cohort/pandas", "csv", { ...PLAIN, regionTable: { labels: expected.labels, file: "regions.tsv" } });
    expect(loaded.reading.reordered).toBeUndefined();
    expectSameValues(loaded.data, load("cohort/plain", "tsv").data, "same order");
  });

  it("a label the regions table lacks, or a table region the file lacks, is an error naming file, line and label", () => {
    const table = { labels: [...expected.labels.slice(0, 4), "invented_ridge_9"], file: "regions.tsv" };
    const error = expectInputError(() => load("cohort/pandas", "csv", { ...PLAIN, regionTable: table }), {
      file: join(FIXTURES, "cohort/pandas/sub-01.csv"),
      line: 1,
      column: 6,
      message: ["'central_fold_5' is not in the regions table (regions.tsv)"],
    });
    expect(error.format()).toMatch(/sub-01\.csv:1: the regions table \(regions\.tsv\) has the region 'invented_ridge_9', which this file does not name/);
  });

  it("files naming other labels, or another order, than the first are errors naming file and line", () => {
    const first = readFileSync(join(FIXTURES, "cohort/pandas/sub-01.csv"), "utf8");
    const swapped = first.replace("north_gyrus_1,south_sulcus_2", "south_sulcus_2,north_gyrus_1").replace(/^north_gyrus_1,/m, "TMP,").replace(/^south_sulcus_2,/m, "north_gyrus_1,").replace(/^TMP,/m, "south_sulcus_2,");
    const folder = cohortCopy("swapped", { "sub-03": swapped, "sub-05": readFileSync(join(FIXTURES, "cohort/plain/sub-05.tsv")) });
    const error = expectInputError(() => load(folder, "csv", PLAIN, "/"), {
      file: join(folder, "sub-03.csv"),
      line: 1,
      column: 2,
      message: ["region 1 is 'south_sulcus_2' here but 'north_gyrus_1' in", "same regions in the same order"],
    });
    expect(error.format()).toMatch(/sub-05\.csv: this file names no regions \(no header row, no label column\)/);
  });

  it("an asymmetric cell of a reordered file names both regions and its place in the file", () => {
    const first = readFileSync(join(FIXTURES, "cohort/pandas/sub-01.csv"), "utf8").split("\n");
    const cells = first[1].split(",");
    cells[5] = "0.125"; // row north_gyrus_1, column central_fold_5: line 2, file column 6
    first[1] = cells.join(",");
    const folder = cohortCopy("asymmetric", { "sub-01": first.join("\n") });
    expectInputError(() => load(folder, "csv", { ...PLAIN, regionTable: shuffledTable }, "/"), {
      file: join(folder, "sub-01.csv"),
      line: 2,
      column: 6,
      message: ["row 1 ('north_gyrus_1'), column 2 ('central_fold_5') is 0.125", "not symmetric"],
    });
  });

  it("a later participant's file that is binary is named by its format", () => {
    const folder = cohortCopy("binary", { "sub-04": encodeNpy([5, 5], new Float64Array(25)) });
    expectInputError(() => load(folder, "csv", PLAIN, "/"), {
      file: join(folder, "sub-04.csv"),
      message: ["this file is a NumPy .npy array, not a text matrix"],
    });
  });
});
