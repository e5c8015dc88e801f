import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { encodeNpy, parseNpy } from "../../../src/io/npy.js";
import { expectInputError, parsesOrInputError } from "./inputErrorAssertions.js";
import { mutateBytes, type ByteEdit } from "../../helpers/mutateBytes.js";

const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), "../../fixtures/npy");

interface FixtureEntry {
  descr: string;
  fortran_order: boolean;
  shape: number[];
  values: number[];
}
const expected = JSON.parse(readFileSync(join(FIXTURES, "expected.json"), "utf8")) as {
  numpy_version: string;
  files: Record<string, FixtureEntry>;
};

function fixtureBytes(name: string): Uint8Array {
  return new Uint8Array(readFileSync(join(FIXTURES, name)));
}

/** Bit-exact comparison (tolerance 0) with inputs, expected, actual and difference on failure. */
function expectSameValues(actual: Float64Array, wanted: number[], input: string): void {
  expect(actual.length, `${input}: length`).toBe(wanted.length);
  for (let k = 0; k < wanted.length; k++) {
    if (!Object.is(actual[k], wanted[k])) {
      throw new Error(
        `${input}[${k}]: expected ${wanted[k]}, actual ${actual[k]}, difference ${actual[k] - wanted[k]}, tolerance 0 (exact)`,
      );
    }
  }
}

/** A .npy file with a hand-written header (version 1.0 unless given), for malformed-input tests. */
function npyWithHeader(header: string, data: Uint8Array = new Uint8Array(0), version = 1): Uint8Array {
  const headerBytes = new TextEncoder().encode(header);
  const preamble = version === 1 ? 10 : 12;
  const out = new Uint8Array(preamble + headerBytes.length + data.length);
  out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, version, 0]);
  const view = new DataView(out.buffer);
  if (version === 1) view.setUint16(8, headerBytes.length, true);
  else view.setUint32(8, headerBytes.length, true);
  out.set(headerBytes, preamble);
  out.set(data, preamble + headerBytes.length);
  return out;
}

describe(`parseNpy against files written by numpy ${expected.numpy_version} (test/fixtures/npy/make_npy.py)`, () => {
  it.each(Object.keys(expected.files))("%s", (name) => {
    const entry = expected.files[name];
    const array = parseNpy(fixtureBytes(name), name);
    expect(array.shape).toEqual(entry.shape);
    // Source: numpy's own np.load of the same file, values in C order.
    expectSameValues(array.data, entry.values, name);
  });

  it("the fixtures cover big-endian, float32, Fortran order, a 3-D stack and versions 2.0 and 3.0", () => {
    const descrs = new Set(Object.values(expected.files).map((f) => f.descr));
    for (const d of [">i2", ">f8", "<f4", "<f8", "|b1", "|u1", "<i8"]) expect(descrs).toContain(d);
    expect(Object.values(expected.files).some((f) => f.fortran_order)).toBe(true);
    expect(expected.files["stack_2x3x3.npy"].shape).toEqual([2, 3, 3]);
    expect(fixtureBytes("version_2.npy")[6]).toBe(2);
    expect(fixtureBytes("version_3.npy")[6]).toBe(3);
  });

  it("reads '<f8' data that is not 8-byte aligned in memory", () => {
    const bytes = fixtureBytes("float64_c.npy");
    const shifted = new Uint8Array(bytes.length + 3);
    shifted.set(bytes, 3);
    const array = parseNpy(shifted.subarray(3), "shifted.npy");
    expectSameValues(array.data, expected.files["float64_c.npy"].values, "float64_c.npy at offset 3");
  });

  it("treats '=' (native order) as little-endian", () => {
    const data = new Uint8Array(new Float64Array([1.5, -2]).buffer);
    const bytes = npyWithHeader("{'descr': '=f8', 'fortran_order': False, 'shape': (2,), }\n", data);
    expectSameValues(parseNpy(bytes, "native.npy").data, [1.5, -2], "=f8");
  });
});

