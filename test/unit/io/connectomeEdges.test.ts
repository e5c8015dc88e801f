import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { InputError } from "../../../src/errors.js";
import { edgePairs } from "../../../src/edges/edgeIndex.js";
import {
  EdgeMajorWriter,
  transposeBlock,
  writeMatrixEdges,
  type EdgeExtractionOptions,
} from "../../../src/io/connectomeEdges.js";

const PLAIN: EdgeExtractionOptions = { symmetrize: false, asymmetryTolerance: 1e-9, transform: "none" };

/** Bit-for-bit equality (tolerance 0, −0 ≠ +0); on failure prints the input, index, expected, actual and difference. */
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

/** A deterministic symmetric N × N matrix with entries in (−1, 1) (a linear congruential sequence from `seed`). */
function symmetricMatrix(n: number, seed: number): Float64Array {
  let state = seed >>> 0 || 1;
  const next = (): number => {
    state = (Math.imul(state, 1103515245) + 12345) >>> 0;
    return state / 4294967296 - 0.5;
  };
  const m = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    m[i * n + i] = 1;
    for (let j = i + 1; j < n; j++) m[i * n + j] = m[j * n + i] = 1.9 * next();
  }
  return m;
}

/**
 * The edges as the documentation of writeMatrixEdges defines them, written
 * independently: row-major upper triangle, a_ij (or (a_ij + a_ji) / 2), then atanh for fisher-z.
 */
function documentedEdges(matrix: Float64Array, n: number, options: EdgeExtractionOptions): number[] {
  const out: number[] = [];
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const value = options.symmetrize ? (matrix[i * n + j] + matrix[j * n + i]) / 2 : matrix[i * n + j];
      out.push(options.transform === "fisher-z" ? Math.atanh(value) : value);
    }
  }
  return out;
}

/** The edge-major array filled one stride-S store at a time (how the loaders filled it before EdgeMajorWriter). */
function stridedReference(matrices: Float64Array[], n: number, options: EdgeExtractionOptions): Float64Array {
  const pairs = edgePairs(n);
  const out = new Float64Array(matrices.length * pairs.edgeCount);
  matrices.forEach((m, s) => writeMatrixEdges(m, 0, pairs, out, s, options, { file: "m.txt" }, matrices.length));
  return out;
}

describe("writeMatrixEdges", () => {
  it.each([
    ["plain", PLAIN],
    ["symmetrize", { ...PLAIN, symmetrize: true }],
    ["fisher-z", { ...PLAIN, transform: "fisher-z" }],
    ["symmetrize + fisher-z", { ...PLAIN, symmetrize: true, transform: "fisher-z" }],
  ] as [string, EdgeExtractionOptions][])("gives the documented edges in edge order (%s)", (_name, options) => {
    for (const n of [2, 3, 7, 30, 33, 64, 65, 97]) {
      const m = symmetricMatrix(n, n);
      if (options.symmetrize) m[0 * n + 1] += 0.01; // make the triangles differ
      const pairs = edgePairs(n);
      const out = new Float64Array(pairs.edgeCount);
      writeMatrixEdges(m, 0, pairs, out, 0, options, { file: "m.txt" });
      expectIdentical(out, Float64Array.from(documentedEdges(m, n, options)), `n = ${n}`);
    }
  });

  it("an error in a later tile is still the first bad cell in row-major order", () => {
    const n = 70;
    const m = symmetricMatrix(n, 3);
    m[1 * n + 60] = 0.5; // row 2, column 61
    m[40 * n + 45] = Number.NaN; // row 41, column 46: after it in row-major order
    const pairs = edgePairs(n);
    const out = new Float64Array(pairs.edgeCount);
    expect(() => writeMatrixEdges(m, 0, pairs, out, 0, PLAIN, { file: "m.txt" })).toThrow(/row 2, column 61/);
  });

  it("reads a matrix at an offset and writes with a stride and an offset", () => {
    const n = 5;
    const m = symmetricMatrix(n, 9);
    const padded = new Float64Array(3 + n * n);
    padded.set(m, 3);
    const pairs = edgePairs(n);
    const out = new Float64Array(3 * pairs.edgeCount);
    writeMatrixEdges(padded, 3, pairs, out, 2, PLAIN, { file: "m.txt" }, 3);
    const expected = documentedEdges(m, n, PLAIN);
    expectIdentical(Float64Array.from(pairs.regionA, (_a, e) => out[2 + 3 * e]), Float64Array.from(expected), "stride 3");
  });
});

