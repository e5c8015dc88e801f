import { readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { InputError } from "../../../src/errors.js";
import type { ArrayContainer } from "../../../src/io/arrays/arrayContainer.js";
import { chooseStack } from "../../../src/io/arrays/chooseArray.js";
import { detectFormat } from "../../../src/io/arrays/fileFormat.js";
import { openContainer } from "../../../src/io/arrays/openContainer.js";
import { loadConnectomes, type ConnectomeOptions, type ConnectomeSource, type ConnectomeSubject } from "../../../src/io/connectomes.js";
import { expectInputError } from "./inputErrorAssertions.js";

/**
 * The HDF5 reader (h5wasm on a worker thread; the worker runs from dist/, built
 * by `npm test`) against files written by outside writers: h5py (plain HDF5 and
 * the MATLAB 7.3 layout) and GNU Octave's `save -hdf5`, made by
 * test/fixtures/hdf5/make_hdf5.py, which records in expected.json every entry
 * and every value (C order over the writer's shape) as numpy holds them.
 */
const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), "../../fixtures/hdf5");

// Slabs of 40 values, so that the fixtures' arrays are read in several slabs (of 2 matrices and of 1) and in one.
const SLAB_SETTING = process.env.PLEXUS_HDF5_SLAB_VALUES;
process.env.PLEXUS_HDF5_SLAB_VALUES = "40";
afterAll(() => {
  if (SLAB_SETTING === undefined) delete process.env.PLEXUS_HDF5_SLAB_VALUES;
  else process.env.PLEXUS_HDF5_SLAB_VALUES = SLAB_SETTING;
});

interface ExpectedEntry {
  name: string;
  shape: number[];
  type: string;
  numeric: boolean;
  values?: number[];
  /** The filter a dataset is compressed with that plexus's HDF5 library lacks. */
  unreadable?: string;
}
const expected = JSON.parse(readFileSync(join(FIXTURES, "expected.json"), "utf8")) as {
  participants: string[];
  stack: { shape: number[]; values: number[] };
  writers: Record<string, string>;
  files: Record<string, { writer: string; entries: ExpectedEntry[] }>;
};
const WRITERS = `h5py ${expected.writers.h5py} (HDF5 ${expected.writers.hdf5}, numpy ${expected.writers.numpy}), ${expected.writers.octave}`;
const PLAIN: ConnectomeOptions = { symmetrize: false, asymmetryTolerance: 1e-9, transform: "none" };

function fixture(name: string): string {
  return join(FIXTURES, name);
}

function open(name: string, bytes = new Uint8Array(readFileSync(fixture(name)))): ArrayContainer {
  return openContainer(bytes, fixture(name), detectFormat(bytes));
}

/** Bit-exact comparison (tolerance 0) with input, index, expected, actual and difference on failure. */
function expectSameValues(actual: Float64Array, wanted: readonly number[], input: string): void {
  expect(actual.length, `${input}: length`).toBe(wanted.length);
  for (let k = 0; k < wanted.length; k++) {
    if (!Object.is(actual[k], wanted[k])) {
      throw new Error(`${input}[${k}]: expected ${wanted[k]}, actual ${actual[k]}, difference ${actual[k] - wanted[k]}, tolerance 0 (exact)`);
    }
  }
}

function subjects(): ConnectomeSubject[] {
  return expected.participants.map((id, tableRow) => ({ id, tableRow, values: { participant_id: id } }));
}

/** The cohort as plain text (test/fixtures/hdf5/text, written by make_hdf5.py with repr), through the text reader. */
function fromText() {
  return loadConnectomes({ kind: "template", template: "text/{participant_id}.txt", baseDir: FIXTURES }, subjects(), PLAIN);
}

