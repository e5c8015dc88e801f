import { closeSync, mkdtempSync, openSync, readdirSync, readFileSync, rmSync, writeFileSync, writeSync, ftruncateSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";
import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { InputError } from "../../../src/errors.js";
import { edgeIndexOf, edgePairs } from "../../../src/edges/edgeIndex.js";
import { writeMatrixEdges } from "../../../src/io/connectomeEdges.js";
import { allocateEdgeData } from "../../../src/io/edgeData.js";
import {
  loadConnectomes,
  type ConnectomeOptions,
  type ConnectomeSubject,
  type LoadedConnectomes,
} from "../../../src/io/connectomes.js";
import { encodeNpy, parseNpy } from "../../../src/io/npy.js";
import { parseMatrixText } from "../../../src/io/matrixText.js";
import { readTextFile } from "../../../src/io/readInputFile.js";
import { expectInputError } from "./inputErrorAssertions.js";
import { mutateBytes, type ByteEdit } from "../../helpers/mutateBytes.js";

/**
 * The streaming .npy reader (one matrix at a time at its offset) and the block
 * transpose of the text loader, checked against the whole-file readers they
 * replace: parseNpy over the whole file (itself checked against numpy's np.load
 * in npy.test.ts) and one stride-S store per edge.
 */
const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), "../../fixtures/npy");
const PLAIN: ConnectomeOptions = { symmetrize: false, asymmetryTolerance: 1e-9, transform: "none" };
const SYMMETRIZE: ConnectomeOptions = { ...PLAIN, symmetrize: true };

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), "plexus-io-stack-"));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

let fileCounter = 0;
function writeFile(bytes: Uint8Array | string, name = `f${fileCounter++}.npy`): string {
  const path = join(dir, name);
  writeFileSync(path, bytes);
  return path;
}

function subject(id: string, tableRow: number): ConnectomeSubject {
  return { id, tableRow, values: { participant_id: id } };
}

/** Bit-for-bit equality (tolerance 0); on failure prints the input, index, expected, actual and difference. */
function expectIdentical(actual: Float64Array, expected: Float64Array, input: string): void {
  expect(actual.length, `${input}: length`).toBe(expected.length);
  for (let k = 0; k < expected.length; k++) {
    if (!Object.is(actual[k], expected[k])) {
      throw new Error(
        `${input}[${k}]: expected ${expected[k]}, actual ${actual[k]}, difference ${actual[k] - expected[k]}, tolerance 0 (identical bits)`,
      );
    }
  }
}

/**
 * The stack loader as it was before streaming: parseNpy on the whole file, the
 * same shape checks and messages, then one stride-S store per edge.
 */
function wholeFileLoad(file: string, subjects: ConnectomeSubject[], options: ConnectomeOptions): Omit<LoadedConnectomes, "reading"> {
  const stack = parseNpy(new Uint8Array(readFileSync(file)), file);
  const { shape } = stack;
  const rows = options.participantRowCount;
  const expected = `(${rows ?? "R"}, N, N) with ${rows ?? "R"} = the rows of the participants table`;
  if (shape.length !== 3 || shape[1] !== shape[2]) {
    throw new InputError(`expected an array of shape ${expected}, found shape (${shape.join(", ")})`, { file });
  }
  const [count, n] = shape;
  if (rows !== undefined && count !== rows) {
    throw new InputError(
      `the stack holds ${count} matrices (shape (${shape.join(", ")})) but the participants table has ${rows} rows; expected shape ${expected}`,
      { file },
    );
  }
  for (const s of subjects) {
    if (!(s.tableRow >= 0 && s.tableRow < count)) {
      throw new InputError(
        `participant '${s.id}' is row ${s.tableRow + 1} of the participants table, but the stack holds only ${count} matrices (shape (${shape.join(", ")}))`,
        { file },
      );
    }
  }
  if (n < 2) throw new InputError(`a ${n} × ${n} matrix has no edges; at least 2 regions are needed`, { file });
  const pairs = edgePairs(n);
  const data = allocateEdgeData(subjects.length, pairs.edgeCount, {});
  subjects.forEach((s, k) =>
    writeMatrixEdges(
      stack.data,
      s.tableRow * n * n,
      pairs,
      data,
      k,
      options,
      { file, label: `matrix ${s.tableRow + 1} of the stack (participant '${s.id}')` },
      subjects.length,
    ),
  );
  return { regionCount: n, edgeCount: pairs.edgeCount, subjectCount: subjects.length, data, files: [file] };
}

