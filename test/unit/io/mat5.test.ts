import { readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { deflateSync } from "node:zlib";
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import type { ArrayContainer } from "../../../src/io/arrays/arrayContainer.js";
import { chooseMatrix, chooseStack } from "../../../src/io/arrays/chooseArray.js";
import { detectFormat } from "../../../src/io/arrays/fileFormat.js";
import { mat5Container } from "../../../src/io/arrays/mat5Container.js";
import { openContainer } from "../../../src/io/arrays/openContainer.js";
import { toNumbers, type FixtureNumber } from "../../helpers/fixtures.js";
import { expectInputError, parsesOrInputError } from "./inputErrorAssertions.js";

const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), "../../fixtures/mat5");

/** A variable as the fixture scripts describe it (make_mat5.py: SciPy's reader; make_mat5_octave.m: Octave). */
interface FixtureVariable {
  name: string;
  dims: number[];
  class: string;
  sparse: boolean;
  complex: boolean;
  values?: FixtureNumber[];
}
interface FixtureFiles {
  files: Record<string, { entries: FixtureVariable[] }>;
}
const scipyExpected = JSON.parse(readFileSync(join(FIXTURES, "expected.json"), "utf8")) as FixtureFiles & { scipy_version: string; numpy_version: string };
const octaveExpected = JSON.parse(readFileSync(join(FIXTURES, "expected_octave.json"), "utf8")) as FixtureFiles & { octave_version: string };

function fixtureBytes(name: string): Uint8Array {
  return new Uint8Array(readFileSync(join(FIXTURES, name)));
}

function open(name: string, bytes = fixtureBytes(name)): ArrayContainer {
  return mat5Container(bytes, name);
}

/** Bit-exact comparison (tolerance 0) with the input, expected, actual and difference on failure. */
function expectSameValues(actual: Float64Array, wanted: Float64Array, input: string): void {
  expect(actual.length, `${input}: length`).toBe(wanted.length);
  for (let k = 0; k < wanted.length; k++) {
    if (!Object.is(actual[k], wanted[k])) {
      throw new Error(`${input}[${k}]: expected ${wanted[k]}, actual ${actual[k]}, difference ${actual[k] - wanted[k]}, tolerance 0 (exact)`);
    }
  }
}

/** The type plexus lists for a variable, from what the writer's side says of it (class, sparse, complex). */
function listedType(variable: FixtureVariable): { type: string; numeric: boolean } {
  const complex = variable.complex ? "complex " : "";
  if (variable.sparse) return { type: `${complex}sparse ${variable.class === "logical" ? "logical" : "double"}`, numeric: !variable.complex };
  const numericClasses = ["double", "single", "int8", "uint8", "int16", "uint16", "int32", "uint32", "int64", "uint64", "logical"];
  if (numericClasses.includes(variable.class)) return { type: complex + variable.class, numeric: !variable.complex };
  return { type: variable.class === "function" ? "function handle" : variable.class, numeric: false };
}

function checkFile(name: string, variables: FixtureVariable[]): void {
  const container = open(name);
  // Source: the writer's own listing (SciPy's MatFile5Reader headers, or Octave's size/class/issparse/iscomplex).
  expect(container.entries.map((e) => e.name)).toEqual(variables.map((v) => v.name));
  for (const variable of variables) {
    const entry = container.entries.find((e) => e.name === variable.name)!;
    expect(entry.shape, `${name}: ${variable.name} shape`).toEqual(variable.dims);
    expect({ type: entry.type, numeric: entry.numeric }, `${name}: ${variable.name}`).toEqual(listedType(variable));
    if (!entry.numeric) continue;
    const array = container.read(variable.name);
    expect(array.shape).toEqual(variable.dims);
    // Source: scipy.io.loadmat's (or Octave's) values of the same variable, in C order over MATLAB's dims.
    expectSameValues(array.values, toNumbers(variable.values!), `${name}: ${variable.name}`);
  }
}

