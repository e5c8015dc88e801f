import type { KernelData } from "../permutedStatistics.js";
import { PERMUTE_KERNEL_BASE64, PERMUTE_KERNEL_TILE } from "./generated/permuteKernelBytes.js";

/**
 * The WebAssembly SIMD permutation kernel (source: build/permuteKernelWat.mjs).
 * It computes what permutedStatistics and weightedSums compute, bit for bit:
 * each f64x2 lane is one row's ordinary sum over subjects in ascending order,
 * so the vectors run across rows (relabelings' vectors), never across subjects.
 *
 * WebAssembly memory cannot alias the residuals' SharedArrayBuffer, so each
 * block of edges is copied in (one contiguous copy, since the residuals are
 * edge-major) and its statistics copied out; the copy costs O(S) per edge and
 * batch against O(S · rows) arithmetic. Each thread has its own instance.
 */
interface KernelExports {
  memory: { readonly buffer: ArrayBuffer; grow(pages: number): number };
  statisticsBlock(
    panel: number,
    rowTiles: number,
    S: number,
    residuals: number,
    width: number,
    products: number,
    batch: number,
    vectors: number,
    sumSquares: number,
    valid: number,
    effectNorm2: number,
    df: number,
    out: number,
    outStride: number,
  ): void;
  tileProducts(panel: number, rowTiles: number, S: number, residuals: number, products: number, paddedRows: number): void;
}

/** Bytes of residuals copied per block: small enough to stay in the level-2 cache while it is used. */
/**
 * The part of the WebAssembly JavaScript API used here, typed locally: the
 * project's compiler settings (lib ES2022, Node types) do not declare it.
 */
interface WebAssemblyApi {
  validate(bytes: Uint8Array): boolean;
  Module: new (bytes: Uint8Array) => object;
  Instance: new (module: object, imports: object) => { exports: unknown };
}

function webAssembly(): WebAssemblyApi | undefined {
  return (globalThis as { WebAssembly?: WebAssemblyApi }).WebAssembly;
}

const BLOCK_BYTES = 256 * 1024;
const PAGE_BYTES = 65536;
const ALIGN = 64;

function decodeBase64(text: string): Uint8Array {
  const binary = atob(text);
  const bytes = new Uint8Array(binary.length);
  for (let i = 0; i < binary.length; i++) bytes[i] = binary.charCodeAt(i);
  return bytes;
}

let bytesCache: Uint8Array | undefined;
function kernelBytes(): Uint8Array {
  bytesCache ??= decodeBase64(PERMUTE_KERNEL_BASE64);
  return bytesCache;
}

/**
 * Whether this engine runs WebAssembly SIMD: validating the kernel module itself
 * (1–2 kB) answers exactly the question, with no separate probe to keep in step.
 */
export function wasmSimdSupported(): boolean {
  try {
    return webAssembly()?.validate(kernelBytes()) === true;
  } catch {
    return false;
  }
}

/** Byte offsets of the regions of one kernel call. */
interface Layout {
  panel: number;
  residuals: number;
  products: number;
  sumSquares: number;
  valid: number;
  out: number;
  end: number;
}

const alignUp = (n: number): number => Math.ceil(n / ALIGN) * ALIGN;

export class WasmPermutationKernel {
  /** Rows per register tile (lanes × row pairs) and edges per tile. */
  readonly rowsPerTile = PERMUTE_KERNEL_TILE.rowPairs * 2;
  readonly edgesPerTile = PERMUTE_KERNEL_TILE.edgesPerTile;
  private readonly exports: KernelExports;
  private f64 = new Float64Array(0);
  private u8 = new Uint8Array(0);

  private constructor(exports: KernelExports) {
    this.exports = exports;
    this.refreshViews();
  }

  /** A new instance, or undefined where WebAssembly SIMD is missing. */
  static create(): WasmPermutationKernel | undefined {
    const api = webAssembly();
    if (!api || !wasmSimdSupported()) return undefined;
    const instance = new api.Instance(new api.Module(kernelBytes()), {});
    return new WasmPermutationKernel(instance.exports as unknown as KernelExports);
  }

  private refreshViews(): void {
    const buffer = this.exports.memory.buffer;
    if (this.f64.buffer !== buffer) {
      this.f64 = new Float64Array(buffer);
      this.u8 = new Uint8Array(buffer);
    }
  }

  private reserve(bytes: number): void {
    const have = this.exports.memory.buffer.byteLength;
    if (bytes > have) this.exports.memory.grow(Math.ceil((bytes - have) / PAGE_BYTES));
    this.refreshViews();
  }