type Outcome = { data: Float64Array; regionCount: number } | { error: { message: string; location: object; hint?: string } };

function outcome(action: () => Omit<LoadedConnectomes, "reading">): Outcome {
  try {
    const loaded = action();
    return { data: loaded.data, regionCount: loaded.regionCount };
  } catch (error) {
    if (!(error instanceof InputError)) throw error;
    return { error: { message: error.message, location: error.location, hint: error.hint } };
  }
}

/** The streaming loader and the whole-file loader give identical data, or the same InputError (message, location, hint). */
function expectSameAsWholeFile(path: string, subjects: ConnectomeSubject[], options: ConnectomeOptions, input: string): Outcome {
  const reference = outcome(() => wholeFileLoad(resolve(path), subjects, options));
  const streamed = outcome(() => loadConnectomes({ kind: "file", path }, subjects, options));
  if ("error" in reference) {
    expect(streamed, input).toEqual(reference);
  } else {
    expect("data" in streamed ? "data" : (streamed as { error: unknown }).error, input).toBe("data");
    const data = (streamed as { data: Float64Array }).data;
    expectIdentical(data, reference.data, input);
  }
  return streamed;
}

/** A .npy version 1.0 file with the given header fields and raw data bytes. */
function npyFile(descr: string, fortranOrder: boolean, shape: number[], data: Uint8Array): Uint8Array {
  const header = npyHeaderBytes(descr, fortranOrder, shape);
  const out = new Uint8Array(header.length + data.length);
  out.set(header);
  out.set(data, header.length);
  return out;
}