describe(`MATLAB 5 .mat files written by SciPy ${scipyExpected.scipy_version} and the layout writer of make_mat5.py (test/fixtures/mat5)`, () => {
  it.each(Object.keys(scipyExpected.files))("%s: every variable, shape, type and value", (name) => {
    checkFile(name, scipyExpected.files[name].entries);
  });

  it("the fixtures cover both byte orders, compression, narrower stored types, sparse, 3-D both ways, 4-D and non-numeric variables", () => {
    const bigEndian = fixtureBytes("handmade_big_endian.mat");
    expect(String.fromCharCode(bigEndian[126], bigEndian[127])).toBe("MI");
    expect(String.fromCharCode(...fixtureBytes("scipy_types.mat").subarray(126, 128))).toBe("IM");
    const all = Object.values(scipyExpected.files).flatMap((f) => f.entries);
    for (const cls of ["double", "single", "int8", "uint8", "int16", "uint16", "int32", "uint32", "int64", "uint64", "logical", "char", "struct", "cell", "object", "function"]) {
      expect(all.map((v) => v.class)).toContain(cls);
    }
    expect(all.some((v) => v.sparse && v.class === "logical")).toBe(true);
    expect(all.some((v) => v.complex)).toBe(true);
    expect(scipyExpected.files["scipy_stack_nns.mat"].entries[0].dims).toEqual([4, 4, 3]);
    expect(scipyExpected.files["scipy_stack_snn.mat"].entries[0].dims).toEqual([3, 4, 4]);
    expect(scipyExpected.files["scipy_4d.mat"].entries[0].dims).toEqual([2, 3, 4, 5]);
  });

  it("the big- and little-endian hand-made files read the same", () => {
    const big = open("handmade_big_endian.mat");
    const little = open("handmade_little_endian.mat");
    expect(big.entries).toEqual(little.entries);
    for (const entry of big.entries.filter((e) => e.numeric)) {
      expectSameValues(big.read(entry.name).values, little.read(entry.name).values, entry.name);
    }
  });

  it("names the format, saying compressed when every variable is", () => {
    expect(open("scipy_types.mat").format).toBe("MATLAB 5 .mat");
    expect(open("scipy_types_compressed.mat").format).toBe("MATLAB 5 .mat (compressed)");
    expect(open("handmade_big_endian.mat").format).toBe("MATLAB 5 .mat"); // one variable of many is compressed
  });

  it("is the reader openContainer uses for the bytes detectFormat calls mat5", () => {
    const bytes = fixtureBytes("octave_v7.mat");
    expect(detectFormat(bytes)).toBe("mat5");
    expect(openContainer(bytes, "x.mat", "mat5").entries.map((e) => e.name)).toContain("stack_nns");
  });
});

describe(`MATLAB 5 .mat files written by GNU Octave ${octaveExpected.octave_version} (save -v6 and -v7; make_mat5_octave.m)`, () => {
  it.each(Object.keys(octaveExpected.files))("%s: every variable, shape, type and value", (name) => {
    checkFile(name, octaveExpected.files[name].entries);
  });

  it("-v7 compresses every variable and -v6 none", () => {
    expect(open("octave_v7.mat").format).toBe("MATLAB 5 .mat (compressed)");
    expect(open("octave_v6.mat").format).toBe("MATLAB 5 .mat");
  });
});

// ---- malformed files ----

/** A small level-5 writer for malformed cases (layout: "MATLAB MAT-File Format", The MathWorks, Level 5). */
class Layout {
  private readonly parts: Uint8Array[] = [];
  constructor(private readonly littleEndian = true) {}

  words(type: "u32" | "i32", values: number[]): Uint8Array {
    const out = new Uint8Array(values.length * 4);
    const view = new DataView(out.buffer);
    values.forEach((v, k) => (type === "u32" ? view.setUint32(k * 4, v, this.littleEndian) : view.setInt32(k * 4, v, this.littleEndian)));
    return out;
  }

  element(type: number, data: Uint8Array): Uint8Array {
    const padded = new Uint8Array(8 + data.length + ((8 - (data.length % 8)) % 8));
    padded.set(this.words("u32", [type, data.length]));
    padded.set(data, 8);
    return padded;
  }