describe(`HDF5 files against their writers (${WRITERS}; test/fixtures/hdf5/make_hdf5.py)`, () => {
  const FORMATS: Record<string, string> = {
    h5py: "HDF5",
    octave: "HDF5 (GNU Octave's save -hdf5)",
  };

  it.each(Object.keys(expected.files))("%s: every entry, shape, type and value", (name) => {
    const { writer, entries } = expected.files[name];
    const container = open(name);
    expect(container.format).toBe(name.startsWith("matlab73_") ? "MATLAB 7.3 .mat" : FORMATS[writer]);
    // Source: the entries h5py wrote (or Octave, checked by the script) in the file's order, shapes in the writer's terms.
    expect(container.entries).toEqual(entries.map(({ name: entry, shape, type, numeric }) => ({ name: entry, shape, type, numeric })));
    for (const entry of entries) {
      if (!entry.numeric) {
        expectInputError(() => container.read(entry.name), { file: fixture(name), message: [/is not a numeric array/, entry.name] });
        continue;
      }
      if (entry.unreadable) {
        expectInputError(() => container.read(entry.name), {
          file: fixture(name),
          message: [entry.name, entry.unreadable, /plexus's HDF5 library does not include/],
          hint: /gzip/,
        });
        continue;
      }
      const array = container.read(entry.name);
      expect(array.shape, `${name} ${entry.name}`).toEqual(entry.shape);
      // Source: numpy's array as h5py wrote it (Octave: the same doubles, loaded from scipy.io.savemat), C order over the writer's shape.
      expectSameValues(array.values, entry.values!, `${name} ${entry.name}`);
    }
  });

  it("a MATLAB N × N × S stack comes out N × N × S with element (i, j, s) in place", () => {
    const [S, N] = expected.stack.shape;
    for (const name of ["matlab73_stack.mat", "octave_stack.h5"]) {
      const { shape, values } = open(name).read("conn");
      expect(shape).toEqual([N, N, S]);
      for (let s = 0; s < S; s++) {
        for (let i = 0; i < N; i++) {
          for (let j = 0; j < N; j++) {
            // Source: numpy's S × N × N cohort in make_hdf5.py, element [s][i][j].
            expect(values[(i * N + j) * S + s], `${name} conn(${i + 1}, ${j + 1}, ${s + 1})`).toBe(expected.stack.values[(s * N + i) * N + j]);
          }
        }
      }
    }
  });

  it("MATLAB's column-major storage: probe(i, j, k) = 0.25 + 1.5 (12 i + 4 j + k), mask and counts not symmetric", () => {
    for (const name of ["matlab73_stack.mat", "octave_stack.h5"]) {
      const container = open(name);
      const probe = container.read("probe");
      expect(probe.shape).toEqual([2, 3, 4]);
      for (let i = 0; i < 2; i++) {
        for (let j = 0; j < 3; j++) {
          for (let k = 0; k < 4; k++) {
            // Source: numpy.arange(24).reshape(2, 3, 4) * 1.5 + 0.25 in make_hdf5.py (C order), given to MATLAB's layout and to Octave.
            expect(probe.values[(i * 3 + j) * 4 + k], `${name} probe(${i + 1}, ${j + 1}, ${k + 1})`).toBe(0.25 + 1.5 * (12 * i + 4 * j + k));
          }
        }
      }
      // Source: MASK and COUNTS in make_hdf5.py, row 1 then row 2 (a transposed read would give 1, 0, 0, 1 and 0, 5, 1, 40).
      expect(Array.from(container.read("mask").values.subarray(0, 4))).toEqual([1, 0, 1, 1]);
      expect(Array.from(container.read("counts").values.subarray(0, 4))).toEqual([0, -7, 300, 12]);
    }
  });

  it("a MATLAB or Octave variable is named with or without the leading slash; an HDF5 path too", () => {
    const matlab = open("matlab73_stack.mat");
    expectSameValues(matlab.read("/conn").values, expected.files["matlab73_stack.mat"].entries[0].values!, "matlab73_stack.mat /conn");
    const plain = open("plain_groups.h5");
    expectSameValues(plain.read("group/conn").values, expected.stack.values, "plain_groups.h5 group/conn");
  });

  it("the files' first bytes say MATLAB 7.3 or HDF5, whatever their names", () => {
    const bytes = (name: string) => new Uint8Array(readFileSync(fixture(name)));
    expect(detectFormat(bytes("matlab73_stack.mat"))).toBe("mat73");
    expect(detectFormat(bytes("plain_stack.h5"))).toBe("hdf5");
    expect(detectFormat(bytes("octave_stack.h5"))).toBe("hdf5");
  });
});

describe("HDF5 reading errors name the file and the dataset", () => {
  it("a missing dataset lists what the file holds", () => {
    const container = open("plain_groups.h5");
    expectInputError(() => container.read("/nope"), {
      file: fixture("plain_groups.h5"),
      message: [/HDF5 file has no variable '\/nope'/, "/conn (3 × 4 × 4 float64)", "/group (group)", "/group/conn (3 × 4 × 4 float64)"],
    });
    expectInputError(
      () => loadConnectomes({ kind: "file", path: fixture("matlab73_stack.mat"), choice: { variable: "connectivity" } }, subjects(), PLAIN),
      {
        file: fixture("matlab73_stack.mat"),
        key: "connectomes.variable",
        message: [/MATLAB 7\.3 \.mat file has no variable 'connectivity'/, "conn (4 × 4 × 3 double)", "label (1 × 14 char)", "info (struct)"],
      },
    );
  });

  it("a group, a char array, a cell named as the variable", () => {
    const where = (name: string) => ({ file: fixture(name), key: "connectomes.variable" });
    const load = (name: string, variable: string) => () =>
      loadConnectomes({ kind: "file", path: fixture(name), choice: { variable } }, subjects(), PLAIN);
    expectInputError(load("plain_groups.h5", "/group"), { ...where("plain_groups.h5"), message: [/variable \/group \(group\) is not a numeric array/] });
    expectInputError(load("matlab73_stack.mat", "label"), { ...where("matlab73_stack.mat"), message: [/variable label \(1 × 14 char\) is not a numeric array/] });
    expectInputError(load("matlab73_stack.mat", "regions"), { ...where("matlab73_stack.mat"), message: [/variable regions \(2 × 1 cell\) is not a numeric array/] });
  });

  it("two stacks and no variable named: the error lists both", () => {
    expectInputError(() => loadConnectomes({ kind: "file", path: fixture("plain_groups.h5") }, subjects(), PLAIN), {
      file: fixture("plain_groups.h5"),
      key: "connectomes",
      message: [/HDF5 file holds 2 arrays that could be the stack/, "/conn (3 × 4 × 4 float64)", "/group/conn (3 × 4 × 4 float64)"],
      hint: /variable/,
    });
    const matlab = open("matlab73_stack.mat");
    expectInputError(() => chooseStack(matlab, "m.mat", {}), { file: "m.mat", key: "connectomes", message: ["conn (4 × 4 × 3 double)", "conn_single (4 × 4 × 3 single)"] });
  });

  it("a truncated file, bytes that are no HDF5 after the signature, an empty user block", () => {
    const bytes = new Uint8Array(readFileSync(fixture("plain_stack.h5")));
    expectInputError(() => openContainer(bytes.subarray(0, 1500), "cut.h5", "hdf5"), { file: "cut.h5", message: [/cannot open the file as HDF5: .*truncated file/] });
    const garbage = bytes.slice(0, 600);
    garbage.fill(0x41, 8);
    expectInputError(() => openContainer(garbage, "garbage.h5", "hdf5"), { file: "garbage.h5", message: [/cannot open the file as HDF5/] });
    const matlab = new Uint8Array(readFileSync(fixture("matlab73_sub-01.mat")));
    expectInputError(() => openContainer(matlab.subarray(0, 512), "header-only.mat", "mat73"), { file: "header-only.mat", message: [/cannot open the file as HDF5/] });
  });

  it("a dataset whose values HDF5 cannot read (lzf, a filter h5wasm lacks) through the loader", () => {
    expectInputError(
      () => loadConnectomes({ kind: "file", path: fixture("plain_types.h5"), choice: { variable: "/lzf" } }, subjects(), PLAIN),
      { file: fixture("plain_types.h5"), message: [/'\/lzf' is compressed with the HDF5 filter lzf \(id 32000\)/] },
    );
  });

  it("any damage to a file either reads or raises an InputError (fast-check)", () => {
    const bytes = new Uint8Array(readFileSync(fixture("matlab73_sub-01.mat")));
    fc.assert(
      fc.property(
        fc.array(fc.record({ at: fc.nat({ max: bytes.length - 1 }), value: fc.integer({ min: 0, max: 255 }) }), { minLength: 1, maxLength: 8 }),
        fc.nat({ max: bytes.length }),
        (edits, keep) => {
          const damaged = bytes.slice(0, Math.max(keep, 600));
          for (const { at, value } of edits) if (at < damaged.length) damaged[at] = value;
          try {
            const container = openContainer(damaged, "damaged.mat", "mat73");
            for (const entry of container.entries) if (entry.numeric) container.read(entry.name);
          } catch (error) {
            if (!(error instanceof InputError)) throw error;
            expect(error.location.file).toBe("damaged.mat");
          }
        },
      ),
      { numRuns: Number(process.env.PLEXUS_FUZZ_RUNS ?? 60), seed: 15 },
    );
  });
});

describe("loadConnectomes reads HDF5 and MATLAB 7.3 as the same cohort in text (test/fixtures/hdf5/text, repr-exact)", () => {
  let text: ReturnType<typeof fromText>;
  beforeAll(() => {
    text = fromText();
  });

  const cases: [string, ConnectomeSource, object][] = [
    ["plain HDF5 stack /conn", { kind: "file", path: fixture("plain_stack.h5"), choice: { variable: "/conn" } }, { reader: "HDF5", variable: "/conn", shape: [3, 4, 4], subjectsAxis: "first" }],
    ["plain HDF5, no variable named (the only stack)", { kind: "file", path: fixture("plain_stack.h5") }, { reader: "HDF5", variable: "/conn", subjectsAxis: "first" }],
    ["plain HDF5 /group/conn beside a decoy /conn", { kind: "file", path: fixture("plain_groups.h5"), choice: { variable: "/group/conn" } }, { variable: "/group/conn" }],
    ["gzip-compressed chunked HDF5", { kind: "file", path: fixture("plain_types.h5"), choice: { variable: "/deflate" } }, { variable: "/deflate" }],
    ["MATLAB 7.3 N × N × S stack", { kind: "file", path: fixture("matlab73_stack.mat"), choice: { variable: "conn" } }, { reader: "MATLAB 7.3 .mat", variable: "conn", shape: [4, 4, 3], subjectsAxis: "last" }],
    ["Octave save -hdf5 N × N × S stack", { kind: "file", path: fixture("octave_stack.h5"), choice: { variable: "conn" } }, { reader: "HDF5 (GNU Octave's save -hdf5)", variable: "conn", subjectsAxis: "last" }],
    ["MATLAB 7.3, one file per participant", { kind: "template", template: "matlab73_{participant_id}.mat", baseDir: FIXTURES }, { reader: "MATLAB 7.3 .mat", variable: "conn", shape: [4, 4] }],
    ["MATLAB 7.3 per participant, variable named", { kind: "template", template: "matlab73_{participant_id}.mat", baseDir: FIXTURES, choice: { variable: "/conn" } }, { variable: "conn" }],
  ];

  it.each(cases)("%s", (_title, source, reading) => {
    const loaded = loadConnectomes(source, subjects(), PLAIN);
    expect(loaded.regionCount).toBe(text.regionCount);
    expect(loaded.subjectCount).toBe(text.subjectCount);
    // Source: the same numpy doubles written as text by make_hdf5.py and read by plexus's text reader.
    expectSameValues(loaded.data, Array.from(text.data), "edge data");
    expect(loaded.reading).toMatchObject({ labels: "numbered 1 … N", ...reading });
  });

  it("a per-participant matrix where a stack is expected is named in the error", () => {
    const single = { kind: "file" as const, path: fixture("octave_stack.h5"), choice: { variable: "counts" } };
    expectInputError(() => loadConnectomes(single, subjects(), PLAIN), {
      file: fixture("octave_stack.h5"),
      key: "connectomes",
      message: [/expected a stack of every participant's matrix/, "counts (4 × 4 int16)"],
    });
  });
});