function npyHeaderBytes(descr: string, fortranOrder: boolean, shape: number[]): Uint8Array {
  const shapeText = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(", ")})`;
  let header = `{'descr': '${descr}', 'fortran_order': ${fortranOrder ? "True" : "False"}, 'shape': ${shapeText}, }`;
  header += " ".repeat((64 - ((10 + header.length + 1) % 64)) % 64) + "\n";
  const out = new Uint8Array(10 + header.length);
  out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]);
  new DataView(out.buffer).setUint16(8, header.length, true);
  for (let k = 0; k < header.length; k++) out[10 + k] = header.charCodeAt(k);
  return out;
}

/** Encodes values (C order) as the dtype `descr` (values must be representable in it). */
function encodeAs(descr: string, values: number[]): Uint8Array {
  const littleEndian = descr[0] !== ">";
  const kind = descr[1];
  const size = Number(descr.slice(2));
  const out = new Uint8Array(values.length * size);
  const view = new DataView(out.buffer);
  values.forEach((v, k) => {
    const o = k * size;
    if (kind === "f") {
      if (size === 8) view.setFloat64(o, v, littleEndian);
      else view.setFloat32(o, v, littleEndian);
    } else if (kind === "b") {
      view.setUint8(o, v !== 0 ? 1 : 0);
    } else if (kind === "i") {
      if (size === 1) view.setInt8(o, v);
      else if (size === 2) view.setInt16(o, v, littleEndian);
      else if (size === 4) view.setInt32(o, v, littleEndian);
      else view.setBigInt64(o, BigInt(v), littleEndian);
    } else {
      if (size === 1) view.setUint8(o, v);
      else if (size === 2) view.setUint16(o, v, littleEndian);
      else if (size === 4) view.setUint32(o, v, littleEndian);
      else view.setBigUint64(o, BigInt(v), littleEndian);
    }
  });
  return out;
}

/** R symmetric N × N matrices of small integers (exact in every dtype), flattened in C order. */
function integerStack(count: number, n: number, bool = false): number[] {
  const values: number[] = [];
  for (let s = 0; s < count; s++) {
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        const a = Math.min(i, j);
        const b = Math.max(i, j);
        const v = (3 * s + 5 * a + 7 * b) % 11;
        values.push(bool ? v % 2 : i === j ? 0 : v);
      }
    }
  }
  return values;
}

/** Reorders C-order values of `shape` into Fortran (column-major) order. */
function toFortranOrder(values: number[], shape: number[]): number[] {
  const [a, b, c] = shape;
  const out = new Array<number>(values.length);
  for (let i = 0; i < a; i++) for (let j = 0; j < b; j++) for (let k = 0; k < c; k++) out[i + a * j + a * b * k] = values[(i * b + j) * c + k];
  return out;
}

describe("the streaming .npy reader equals the whole-file reader", () => {
  it.each(readdirSync(FIXTURES).filter((name) => name.endsWith(".npy")))(
    "on the numpy fixture %s (data, or the same InputError)",
    (name) => {
      const path = join(FIXTURES, name);
      const shape = parseNpy(new Uint8Array(readFileSync(path)), path).shape;
      const rows = shape.length > 0 ? shape[0] : 0;
      const subjects = Array.from({ length: rows }, (_, k) => subject(`sub-${k + 1}`, k)).reverse();
      for (const options of [SYMMETRIZE, PLAIN, { ...SYMMETRIZE, participantRowCount: rows }]) {
        expectSameAsWholeFile(path, subjects, options, `${name} with ${JSON.stringify(options)}`);
      }
    },
  );

  it("the C-order fixture stack_2x3x3.npy is read, not rejected (source: numpy's np.save)", () => {
    const streamed = expectSameAsWholeFile(join(FIXTURES, "stack_2x3x3.npy"), [subject("b", 1), subject("a", 0)], SYMMETRIZE, "stack");
    expect("data" in streamed && streamed.regionCount).toBe(3);
  });

  it("random float64 stacks written by encodeNpy, subjects chosen by table row in any order (property)", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 6 }),
        fc.integer({ min: 2, max: 7 }),
        fc.integer({ min: 0, max: 2 ** 31 }),
        fc.boolean(),
        fc.boolean(),
        (count, n, seed, symmetrize, fisher) => {
          let state = seed;
          const next = (): number => {
            state = (Math.imul(state, 1103515245) + 12345) >>> 0;
            return state / 4294967296;
          };
          const values = new Float64Array(count * n * n);
          for (let s = 0; s < count; s++) {
            for (let i = 0; i < n; i++) {
              for (let j = i; j < n; j++) {
                const v = 1.8 * next() - 0.9;
                values[(s * n + i) * n + j] = v;
                values[(s * n + j) * n + i] = symmetrize ? 1.8 * next() - 0.9 : v;
              }
            }
          }
          const path = writeFile(encodeNpy([count, n, n], values));
          const rows = Array.from({ length: count }, (_, k) => k).filter(() => next() < 0.7);
          rows.sort(() => next() - 0.5);
          const subjects = rows.map((r) => subject(`s${r}`, r));
          const options: ConnectomeOptions = { ...PLAIN, symmetrize, transform: fisher ? "fisher-z" : "none", participantRowCount: count };
          const streamed = expectSameAsWholeFile(path, subjects, options, `S=${count} N=${n} seed ${seed} rows ${rows}`);
          expect("data" in streamed).toBe(true);
        },
      ),
      { numRuns: 200 },
    );
  });

  const dtypes = ["<f8", ">f8", "=f8", "<f4", ">f4", "<i8", ">i8", "<i4", ">i4", "<i2", ">i2", "|i1", "<u8", ">u8", "<u4", ">u4", "<u2", ">u2", "|u1", "|b1"];
  it.each(dtypes)("on a stack of dtype '%s', in C order", (descr) => {
    const shape = [4, 5, 5];
    const path = writeFile(npyFile(descr, false, shape, encodeAs(descr, integerStack(4, 5, descr === "|b1"))));
    const streamed = expectSameAsWholeFile(path, [subject("c", 2), subject("a", 0), subject("d", 3)], PLAIN, descr);
    expect("data" in streamed).toBe(true);
  });

  it.each(["<f8", ">f4", "<i2", "|u1"])("on a Fortran-order stack of dtype '%s'", (descr) => {
    const shape = [3, 4, 4];
    const values = toFortranOrder(integerStack(3, 4), shape);
    const path = writeFile(npyFile(descr, true, shape, encodeAs(descr, values)));
    const streamed = expectSameAsWholeFile(path, [subject("b", 1), subject("c", 2), subject("a", 0)], PLAIN, `${descr} Fortran`);
    expect("data" in streamed).toBe(true);
    // Independent check of the layout: matrix 2, row 1, column 3 (0-based) is (3·1 + 5·1 + 7·3) mod 11 = 7.
    expect((streamed as { data: Float64Array }).data[edgeIndexOf(4, 1, 3) * 3 + 0]).toBe((3 + 5 + 21) % 11);
  });

  it("mutated stacks (bytes changed, cut, inserted) give the same data or the same InputError (property)", () => {
    const sources = [
      encodeNpy([3, 3, 3], Float64Array.from(integerStack(3, 3))),
      npyFile(">i2", false, [2, 4, 4], encodeAs(">i2", integerStack(2, 4))),
      npyFile("<f4", true, [2, 3, 3], encodeAs("<f4", toFortranOrder(integerStack(2, 3), [2, 3, 3]))),
    ];
    const mutation = fc.record({
      source: fc.nat(sources.length - 1),
      edits: fc.array(fc.tuple(fc.constantFrom("set", "cut", "insert"), fc.nat(300), fc.integer({ min: 0, max: 255 })), {
        minLength: 1,
        maxLength: 3,
      }),
      rowCount: fc.option(fc.integer({ min: 1, max: 4 }), { nil: undefined }),
    });
    fc.assert(
      fc.property(mutation, ({ source, edits, rowCount }) => {
        const bytes = mutateBytes(sources[source], edits as ByteEdit[]);
        const path = writeFile(bytes, "mutated.npy");
        expectSameAsWholeFile(path, [subject("b", 1), subject("a", 0)], { ...SYMMETRIZE, participantRowCount: rowCount }, `edits ${JSON.stringify(edits)}`);
      }),
      { numRuns: 400 },
    );
  });
});

describe("reading .npy stacks one matrix at a time", () => {
  it("a truncated stack is an InputError naming the file", () => {
    const full = encodeNpy([3, 3, 3], Float64Array.from(integerStack(3, 3)));
    const path = writeFile(full.subarray(0, full.length - 20));
    expectInputError(() => loadConnectomes({ kind: "file", path }, [subject("a", 0)], PLAIN), {
      file: resolve(path),
      message: ["not a readable .npy file", "truncated data", "216 bytes", "196 follow the header"],
    });
    const headerOnly = writeFile(full.subarray(0, 40));
    expectInputError(() => loadConnectomes({ kind: "file", path: headerOnly }, [subject("a", 0)], PLAIN), {
      file: resolve(headerOnly),
      message: ["not a readable .npy file", "header claims"],
    });
  });

  it("a stack of more than 2 GiB is read, only the subjects' matrices (a sparse file)", () => {
    // 270 matrices of 1000 × 1000 float64: 2.16e9 bytes of data, more than readFileSync can return.
    const count = 270;
    const n = 1000;
    const header = npyHeaderBytes("<f8", false, [count, n, n]);
    const path = join(dir, "large.npy");
    const matrixBytes = n * n * 8;
    const fd = openSync(path, "w");
    try {
      writeSync(fd, header, 0, header.length, 0);
      ftruncateSync(fd, header.length + count * matrixBytes); // the rest reads as zeros
      const last = new Float64Array(n * n);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) last[i * n + j] = i === j ? 1 : (Math.min(i, j) + 2 * Math.max(i, j)) / 4096;
      writeSync(fd, new Uint8Array(last.buffer), 0, matrixBytes, header.length + (count - 1) * matrixBytes);
    } finally {
      closeSync(fd);
    }
    const loaded = loadConnectomes({ kind: "file", path }, [subject("last", count - 1), subject("first", 0)], {
      ...PLAIN,
      participantRowCount: count,
    });
    expect(loaded).toMatchObject({ regionCount: n, edgeCount: (n * (n - 1)) / 2, subjectCount: 2 });
    for (const [i, j] of [[0, 1], [0, 999], [417, 418], [998, 999]]) {
      const e = edgeIndexOf(n, i, j);
      expect(loaded.data[2 * e], `last matrix (${i}, ${j})`).toBe((i + 2 * j) / 4096);
      expect(loaded.data[2 * e + 1], `first matrix (${i}, ${j})`).toBe(0);
    }
    rmSync(path);
  });

  it("a Fortran-order stack of more than 1 GiB is an InputError suggesting C order", () => {
    const shape = [140, 1000, 1000]; // 1.12e9 bytes of float64
    const header = npyHeaderBytes("<f8", true, shape);
    const path = join(dir, "fortran-large.npy");
    const fd = openSync(path, "w");
    try {
      writeSync(fd, header, 0, header.length, 0);
      ftruncateSync(fd, header.length + 140 * 1000 * 1000 * 8);
    } finally {
      closeSync(fd);
    }
    expectInputError(() => loadConnectomes({ kind: "file", path }, [subject("a", 0)], PLAIN), {
      file: resolve(path),
      message: ["Fortran order", "1 GiB", "1120000000 bytes"],
      hint: /C order/,
    });
    rmSync(path);
  });
});

describe("the text loader's block transpose", () => {
  /** The edge-major array as the loader built it before: one stride-S store per edge. */
  function stridedTextReference(files: string[], options: ConnectomeOptions): Float64Array {
    const matrices = files.map((f) => parseMatrixText(readTextFile(f), f, { allowNonFiniteDiagonal: true }));
    const pairs = edgePairs(matrices[0].size);
    const out = new Float64Array(files.length * pairs.edgeCount);
    matrices.forEach((m, s) => writeMatrixEdges(m.values, 0, pairs, out, s, options, { file: files[s], rowLines: m.rowLines }, files.length));
    return out;
  }

  it.each([1, 15, 16, 17, 37])("gives the same array for %i subjects (not always a multiple of the block)", (count) => {
    const n = 6;
    const subjects = Array.from({ length: count }, (_, k) => subject(`sub-${String(k + 1).padStart(2, "0")}`, k));
    const files = subjects.map((s, k) => {
      const rows: string[] = [];
      for (let i = 0; i < n; i++) {
        const cells: string[] = [];
        for (let j = 0; j < n; j++) cells.push(i === j ? "1" : String(Math.sin(1000 * k + 10 * Math.min(i, j) + Math.max(i, j)) * 0.9));
        rows.push(cells.join(k % 3 === 0 ? "," : "\t"));
      }
      // Some files with a byte-order mark and CRLF line ends.
      const text = k % 4 === 1 ? "\ufeff" + rows.join("\r\n") + "\r\n" : rows.join("\n") + "\n";
      return writeFile(text, `${s.id}-${count}.txt`);
    });
    const options: ConnectomeOptions = { ...PLAIN, transform: "fisher-z" };
    const loaded = loadConnectomes({ kind: "template", template: `{participant_id}-${count}.txt`, baseDir: dir }, subjects, options);
    expectIdentical(loaded.data, stridedTextReference(files, options), `${count} subjects`);
  });
});