  matrix(name: string, mclass: number, dims: number[], parts: Uint8Array[], flags = 0, nzmax = 0): Uint8Array {
    const body = concat([
      this.element(6, this.words("u32", [mclass | (flags << 8), nzmax])),
      this.element(5, this.words("i32", dims)),
      this.element(1, new TextEncoder().encode(name)),
      ...parts,
    ]);
    return concat([this.words("u32", [14, body.length]), body]);
  }

  doubles(values: number[]): Uint8Array {
    const out = new Uint8Array(values.length * 8);
    const view = new DataView(out.buffer);
    values.forEach((v, k) => view.setFloat64(k * 8, v, this.littleEndian));
    return this.element(9, out);
  }

  add(...elements: Uint8Array[]): this {
    this.parts.push(...elements);
    return this;
  }

  file(): Uint8Array {
    const header = new Uint8Array(128).fill(0x20);
    header.set(new TextEncoder().encode("MATLAB 5.0 MAT-file, test layout"));
    header.set(this.words("u32", [0, 0]), 116);
    new DataView(header.buffer).setUint16(124, 0x0100, this.littleEndian);
    header.set(new TextEncoder().encode(this.littleEndian ? "IM" : "MI"), 126);
    return concat([header, ...this.parts]);
  }
}

function concat(parts: Uint8Array[]): Uint8Array {
  const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
  let at = 0;
  for (const part of parts) {
    out.set(part, at);
    at += part.length;
  }
  return out;
}

function readAll(container: ArrayContainer): void {
  for (const entry of container.entries) if (entry.numeric) container.read(entry.name);
}

const BAD = "not a readable MATLAB 5 .mat file";

