// Column-major (MATLAB, GNU Octave, Fortran) values into the C order every container reader gives
// (arrayContainer.ts): a whole array at once (level-5 .mat) or block by block as HDF5 hands it out.

/** Rows of the first axis copied together: a cache line of the source holds 8 doubles along that axis. */
const ROWS = 8;
/** Values of the last axis copied per row in one pass, so the source's cache lines stay in cache between rows. */
const RUN = 256;

/**
 * The values of an array in C order (last index fastest) over `dims`, from its
 * values in column-major order (first index fastest) over the same dims, as
 * MATLAB and Fortran store them: element (i0, …, ik) moves from
 * Σ i_t · (d_0 ⋯ d_{t−1}) to Σ i_t · (d_{t+1} ⋯ d_k). Always a new array.
 *
 * Axes of extent 1 are dropped (they change neither order). The output is
 * written 8 rows of the first axis at a time, each row in order, so the writes
 * run forward and every source cache line read serves all 8 rows.
 */
export function columnMajorToC(source: Float64Array, dims: readonly number[]): Float64Array {
  const count = dims.reduce((product, d) => product * d, 1);
  const out = new Float64Array(count);
  const axes = dims.filter((d) => d !== 1);
  if (count === 0) return out;
  if (axes.length <= 1) {
    out.set(source.subarray(0, count));
    return out;
  }
  const first = axes[0];
  const last = axes[axes.length - 1];
  const middle = axes.slice(1, -1);
  const firstStrideOut = count / first; // C-order stride of the first axis
  const lastStrideIn = count / last; // column-major stride of the last axis
  const middleStrideIn: number[] = [];
  const middleStrideOut: number[] = [];
  for (let t = 0, strideIn = first; t < middle.length; strideIn *= middle[t], t++) middleStrideIn.push(strideIn);
  for (let t = middle.length - 1, strideOut = last; t >= 0; strideOut *= middle[t], t--) middleStrideOut[t] = strideOut;
  const middleCount = count / (first * last);
  const index = new Array<number>(middle.length);
  for (let i0 = 0; i0 < first; i0 += ROWS) {
    const i1 = Math.min(first, i0 + ROWS);
    index.fill(0);
    let middleIn = 0;
    let middleOut = 0;
    for (let m = 0; m < middleCount; m++) {
      for (let k0 = 0; k0 < last; k0 += RUN) {
        const k1 = Math.min(last, k0 + RUN);
        for (let i = i0; i < i1; i++) {
          const row = i * firstStrideOut + middleOut;
          for (let k = k0, from = i + middleIn + k0 * lastStrideIn; k < k1; k++, from += lastStrideIn) out[row + k] = source[from];
        }
      }
      for (let t = middle.length - 1; t >= 0; t--) {
        index[t]++;
        middleIn += middleStrideIn[t];
        middleOut += middleStrideOut[t];
        if (index[t] < middle[t]) break;
        index[t] = 0;
        middleIn -= middleStrideIn[t] * middle[t];
        middleOut -= middleStrideOut[t] * middle[t];
      }
    }
  }
  return out;
}

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
