import { readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import fc from "fast-check";
import { zipSync } from "fflate";
import { mutateBytes } from "../../helpers/mutateBytes.js";
import { describe, expect, it } from "vitest";
import { chooseMatrix, chooseStack } from "../../../src/io/arrays/chooseArray.js";
import { npzContainer } from "../../../src/io/arrays/npzContainer.js";
import { openContainer } from "../../../src/io/arrays/openContainer.js";
import { detectFormat } from "../../../src/io/arrays/fileFormat.js";
import { loadConnectomes, type ConnectomeOptions, type ConnectomeSubject } from "../../../src/io/connectomes.js";
import { encodeNpy } from "../../../src/io/npy.js";
import { loadFixture } from "../../helpers/fixtures.js";
import { expectInputError, parsesOrInputError } from "./inputErrorAssertions.js";

/**
 * The .npz reader against archives written by numpy's np.savez (stored
 * members) and np.savez_compressed (deflated members): every member's dtype,
 * shape and value as numpy's np.load reads it back (test/fixtures/npz/
 * expected.json, made by make_npz.py), and the same cohort read from plain
 * text (written by the same script, each value as Python's repr).
 */
const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), "../../fixtures/npz");

interface ExpectedMember {
  descr: string;
  shape: number[];
  fortran_order: boolean;
  compression: "stored" | "deflated";
  values?: number[];
  strings?: string[];
}
interface ExpectedNpz {
  numpy_version: string;
  writer: string;
  subjects: string[];
  archives: Record<string, Record<string, ExpectedMember>>;
}
const expected = loadFixture<ExpectedNpz>("npz/expected.json");
const fixturePath = (name: string): string => join(FIXTURES, name);
const fixtureBytes = (name: string): Uint8Array => new Uint8Array(readFileSync(fixturePath(name)));

const PLAIN: ConnectomeOptions = { symmetrize: false, asymmetryTolerance: 1e-9, transform: "none" };
const subjects: ConnectomeSubject[] = expected.subjects.map((id, tableRow) => ({ id, tableRow, values: { participant_id: id } }));

/** Bit-exact comparison (tolerance 0) printing the input, index, expected, actual and difference on failure. */
function expectSameValues(actual: Float64Array, wanted: ArrayLike<number>, input: string): void {
  expect(actual.length, `${input}: length`).toBe(wanted.length);
  for (let k = 0; k < wanted.length; k++) {
    if (!Object.is(actual[k], wanted[k])) {
      throw new Error(`${input}[${k}]: expected ${wanted[k]}, actual ${actual[k]}, difference ${actual[k] - wanted[k]}, tolerance 0 (exact)`);
    }
  }
}

/** Where the central directory entry of member `k` starts (the archive's end record points at the first). */
function directoryEntry(bytes: Uint8Array, k: number): number {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let end = bytes.length - 22;
  while (view.getUint32(end, true) !== 0x06054b50) end--;
  let at = view.getUint32(end + 16, true);
  for (let i = 0; i < k; i++) at += 46 + view.getUint16(at + 28, true) + view.getUint16(at + 30, true) + view.getUint16(at + 32, true);
  return at;
}