describe("malformed .mat files are InputErrors naming the file (and the variable when known)", () => {
  it("a file cut inside a variable names that variable", () => {
    const bytes = fixtureBytes("scipy_types.mat");
    const second = 128 + 8 + new DataView(bytes.buffer, bytes.byteOffset).getUint32(132, true);
    expectInputError(() => open("cut.mat", bytes.subarray(0, second + 100)), {
      file: "cut.mat",
      message: [BAD, "variable 'conn_single'", "truncated"],
    });
  });

  it("a compressed file cut inside its last variable names it and says compressed", () => {
    const bytes = fixtureBytes("octave_v7.mat");
    expectInputError(() => open("cut.mat", bytes.subarray(0, bytes.length - 5)), {
      file: "cut.mat",
      message: [BAD, "variable 'phase' (compressed)", "truncated"],
    });
  });

  it("a file cut anywhere but between variables is an InputError; cut between them, it holds the variables before the cut", () => {
    const bytes = fixtureBytes("handmade_big_endian.mat");
    const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    const boundaries = [128];
    while (boundaries[boundaries.length - 1] < bytes.length) {
      const at = boundaries[boundaries.length - 1];
      boundaries.push(at + 8 + view.getUint32(at + 4, false));
    }
    for (let length = 0; length < bytes.length; length++) {
      const cut = bytes.subarray(0, length);
      const variables = boundaries.indexOf(length);
      if (variables >= 0) expect(open("cut.mat", cut).entries.length).toBe(variables);
      else expectInputError(() => readAll(open("cut.mat", cut)), { file: "cut.mat", message: [BAD] });
    }
  });

  it("a tag claiming more bytes than the file has (as a failed save leaves it)", () => {
    const layout = new Layout();
    const file = concat([layout.file(), layout.words("u32", [14, 0xffffffff]), new Uint8Array(40)]);
    expectInputError(() => open("partial.mat", file), { file: "partial.mat", message: [BAD, "4294967295 bytes", "truncated"] });
  });

  it("damaged compressed data", () => {
    const bytes = fixtureBytes("scipy_stack_nns_compressed.mat").slice();
    bytes[bytes.length - 1] ^= 0xff; // the zlib stream's Adler-32 check
    expectInputError(() => readAll(open("damaged.mat", bytes)), { file: "damaged.mat", message: [BAD, "compressed data are damaged"] });
  });

  it.each([
    ["shorter than the header", new Uint8Array(100), "fewer than the 128-byte header"],
    ["no endian indicator", (() => { const b = new Layout().file(); b[126] = 0x41; return b; })(), "endian indicator"],
    ["another version", (() => { const b = new Layout().file(); b[125] = 2; return b; })(), "version 0x0200"],
    ["an element that is no variable", (() => { const l = new Layout(); return l.add(l.element(9, new Uint8Array(8))).file(); })(), "data type 9, not a variable"],
    ["stray bytes after the last variable", concat([new Layout().file(), new Uint8Array(3)]), "too few for a variable's tag"],
  ])("%s", (_name, bytes, text) => {
    expectInputError(() => open("bad.mat", bytes as Uint8Array), { file: "bad.mat", message: [BAD, text as string] });
  });

  it.each([
    ["fewer values than its dimensions", (l: Layout) => l.matrix("m", 6, [2, 2], [l.doubles([1, 2, 3])]), "holds 3 values where its dimensions 2 × 2 need 4"],
    ["values stored as text", (l: Layout) => l.matrix("m", 6, [1, 2], [l.element(16, new Uint8Array(2))]), "data type 16, which holds no numbers"],
    ["values of a partial width", (l: Layout) => l.matrix("m", 6, [1, 1], [l.element(9, new Uint8Array(7))]), "not a whole number of 8-byte values"],
    ["a sparse matrix too large to expand", (l: Layout) => l.matrix("s", 5, [100000, 100000], [l.element(5, new Uint8Array(0)), l.element(5, new Uint8Array(0)), l.doubles([])]), "too large to expand"],
    ["a sparse row index out of range", (l: Layout) => l.matrix("s", 5, [2, 1], [l.element(5, l.words("i32", [2])), l.element(5, l.words("i32", [0, 1])), l.doubles([1])]), "row index 2 outside 0 … 1"],
    ["sparse column starts that fall", (l: Layout) => l.matrix("s", 5, [2, 2], [l.element(5, l.words("i32", [0, 1])), l.element(5, l.words("i32", [0, 2, 1])), l.doubles([1, 2])]), "column starts are not increasing"],
  ])("%s names the variable", (_name, make, text) => {
    const layout = new Layout(false);
    const bytes = layout.add(make(layout)).file();
    expectInputError(() => readAll(open("bad.mat", bytes)), { file: "bad.mat", message: [BAD, /variable '[ms]'/, text] });
  });

  it.each([
    ["negative dimensions", (l: Layout) => l.matrix("m", 6, [-1, 2], []), "negative"],
    ["array flags of the wrong type", (l: Layout) => concat([l.words("u32", [14, 16]), l.element(5, l.words("u32", [6, 0]))]), "array flags"],
  ])("%s", (_name, make, text) => {
    const layout = new Layout();
    expectInputError(() => open("bad.mat", layout.add(make(layout)).file()), { file: "bad.mat", message: [BAD, text] });
  });

  it("a compressed element that inflates to more than its tag says", () => {
    const layout = new Layout();
    const inner = layout.matrix("m", 6, [1, 1], [layout.doubles([1])]);
    const longer = concat([inner, new Uint8Array(8192)]);
    const data = deflateSync(longer);
    const bytes = layout.add(concat([layout.words("u32", [15, data.length]), data])).file();
    expectInputError(() => readAll(open("bomb.mat", bytes)), { file: "bomb.mat", message: [BAD, "variable 'm' (compressed)", "more than the"] });
  });

  it("random changes, cuts and insertions in real files never raise anything but an InputError", () => {
    const sources = ["scipy_types.mat", "scipy_types_compressed.mat", "scipy_sparse.mat", "handmade_big_endian.mat", "octave_v7.mat", "scipy_mixed.mat"].map(fixtureBytes);
    const mutation = fc.record({
      source: fc.nat(sources.length - 1),
      edits: fc.array(fc.tuple(fc.constantFrom("set", "cut", "insert"), fc.nat(5000), fc.integer({ min: 0, max: 255 })), { minLength: 1, maxLength: 4 }),
    });
    fc.assert(
      fc.property(mutation, ({ source, edits }) => {
        let bytes: Uint8Array = sources[source].slice();
        for (const [kind, at, value] of edits) {
          const k = at % (bytes.length + 1);
          if (kind === "set" && k < bytes.length) bytes[k] = value;
          else if (kind === "cut") bytes = bytes.slice(0, k);
          else bytes = concat([bytes.subarray(0, k), new Uint8Array([value]), bytes.subarray(k)]);
        }
        return parsesOrInputError(() => readAll(open("m.mat", bytes)));
      }),
      { numRuns: 3000 },
    );
  });
});