describe("transposeBlock", () => {
  it("out[e·stride + first + r] = block[r·E + e], for edge counts around the tile size and any number of rows", () => {
    for (const edgeCount of [1, 255, 256, 257, 600]) {
      for (const rows of [1, 5, 16]) {
        const stride = rows + 3;
        const first = 2;
        const block = Float64Array.from({ length: rows * edgeCount }, (_, k) => k + 0.5);
        const out = new Float64Array(edgeCount * stride).fill(-1);
        transposeBlock(block, rows, edgeCount, out, stride, first);
        const expected = new Float64Array(edgeCount * stride).fill(-1);
        for (let e = 0; e < edgeCount; e++) for (let r = 0; r < rows; r++) expected[e * stride + first + r] = block[r * edgeCount + e];
        expectIdentical(out, expected, `E = ${edgeCount}, rows = ${rows}`);
      }
    }
  });
});

describe("EdgeMajorWriter", () => {
  it("gives the same array as one stride-S store per edge, for S not a multiple of the block size", () => {
    for (const n of [2, 9, 25]) {
      for (const subjects of [1, 3, 15, 16, 17, 37]) {
        for (const blockSize of [1, 4, 16, 64]) {
          const matrices = Array.from({ length: subjects }, (_, s) => symmetricMatrix(n, 100 * n + s));
          const options: EdgeExtractionOptions = { ...PLAIN, transform: "fisher-z" };
          const pairs = edgePairs(n);
          const out = new Float64Array(subjects * pairs.edgeCount);
          const writer = new EdgeMajorWriter(pairs, out, subjects, blockSize);
          matrices.forEach((m) => writer.add(m, 0, options, { file: "m.txt" }));
          expectIdentical(out, stridedReference(matrices, n, options), `n = ${n}, S = ${subjects}, B = ${blockSize}`);
        }
      }
    }
  });

  it("random sizes, block sizes and values (property)", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 12 }),
        fc.integer({ min: 1, max: 40 }),
        fc.integer({ min: 1, max: 20 }),
        fc.integer(),
        fc.boolean(),
        (n, subjects, blockSize, seed, symmetrize) => {
          const matrices = Array.from({ length: subjects }, (_, s) => symmetricMatrix(n, seed + s));
          const options: EdgeExtractionOptions = { ...PLAIN, symmetrize };
          const pairs = edgePairs(n);
          const out = new Float64Array(subjects * pairs.edgeCount);
          const writer = new EdgeMajorWriter(pairs, out, subjects, blockSize);
          matrices.forEach((m) => writer.add(m, 0, options, { file: "m.txt" }));
          expectIdentical(out, stridedReference(matrices, n, options), `n = ${n}, S = ${subjects}, B = ${blockSize}, seed ${seed}`);
        },
      ),
      { numRuns: 300 },
    );
  });

  it("a bad matrix raises the InputError writeMatrixEdges raises for it", () => {
    const n = 4;
    const bad = symmetricMatrix(n, 3);
    bad[2 * n + 1] = 0.75; // row 3, column 2 differs from row 2, column 3
    const origin = { file: "s2.txt", rowLines: [1, 2, 3, 4] };
    const pairs = edgePairs(n);
    const writer = new EdgeMajorWriter(pairs, new Float64Array(3 * pairs.edgeCount), 3);
    writer.add(symmetricMatrix(n, 1), 0, PLAIN, { file: "s1.txt" });
    let ours: unknown;
    try {
      writer.add(bad, 0, PLAIN, origin);
    } catch (error) {
      ours = error;
    }
    let reference: unknown;
    try {
      writeMatrixEdges(bad, 0, pairs, new Float64Array(pairs.edgeCount), 0, PLAIN, origin);
    } catch (error) {
      reference = error;
    }
    expect(ours).toBeInstanceOf(InputError);
    expect(reference).toBeInstanceOf(InputError);
    expect((ours as InputError).format()).toBe((reference as InputError).format());
    expect((ours as InputError).location).toEqual({ file: "s2.txt", line: 2, column: 3 });
  });

  it("more subjects than announced, or an array of the wrong length, is a programming error (RangeError)", () => {
    const pairs = edgePairs(3);
    expect(() => new EdgeMajorWriter(pairs, new Float64Array(5), 2)).toThrow(RangeError);
    const writer = new EdgeMajorWriter(pairs, new Float64Array(pairs.edgeCount), 1);
    writer.add(symmetricMatrix(3, 1), 0, PLAIN, { file: "a" });
    expect(() => writer.add(symmetricMatrix(3, 2), 0, PLAIN, { file: "b" })).toThrow(RangeError);
  });
});