describe(`NumPy .npz archives written by numpy ${expected.numpy_version} (test/fixtures/npz/make_npz.py)`, () => {
  it("the fixtures cover stored and deflated members, float64, float32, int16, Fortran order, text and one-array archives", () => {
    const members = Object.values(expected.archives).flatMap((archive) => Object.values(archive));
    expect(new Set(members.map((m) => m.compression))).toEqual(new Set(["stored", "deflated"]));
    for (const descr of ["<f8", "<f4", "<i2"]) expect(members.map((m) => m.descr)).toContain(descr);
    expect(members.some((m) => m.fortran_order)).toBe(true);
    expect(members.some((m) => m.strings)).toBe(true);
    expect(Object.keys(expected.archives["participants/sub-01.npz"])).toEqual(["arr_0"]);
  });

  it("the bytes say zip, whatever the name", () => {
    for (const name of Object.keys(expected.archives)) expect(detectFormat(fixtureBytes(name))).toBe("zip");
  });

  it.each(Object.keys(expected.archives))("%s: every entry, shape, type and value as np.load reads it", (name) => {
    const container = openContainer(fixtureBytes(name), name, "zip");
    expect(container.format).toBe("NumPy .npz");
    const members = expected.archives[name];
    // Source: numpy's np.load of the same archive (expected.json); member NAME.npy is the entry NAME.
    expect(container.entries.map((e) => e.name)).toEqual(Object.keys(members));
    for (const entry of container.entries) {
      const member = members[entry.name];
      expect(entry.shape, `${name}: ${entry.name} shape`).toEqual(member.shape);
      if (member.values) {
        expect(entry.numeric).toBe(true);
        expect(entry.type).toBe(member.descr);
        const array = container.read(entry.name);
        expect(array.shape).toEqual(member.shape);
        // Source: numpy np.load, values in C order (a Fortran-order member reordered).
        expectSameValues(array.values, member.values, `${name}:${entry.name}`);
      } else {
        // A text array (numpy '<U13'): listed so messages can show it, never read as numbers.
        expect(entry.numeric).toBe(false);
        expect(entry.type).toBe(`text (${member.descr})`);
        expectInputError(() => container.read(entry.name), { file: name, message: ["labels.npy", "text", "not numbers"] });
      }
    }
  });

  it("a stack archive gives the S × N × N stack; a per-participant archive its only square matrix", () => {
    const stack = npzContainer(fixtureBytes("stack_compressed.npz"), "stack_compressed.npz");
    expect(chooseStack(stack, "stack_compressed.npz", {})).toEqual({ entry: expect.objectContaining({ name: "conn", shape: [6, 5, 5] }), axis: "first" });
    const labelled = npzContainer(fixtureBytes("with_labels.npz"), "with_labels.npz");
    expect(chooseStack(labelled, "with_labels.npz", {}).entry.name).toBe("conn"); // the text array is never chosen
    const one = npzContainer(fixtureBytes("participants/sub-03.npz"), "sub-03.npz");
    expect(chooseMatrix(one, "sub-03.npz", {}).name).toBe("arr_0");
  });
});

