import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { columnMajorToC } from "../../../src/io/arrays/columnMajor.js";

/** Element by element from the definition: C-order index Σ i_t·(d_{t+1}⋯d_k) takes column-major index Σ i_t·(d_0⋯d_{t−1}). */
function byDefinition(source: Float64Array, dims: number[]): Float64Array {
  const count = dims.reduce((a, b) => a * b, 1);
  const out = new Float64Array(count);
  for (let c = 0; c < count; c++) {
    let rest = c;
    let from = 0;
    const index: number[] = new Array(dims.length);
    for (let t = dims.length - 1; t >= 0; t--) {
      index[t] = rest % dims[t];
      rest = Math.floor(rest / dims[t]);
    }
    for (let t = dims.length - 1; t >= 0; t--) from = from * dims[t] + index[t];
    out[c] = source[from];
  }
  return out;
}

/** Exact equality, element by element (tolerance 0), naming the first difference. */
function expectSame(actual: Float64Array, expected: Float64Array, dims: number[]): void {
  expect(actual.length).toBe(expected.length);
  for (let k = 0; k < expected.length; k++) {
    if (actual[k] !== expected[k]) throw new Error(`dims ${dims.join(" × ")}, index ${k}: expected ${expected[k]}, actual ${actual[k]} (tolerance 0)`);
  }
}

function sequence(count: number): Float64Array {
  return Float64Array.from({ length: count }, (_, k) => k + 0.5);
}

describe("columnMajorToC", () => {
  it("a 2 × 3 matrix: MATLAB's [1 2 3; 4 5 6] is stored 1 4 2 5 3 6", () => {
    expect(Array.from(columnMajorToC(new Float64Array([1, 4, 2, 5, 3, 6]), [2, 3]))).toEqual([1, 2, 3, 4, 5, 6]);
  });

  it("N × N × S with blocks cut at the edges (33 × 33 × 300) matches the definition", () => {
    const dims = [33, 33, 300];
    const source = sequence(33 * 33 * 300);
    expectSame(columnMajorToC(source, dims), byDefinition(source, dims), dims);
  });

  it("any shape up to 5 axes (axes of extent 0 and 1 included) matches the definition, and never aliases its input", () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: 40 }), { minLength: 1, maxLength: 5 }), (dims) => {
        fc.pre(dims.reduce((a, b) => a * b, 1) <= 20_000);
        const source = sequence(dims.reduce((a, b) => a * b, 1));
        const out = columnMajorToC(source, dims);
        expect(out.buffer).not.toBe(source.buffer);
        expectSame(out, byDefinition(source, dims), dims);
      }),
      { numRuns: 300 },
    );
  });
});
