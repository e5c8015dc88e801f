import fc from "fast-check";
import { Matrix } from "ml-matrix";
import { describe, expect, it } from "vitest";
import { placeColumnMajorBlock } from "../../../src/io/arrays/columnMajor.js";

/** Column-major (MATLAB's storage) position of each index over `dims`: i0 + d0·i1 + d0·d1·i2 + … */
function columnMajorOffset(index: readonly number[], dims: readonly number[]): number {
  let offset = 0;
  for (let k = dims.length - 1; k >= 0; k--) offset = offset * dims[k] + index[k];
  return offset;
}

/** Every index over `dims` in C order (the last varies fastest). */
function* cOrder(dims: readonly number[]): Generator<number[]> {
  const total = dims.reduce((p, d) => p * d, 1);
  for (let flat = 0; flat < total; flat++) {
    const index = new Array<number>(dims.length);
    for (let k = dims.length - 1, rest = flat; k >= 0; k--) {
      index[k] = rest % dims[k];
      rest = Math.floor(rest / dims[k]);
    }
    yield index;
  }
}

/** Stored column-major over dims, placed a block of the last axis at a time. */
function placeInBlocks(stored: Float64Array, dims: readonly number[], cuts: readonly number[]): Float64Array {
  const out = new Float64Array(stored.length).fill(NaN);
  const last = dims[dims.length - 1];
  const run = stored.length / last;
  const bounds = [0, ...cuts.filter((c) => c > 0 && c < last).sort((a, b) => a - b), last];
  for (let b = 0; b + 1 < bounds.length; b++) {
    const [first, end] = [bounds[b], bounds[b + 1]];
    if (end > first) placeColumnMajorBlock(stored.subarray(first * run, end * run), dims, first, end - first, out);
  }
  return out;
}

describe("placeColumnMajorBlock (MATLAB's column-major storage to C order)", () => {
  it("a 2-D matrix is its transpose as stored (checked against ml-matrix's transpose)", () => {
    const stored = Float64Array.from({ length: 12 }, (_, k) => k + 0.5); // 3 × 4 column-major: HDF5 sees 4 × 3
    const out = placeInBlocks(stored, [3, 4], [1, 3]);
    // Source: ml-matrix, the 4 × 3 stored rows transposed to 3 × 4.
    const expected = new Matrix(Array.from({ length: 4 }, (_, r) => Array.from(stored.subarray(r * 3, r * 3 + 3)))).transpose().to1DArray();
    expect(Array.from(out)).toEqual(expected);
  });

  it("puts element (i0, …, ik) of any shape where C order says, whatever the blocks (fast-check)", () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 1, max: 4 }), { minLength: 1, maxLength: 4 }), fc.array(fc.nat({ max: 4 }), { maxLength: 3 }), (dims, cuts) => {
        const total = dims.reduce((p, d) => p * d, 1);
        const stored = Float64Array.from({ length: total }, (_, k) => k);
        const out = placeInBlocks(stored, dims, cuts);
        let flat = 0;
        for (const index of cOrder(dims)) {
          // Source: the definition of column-major storage, element by element.
          expect(out[flat++], `dims ${dims.join(" × ")}, index (${index.join(", ")})`).toBe(stored[columnMajorOffset(index, dims)]);
        }
      }),
      { seed: 15 },
    );
  });
});