describe("NumPy .npz: errors name the file and what it holds", () => {
  it("an unknown variable lists the archive's arrays", () => {
    const container = npzContainer(fixtureBytes("two_arrays.npz"), "two_arrays.npz");
    expectInputError(() => chooseStack(container, "two_arrays.npz", { variable: "connectivity" }), {
      file: "two_arrays.npz",
      key: "connectomes.variable",
      message: ["NumPy .npz file has no variable 'connectivity'", "conn (6 × 5 × 5 <f8)", "conn_float32 (6 × 5 × 5 <f4)"],
    });
  });

  it("two stacks and no variable asks for one", () => {
    const container = npzContainer(fixtureBytes("two_arrays.npz"), "two_arrays.npz");
    expectInputError(() => chooseStack(container, "two_arrays.npz", {}), {
      file: "two_arrays.npz",
      key: "connectomes",
      message: ["2 arrays that could be", "conn", "conn_float32"],
      hint: "variable",
    });
    expect(chooseStack(container, "two_arrays.npz", { variable: "conn_float32" }).entry.type).toBe("<f4");
  });

  it("naming the text array is refused as not numeric", () => {
    const container = npzContainer(fixtureBytes("with_labels.npz"), "with_labels.npz");
    expectInputError(() => chooseStack(container, "with_labels.npz", { variable: "labels" }), {
      file: "with_labels.npz",
      key: "connectomes.variable",
      message: ["labels (5 text (<U13))", "not a numeric array"],
    });
  });

  it("a zip archive without .npy members is a zip archive without NumPy arrays, naming its members", () => {
    expectInputError(() => openContainer(fixtureBytes("not_npz.zip"), "not_npz.zip", "zip"), {
      file: "not_npz.zip",
      message: ["zip archive without NumPy arrays", "'notes/readme.txt'", "'matrix.csv'"],
      hint: "numpy.savez",
    });
  });

  it.each(["stack.npz", "stack_compressed.npz"])("%s cut short at any length is an InputError", (name) => {
    const bytes = fixtureBytes(name);
    for (let length = 0; length < bytes.length; length++) {
      const cut = bytes.slice(0, length);
      expect(
        parsesOrInputError(() => {
          const container = npzContainer(cut, name);
          for (const entry of container.entries) container.read(entry.name);
        }),
      ).toBe(true);
      if (length >= 22) expectInputError(() => npzContainer(cut, name), { file: name, message: ["not a readable zip archive"] });
    }
  });

  it("a changed byte in a stored member's data fails its checksum", () => {
    const bytes = fixtureBytes("stack.npz");
    bytes[200] ^= 0x01; // inside conn.npy's values (its header ends before byte 200)
    const container = npzContainer(bytes, "stack.npz");
    expectInputError(() => container.read("conn"), { file: "stack.npz", message: ["member 'conn.npy'", "CRC-32"] });
  });

  it("damaged compressed data is an InputError naming the member", () => {
    const bytes = fixtureBytes("stack_compressed.npz");
    for (let k = 120; k < 400; k++) bytes[k] = 0xff;
    expectInputError(
      () => {
        const container = npzContainer(bytes, "stack_compressed.npz");
        container.read("conn");
      },
      { file: "stack_compressed.npz", message: ["member 'conn.npy'"] },
    );
  });

  it("a member that declares more bytes than its header's array needs is refused before its data is inflated", () => {
    // 2 × 2 float64 in the header, 8 MB of zeros after it: a member inflating far beyond its array.
    const npy = encodeNpy([2, 2], new Float64Array(4));
    const padded = new Uint8Array(npy.length + 8_000_000);
    padded.set(npy);
    const zip = zipSync({ "conn.npy": [padded, { level: 9 }] });
    expect(zip.length).toBeLessThan(20_000);
    expectInputError(() => npzContainer(zip, "bomb.npz"), { file: "bomb.npz", message: ["member 'conn.npy'", "bytes follow the data"] });
  });

  it("a member whose directory understates its size inflates no further than its header's array", () => {
    const npy = encodeNpy([2, 2], new Float64Array([1, 2, 3, 4]));
    const padded = new Uint8Array(npy.length + 8_000_000);
    padded.set(npy);
    const zip = zipSync({ "conn.npy": [padded, { level: 9 }] });
    const view = new DataView(zip.buffer, zip.byteOffset, zip.byteLength);
    view.setUint32(directoryEntry(zip, 0) + 24, npy.length, true); // the directory now claims the array's size
    const container = npzContainer(zip, "liar.npz");
    expect(container.entries[0].shape).toEqual([2, 2]);
    // Inflated into an output of the declared size: the rest is never produced, and the checksum gives it away.
    expectInputError(() => container.read("conn"), { file: "liar.npz", message: ["member 'conn.npy'", "CRC-32"] });
  });

  it("an array beyond the size read from a zip archive is refused from its header alone", () => {
    // The header claims 300 × 1000 × 1000 uint8 (2.4 GB as float64); the directory declares the matching size.
    const header = "{'descr': '|u1', 'fortran_order': False, 'shape': (300, 1000, 1000), }";
    const text = header + " ".repeat(63 - ((10 + header.length) % 64)) + "\n";
    const npy = new Uint8Array(10 + text.length + 8192); // enough bytes for the header probe; the rest never inflated
    npy.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]);
    new DataView(npy.buffer).setUint16(8, text.length, true);
    npy.set(new TextEncoder().encode(text), 10);
    const zip = zipSync({ "conn.npy": [npy, { level: 6 }] });
    new DataView(zip.buffer, zip.byteOffset, zip.byteLength).setUint32(directoryEntry(zip, 0) + 24, 10 + text.length + 300_000_000, true);
    expectInputError(() => npzContainer(zip, "huge.npz"), { file: "huge.npz", message: ["300000000 values", "2 GiB"], hint: "numpy.save" });
  });

  it("an encrypted member or an unknown compression method is refused by name", () => {
    const bytes = zipSync({ "conn.npy": [encodeNpy([2, 2], new Float64Array(4)), { level: 0 }] });
    const flagged = bytes.slice();
    new DataView(flagged.buffer).setUint16(directoryEntry(flagged, 0) + 8, 0x0001, true);
    expectInputError(() => npzContainer(flagged, "locked.npz"), { file: "locked.npz", message: ["'conn.npy'", "encrypted"] });
    const method = bytes.slice();
    new DataView(method.buffer).setUint16(directoryEntry(method, 0) + 10, 12, true);
    expectInputError(() => npzContainer(method, "bzip.npz"), { file: "bzip.npz", message: ["'conn.npy'", "method 12"] });
  });

  it("random byte changes, cuts and insertions in the archives never raise anything but an InputError", () => {
    const sources = ["stack.npz", "stack_compressed.npz", "with_labels.npz", "participants/sub-01.npz"].map(fixtureBytes);
    const mutation = fc.record({
      source: fc.nat(sources.length - 1),
      edits: fc.array(fc.tuple(fc.constantFrom("set", "cut", "insert"), fc.nat(3000), fc.integer({ min: 0, max: 255 })), { minLength: 1, maxLength: 4 }),
    });
    fc.assert(
      fc.property(mutation, ({ source, edits }) => {
        const bytes = mutateBytes(sources[source], edits);
        return parsesOrInputError(() => {
          const container = npzContainer(bytes, "m.npz");
          for (const entry of container.entries) container.read(entry.name);
        });
      }),
      { numRuns: 3000 },
    );
  });
});