describe("encodeNpy", () => {
  it("round-trips through parseNpy", () => {
    const data = new Float64Array([0, -0, 1e-310, Math.PI, -1e300, 7]);
    const array = parseNpy(encodeNpy([2, 3], data), "round.npy");
    expect(array.shape).toEqual([2, 3]);
    expectSameValues(array.data, Array.from(data), "encodeNpy([2,3])");
  });

  it("writes version 1.0 with the header padded to a multiple of 64 bytes and ending in a newline", () => {
    for (const shape of [[], [5], [2, 3], [4, 100, 100]]) {
      const count = shape.reduce((a, b) => a * b, 1);
      const bytes = encodeNpy(shape, new Float64Array(count));
      const headerLength = bytes[8] + 256 * bytes[9];
      expect(bytes[6]).toBe(1);
      expect((10 + headerLength) % 64).toBe(0);
      expect(bytes[10 + headerLength - 1]).toBe(0x0a);
      expect(bytes.length).toBe(10 + headerLength + 8 * count);
    }
  });

  it("writes the same header dict and data bytes as numpy for a float64 C-order array (source: numpy fixture)", () => {
    const numpyBytes = fixtureBytes("float64_c.npy");
    const ours = encodeNpy([3, 3], new Float64Array(expected.files["float64_c.npy"].values));
    const headerOf = (b: Uint8Array): string => new TextDecoder().decode(b.subarray(10, 10 + b[8] + 256 * b[9])).trim();
    expect(headerOf(ours)).toBe(headerOf(numpyBytes));
    const dataOf = (b: Uint8Array): number[] => Array.from(b.subarray(10 + b[8] + 256 * b[9]));
    expect(dataOf(ours)).toEqual(dataOf(numpyBytes));
  });

  it("writes a one-element shape as a Python 1-tuple", () => {
    const text = new TextDecoder().decode(encodeNpy([3], new Float64Array(3)).subarray(10, 74));
    expect(text).toContain("'shape': (3,)");
  });

  it("rejects a shape that does not match the data (a programming error, not an InputError)", () => {
    expect(() => encodeNpy([2, 2], new Float64Array(3))).toThrow(RangeError);
  });

  const numpyAvailable = spawnSync("python3", ["-c", "import numpy"], { encoding: "utf8" }).status === 0;
  describe.skipIf(!numpyAvailable)("read back by numpy (needs python3 with numpy)", () => {
    let dir: string;
    beforeAll(() => {
      dir = mkdtempSync(join(tmpdir(), "plexus-io-npy-"));
    });
    afterAll(() => rmSync(dir, { recursive: true, force: true }));

    it("numpy.load gives the shape and the exact values that encodeNpy wrote (source: numpy)", () => {
      const values = [0.1, -0.0, 5e-324, 1.7976931348623157e308, -123.456, 2 / 3];
      const path = join(dir, "ours.npy");
      writeFileSync(path, encodeNpy([2, 1, 3], new Float64Array(values)));
      const script =
        "import json, sys, numpy; a = numpy.load(sys.argv[1]); " +
        "print(json.dumps({'shape': list(a.shape), 'dtype': a.dtype.str, 'values': [float(v) for v in a.ravel()]}))";
      const run = spawnSync("python3", ["-c", script, path], { encoding: "utf8" });
      expect(run.status, run.stderr).toBe(0);
      const loaded = JSON.parse(run.stdout) as { shape: number[]; dtype: string; values: number[] };
      expect(loaded.shape).toEqual([2, 1, 3]);
      expect(loaded.dtype).toBe("<f8");
      expectSameValues(new Float64Array(loaded.values), values, "numpy.load(encodeNpy(...))");
    });
  });
});