describe("what a .mat file holds besides numeric arrays", () => {
  it("an object of the opaque class is listed by its name; an unnamed element (subsystem data) is skipped", () => {
    const layout = new Layout();
    const name = (text: string): Uint8Array => layout.element(1, new TextEncoder().encode(text));
    const opaqueBody = concat([layout.element(6, layout.words("u32", [17, 0])), name("model"), name("MCOS"), name("toy"), layout.matrix("", 6, [1, 1], [layout.doubles([1])])]);
    const bytes = layout
      .add(concat([layout.words("u32", [14, opaqueBody.length]), opaqueBody]))
      .add(layout.matrix("conn", 6, [2, 2], [layout.doubles([1, 0.5, 0.5, 1])]))
      .add(layout.matrix("", 9, [1, 8], [layout.element(2, new Uint8Array(8))]))
      .file();
    const container = open("objects.mat", bytes);
    expect(container.entries).toEqual([
      { name: "model", shape: [1, 1], type: "object", numeric: false },
      { name: "conn", shape: [2, 2], type: "double", numeric: true },
    ]);
  });

  it("reading a variable that is not numeric, or not there, is an InputError", () => {
    const container = open("scipy_mixed.mat");
    expectInputError(() => container.read("info"), { file: "scipy_mixed.mat", message: [BAD, "variable 'info'", "struct, not a numeric array"] });
    expectInputError(() => container.read("nothing"), { file: "scipy_mixed.mat", message: [BAD, "variable 'nothing'", "no such variable"] });
  });

  it("choosing a variable the file lacks lists the variables it holds", () => {
    expectInputError(() => chooseMatrix(open("scipy_mixed.mat"), "scipy_mixed.mat", { variable: "connectivity" }), {
      file: "scipy_mixed.mat",
      key: "connectomes.variable",
      message: ["MATLAB 5 .mat file has no variable 'connectivity'", "conn (4 × 4 double)", "label (1 × 14 char)", "info (1 × 1 struct)", "phase (1 × 2 complex double)", "thing (1 × 1 object)"],
    });
  });

  it("choosing a struct, a cell or a complex array names it and says it is not numeric", () => {
    for (const [variable, type] of [["info", "struct"], ["notes", "cell"], ["phase", "complex double"], ["label", "char"]]) {
      expectInputError(() => chooseMatrix(open("scipy_mixed.mat"), "scipy_mixed.mat", { variable }), {
        file: "scipy_mixed.mat",
        key: "connectomes.variable",
        message: [`variable ${variable} (`, `${type}) is not a numeric array`],
      });
    }
  });

  it("without a variable named, the only square matrix or the only stack is chosen; non-numeric variables are never candidates", () => {
    expect(chooseStack(open("scipy_stack_nns_compressed.mat"), "f.mat", {})).toMatchObject({ entry: { name: "stack" }, axis: "last" });
    expect(chooseStack(open("scipy_stack_snn.mat"), "f.mat", {})).toMatchObject({ entry: { name: "stack" }, axis: "first" });
    expect(chooseMatrix(open("scipy_mixed.mat"), "f.mat", {}).name).toBe("conn");
    expectInputError(() => chooseMatrix(open("scipy_sparse.mat"), "scipy_sparse.mat", {}), {
      file: "scipy_sparse.mat",
      key: "connectomes",
      message: ["holds no square matrix", "adjacency (3 × 5 sparse double), mask (3 × 2 sparse logical)"],
    });
  });
});