describe("NumPy .npz through loadConnectomes: the same edge data as the cohort in plain text", () => {
  const text = loadConnectomes({ kind: "template", template: "text/{participant_id}.txt", baseDir: FIXTURES }, subjects, PLAIN);

  it.each(["stack.npz", "stack_compressed.npz"])("one stack for every participant: %s", (name) => {
    const loaded = loadConnectomes({ kind: "file", path: fixturePath(name) }, subjects, { ...PLAIN, participantRowCount: 6 });
    // Source: the same matrices as text, each value written by Python's repr (make_npz.py).
    expectSameValues(loaded.data, text.data, name);
    expect([loaded.regionCount, loaded.subjectCount]).toEqual([5, 6]);
    expect(loaded.reading).toEqual({ reader: "NumPy .npz", variable: "conn", shape: [6, 5, 5], subjectsAxis: "first", labels: "numbered 1 … N" });
  });

  it("one archive per participant through a template", () => {
    const loaded = loadConnectomes({ kind: "template", template: "participants/{participant_id}.npz", baseDir: FIXTURES }, subjects, PLAIN);
    // Source: the same matrices as text (make_npz.py).
    expectSameValues(loaded.data, text.data, "participants/{participant_id}.npz");
    expect(loaded.files).toHaveLength(6);
    expect(loaded.reading).toEqual({ reader: "NumPy .npz", variable: "arr_0", shape: [5, 5], labels: "numbered 1 … N" });
  });

  it("a chosen variable and a subset of participants (table rows 5, 1, 3)", () => {
    const some = [subjects[4], subjects[0], subjects[2]];
    const loaded = loadConnectomes(
      { kind: "file", path: fixturePath("two_arrays.npz"), choice: { variable: "conn", subjectsAxis: "first" } },
      some,
      { ...PLAIN, participantRowCount: 6 },
    );
    const textSome = loadConnectomes({ kind: "template", template: "text/{participant_id}.txt", baseDir: FIXTURES }, some, PLAIN);
    expectSameValues(loaded.data, textSome.data, "two_arrays.npz:conn, rows 5, 1, 3");
  });

  it("the float32 stack gives the float32 values (as numpy's astype('<f4') rounds them)", () => {
    const loaded = loadConnectomes(
      { kind: "file", path: fixturePath("two_arrays.npz"), choice: { variable: "conn_float32" } },
      subjects,
      { ...PLAIN, participantRowCount: 6 },
    );
    // Source: the text cohort rounded to float32 (Math.fround is IEEE 754 round-to-nearest, as numpy's cast).
    expectSameValues(loaded.data, Float64Array.from(text.data, Math.fround), "two_arrays.npz:conn_float32");
  });

  it("a per-participant archive named as the one file for all is refused: it holds no stack", () => {
    expectInputError(() => loadConnectomes({ kind: "file", path: fixturePath("participants/sub-01.npz") }, subjects, PLAIN), {
      file: fixturePath("participants/sub-01.npz"),
      key: "connectomes",
      message: ["holds no stack of square matrices", "arr_0 (5 × 5 <f8)"],
    });
  });
});