describe("parseNpy: malformed files are InputErrors naming the file and the problem", () => {
  const good = "{'descr': '<f8', 'fortran_order': False, 'shape': (2,), }\n";
  const twoDoubles = new Uint8Array(16);

  it.each([
    ["too short", new Uint8Array([0x93, 0x4e, 0x55]), "shorter"],
    ["bad magic", new Uint8Array(64), "magic"],
    ["unknown version", (() => { const b = npyWithHeader(good, twoDoubles); b[6] = 4; return b; })(), "version 4.0"],
    ["nonzero minor version", (() => { const b = npyWithHeader(good, twoDoubles); b[7] = 1; return b; })(), "version 1.1"],
    ["header longer than the file", (() => { const b = npyWithHeader(good); b[8] = 0xff; b[9] = 0xff; return b; })(), "header claims"],
    ["truncated data", npyWithHeader(good, new Uint8Array(15)), "truncated"],
    ["extra bytes after the data", npyWithHeader(good, new Uint8Array(17)), "1 bytes follow"],
    ["not a dict", npyWithHeader("['descr', '<f8']\n"), "not a dict"],
    ["unclosed dict", npyWithHeader("{'descr': '<f8', 'fortran_order': False, 'shape': (2,)\n"), "malformed header"],
    ["missing key", npyWithHeader("{'descr': '<f8', 'shape': (2,), }\n", twoDoubles), "keys"],
    ["repeated key", npyWithHeader("{'descr': '<f8', 'descr': '<f8', 'fortran_order': False, 'shape': (2,)}\n"), "twice"],
    ["complex dtype", npyWithHeader("{'descr': '<c16', 'fortran_order': False, 'shape': (1,), }\n", twoDoubles), "unsupported dtype '<c16'"],
    ["string dtype", npyWithHeader("{'descr': '<U3', 'fortran_order': False, 'shape': (1,), }\n"), "unsupported dtype"],
    ["'|' on a multi-byte dtype", npyWithHeader("{'descr': '|f8', 'fortran_order': False, 'shape': (2,), }\n", twoDoubles), "unsupported dtype"],
    ["structured dtype", npyWithHeader("{'descr': [('a', '<f8')], 'fortran_order': False, 'shape': (2,), }\n", twoDoubles), "unsupported dtype"],
    ["fortran_order not a bool", npyWithHeader("{'descr': '<f8', 'fortran_order': 0, 'shape': (2,), }\n", twoDoubles), "fortran_order"],
    ["negative extent", npyWithHeader("{'descr': '<f8', 'fortran_order': False, 'shape': (-2,), }\n", twoDoubles), "shape"],
    ["shape not a tuple", npyWithHeader("{'descr': '<f8', 'fortran_order': False, 'shape': 2, }\n", twoDoubles), "shape"],
    ["huge shape", npyWithHeader("{'descr': '<f8', 'fortran_order': False, 'shape': (99999999999, 99999999999), }\n"), "shape"],
    ["bad UTF-8 in a version 3.0 header", npyWithHeader("{'descr': '<f8'}\n".replace("d", "\u00ff"), twoDoubles, 3).map((b) => (b === 0xc3 ? 0xff : b)), "UTF-8"],
  ])("%s", (_name, bytes, text) => {
    expectInputError(() => parseNpy(bytes as Uint8Array, "bad.npy"), {
      file: "bad.npy",
      message: ["not a readable .npy file", text as string],
    });
  });

  it("random bytes never raise anything but an InputError", () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 300 }), (bytes) => parsesOrInputError(() => parseNpy(bytes, "r.npy"))),
      { numRuns: 5000 },
    );
  });

  it("random bytes after a valid magic string and version never raise anything but an InputError", () => {
    fc.assert(
      fc.property(fc.constantFrom(1, 2, 3), fc.uint8Array({ maxLength: 300 }), (version, rest) => {
        const bytes = new Uint8Array(8 + rest.length);
        bytes.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, version, 0]);
        bytes.set(rest, 8);
        return parsesOrInputError(() => parseNpy(bytes, "r.npy"));
      }),
      { numRuns: 5000 },
    );
  });

  it("valid files with random byte changes, cuts and insertions never raise anything but an InputError", () => {
    const sources = Object.keys(expected.files).map(fixtureBytes);
    const mutation = fc.record({
      source: fc.nat(sources.length - 1),
      edits: fc.array(fc.tuple(fc.constantFrom("set", "cut", "insert"), fc.nat(400), fc.integer({ min: 0, max: 255 })), {
        minLength: 1,
        maxLength: 4,
      }),
    });
    fc.assert(
      fc.property(mutation, ({ source, edits }) => {
        const bytes = mutateBytes(sources[source], edits as ByteEdit[]);
        return parsesOrInputError(() => parseNpy(bytes, "m.npy"));
      }),
      { numRuns: 5000 },
    );
  });

  it("random header text made of dict-literal pieces never raises anything but an InputError", () => {
    const piece = fc.constantFrom(
      "{", "}", "(", ")", "[", "]", ",", ":", " ", "'", '"', "\n", "'descr'", "'<f8'", "'>i2'", "'|b1'", "'fortran_order'",
      "True", "False", "None", "'shape'", "2", "0", "-1", "99999999999999999999", "1.5", "x", "\\",
    );
    fc.assert(
      fc.property(fc.string({ unit: piece, maxLength: 40 }), fc.uint8Array({ maxLength: 64 }), (header, data) =>
        parsesOrInputError(() => parseNpy(npyWithHeader(header, data), "h.npy")),
      ),
      { numRuns: 10000 },
    );
  });

  it("deeply nested header literals are rejected, not a stack overflow", () => {
    const header = "{'descr': " + "(".repeat(5000) + ")".repeat(5000) + "}\n";
    expectInputError(() => parseNpy(npyWithHeader(header), "deep.npy"), { file: "deep.npy", message: ["nested too deeply"] });
  });
});
