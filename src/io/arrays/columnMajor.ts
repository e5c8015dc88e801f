/**
 * Places a block of an array stored column-major over `dims` (as MATLAB and
 * GNU Octave store every array, which HDF5 then describes with the dims
 * reversed) into `out` in C order over the same dims, the order every container
 * reader gives (arrayContainer.ts). The block holds positions `first` …
 * `first + count − 1` of the last axis (the slowest in storage), each a
 * column-major run over the leading axes.
 *
 * Element (i0, …, i_{k−2}, z) is block[(z − first)·P + i0 + d0·i1 + …] with P
 * the product of the leading dims; it goes to out[(…(i0·d1 + i1)·d2 …)·d_last + z].
 * Cost: one pass over the block; the writes are runs of `count` values.
 */
export function placeColumnMajorBlock(block: Float64Array, dims: readonly number[], first: number, count: number, out: Float64Array): void {
  const leading = dims.slice(0, -1);
  const last = dims[dims.length - 1];
  const strides = cOrderStrides(leading);
  const runLength = leading.reduce((product, d) => product * d, 1);
  const index = new Array<number>(leading.length).fill(0);
  let target = 0; // C-order position over the leading dims of storage position r
  for (let r = 0; r < runLength; r++) {
    const base = target * last + first;
    for (let z = 0, from = r; z < count; z++, from += runLength) out[base + z] = block[from];
    // Next storage position: axis 0 varies fastest.
    for (let k = 0; k < leading.length; k++) {
      target += strides[k];
      if (++index[k] < leading[k]) break;
      target -= strides[k] * leading[k];
      index[k] = 0;
    }
  }
}

function cOrderStrides(dims: readonly number[]): number[] {
  const strides = new Array<number>(dims.length);
  let stride = 1;
  for (let k = dims.length - 1; k >= 0; k--) {
    strides[k] = stride;
    stride *= dims[k];
  }
  return strides;
}