  /** Edges per copied block for S subjects: a multiple of the edge tile. */
  blockWidth(S: number, E: number): number {
    const P = this.edgesPerTile;
    const fit = Math.max(1, Math.floor(BLOCK_BYTES / (8 * Math.max(1, S)) / P)) * P;
    return Math.min(fit, Math.ceil(E / P) * P);
  }

  private layout(S: number, paddedRows: number, width: number, batch: number): Layout {
    const panel = 0;
    const residuals = alignUp(panel + paddedRows * S * 8);
    const products = alignUp(residuals + width * S * 8);
    const sumSquares = alignUp(products + this.edgesPerTile * paddedRows * 8);
    const valid = alignUp(sumSquares + width * 8);
    const out = alignUp(valid + width);
    return { panel, residuals, products, sumSquares, valid, out, end: out + batch * width * 8 };
  }

  /** Packs rows × S weights by row tiles: panel[t][s][r] = weights[(t·RT + r)·S + s], zero past the last row. */
  private packWeights(weights: Float64Array, rows: number, S: number, rowTiles: number, at: number): void {
    const RT = this.rowsPerTile;
    const f64 = this.f64;
    let o = at / 8;
    for (let t = 0; t < rowTiles; t++) {
      for (let s = 0; s < S; s++) {
        for (let r = 0; r < RT; r++) {
          const j = t * RT + r;
          f64[o++] = j < rows ? weights[j * S + s] : 0;
        }
      }
    }
  }

  /** Same contract as permutedStatistics (weights: batch × vectors × S; out: batch × E). */
  statistics(data: KernelData, weights: Float64Array, batch: number, vectors: number, out: Float64Array): void {
    const { subjects: S, edges: E, residuals, sumSquares, valid, effectNorm2, df } = data;
    if (E === 0 || batch === 0) return;
    const rows = batch * vectors;
    const rowTiles = Math.ceil(rows / this.rowsPerTile);
    const paddedRows = rowTiles * this.rowsPerTile;
    const W = this.blockWidth(S, E);
    const at = this.layout(S, paddedRows, W, batch);
    this.reserve(at.end);
    this.packWeights(weights, rows, S, rowTiles, at.panel);
    const f64 = this.f64;
    const u8 = this.u8;
    const outBase = at.out / 8;
    for (let e0 = 0; e0 < E; e0 += W) {
      const width = Math.min(W, E - e0);
      f64.set(residuals.subarray(e0 * S, (e0 + width) * S), at.residuals / 8);
      f64.set(sumSquares.subarray(e0, e0 + width), at.sumSquares / 8);
      u8.set(valid.subarray(e0, e0 + width), at.valid);
      this.exports.statisticsBlock(
        at.panel,
        rowTiles,
        S,
        at.residuals,
        width,
        at.products,
        batch,
        vectors,
        at.sumSquares,
        at.valid,
        effectNorm2,
        df,
        at.out,
        W,
      );
      for (let b = 0; b < batch; b++) {
        out.set(f64.subarray(outBase + b * W, outBase + b * W + width), b * E + e0);
      }
    }
  }

  /** Same contract as weightedSums: products[j·width + i] for rows j and edges e0..e0+width−1. */
  weightedSums(
    residuals: Float64Array,
    S: number,
    weights: Float64Array,
    rows: number,
    e0: number,
    width: number,
    products: Float64Array,
  ): void {
    if (width === 0 || rows === 0) return;
    const P = this.edgesPerTile;
    const rowTiles = Math.ceil(rows / this.rowsPerTile);
    const paddedRows = rowTiles * this.rowsPerTile;
    const W = Math.ceil(width / P) * P;
    const at = this.layout(S, paddedRows, W, 0);
    this.reserve(at.end);
    this.packWeights(weights, rows, S, rowTiles, at.panel);
    const f64 = this.f64;
    f64.fill(0, at.residuals / 8, at.residuals / 8 + W * S);
    f64.set(residuals.subarray(e0 * S, (e0 + width) * S), at.residuals / 8);
    for (let i0 = 0; i0 < width; i0 += P) {
      this.exports.tileProducts(at.panel, rowTiles, S, at.residuals + i0 * S * 8, at.products, paddedRows);
      for (let p = 0; p < P && i0 + p < width; p++) {
        for (let j = 0; j < rows; j++) products[j * width + i0 + p] = f64[at.products / 8 + p * paddedRows + j];
      }
    }
  }
}
