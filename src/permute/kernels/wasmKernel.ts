import type { KernelData } from "../permutedStatistics.js";
import { residualSums, type TwoLevelEffect } from "./groupSums.js";
import { PERMUTE_KERNEL_BASE64, PERMUTE_KERNEL_TILE } from "./generated/permuteKernelBytes.js";
import type { KernelExports } from "./generated/kernelSignatures.js";
import { weightSteps, type QuantizedScales } from "../screening.js";

/**
 * The WebAssembly SIMD permutation kernel (source: build/permuteKernelWat.mjs).
 * It computes what permutedStatistics and weightedSums compute, bit for bit:
 * each f64x2 lane is one row's ordinary sum over subjects in ascending order,
 * so the vectors run across rows (relabelings' vectors), never across subjects.
 *
 * WebAssembly memory cannot alias the residuals' SharedArrayBuffer, so each
 * block of edges is copied in (one contiguous copy, since the residuals are
 * edge-major); the copy costs O(S) per edge and batch against O(S · rows)
 * arithmetic. The statistics are written in place into a batch × E array in
 * WebAssembly memory that the caller reads. Each thread has its own instance.
 * The exports are declared (KernelExports) from the description the generators
 * write them from (build/kernelExports.mjs).
 */

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

/** Bytes of residuals copied per block: small enough to stay in the level-2 cache while it is used. */
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

/**
 * Repeated kernel calls on the same data: fill `weights` (batch × vectors × S,
 * row-major as for permutedStatistics), call run(batch), read `statistics`
 * (batch × E, written in place in WebAssembly memory: no copy out). Memory is
 * reserved once, so both views stay valid until the next prepareBatch on the
 * same instance (one batch at a time per thread).
 */
export interface KernelBatch {
  weights: Float64Array;
  statistics: Float64Array;
  run(batch: number): void;
}

/** The two-level path's batch: fill `members` (batch × groupSize ascending subject lists), run, read `statistics`. */
export interface GroupBatch {
  members: Int32Array;
  statistics: Float64Array;
  run(batch: number): void;
}

/**
 * A screened batch (../screening.ts): fill `weights` (batch × vectors × S, as
 * for permutedStatistics), call run(batch), then read for each relabeling b its
 * count counts[b] and, when count ≤ capacity, the ascending edges
 * lists[b·capacity …] whose statistic could reach the threshold.
 */
export interface ScreenBatch {
  weights: Float64Array;
  counts: Int32Array;
  lists: Int32Array;
  capacity: number;
  run(batch: number): void;
  /** Screens the next runs against another threshold. */
  setThreshold(threshold: number): void;
}

/** Single-precision bounds on an edge's group sum (screening.ts groupSumBounds): a sum at or beyond them is listed. */
export interface GroupSumBounds {
  sLo: Float32Array;
  sHi: Float32Array;
}

/** The two-level path's screened batch: fill `members`, run, read counts and lists as for ScreenBatch. */
export interface GroupScreenBatch {
  members: Int32Array;
  counts: Int32Array;
  lists: Int32Array;
  capacity: number;
  /**
   * The near lists: per relabeling, the edges beyond the near bounds but within the bounds (those a lower
   * threshold would add), in ascending order; a count above nearCapacity means the list is incomplete.
   */
  nearCounts: Int32Array;
  nearLists: Int32Array;
  nearCapacity: number;
  /** Screens slots 0..batch−1; chunkSize (subjects per subset table) defaults to groupChunkSize's choice. */
  run(batch: number, chunkSize?: number): void;
  /** Screens the next runs against other bounds (another threshold), and near bounds (none when omitted). */
  setBounds(bounds: GroupSumBounds, near?: GroupSumBounds): void;
}

/** What the products screen needs beyond the kernel data. */
export interface ScreenSettings {
  /** Per-edge quantization steps and error scales (screening.ts quantizedScales), with at least one tile of padding. */
  quantized: QuantizedScales;
  /** Edges the kernel may list (1) or not (0): the valid edges the screen can bound. */
  valid: Uint8Array;
  /** ‖v_k‖∞ of each relabeled vector. */
  norms: Float64Array;
  /** The screen's threshold (screening.ts screenThreshold). */
  threshold: number;
  upper: boolean;
  lower: boolean;
  capacity: number;
}

/**
 * On the products screen, up to this many bytes of integer residuals (2 bytes a
 * value) stay in a screening instance's memory for the whole run (no copy per
 * batch); larger data (1,000 regions × 500 subjects) are copied in and converted
 * block by block for each batch instead. (The two-level screen always converts per batch.)
 */
const RESIDENT_BYTES = 160 * 1024 * 1024;
/** Edges per block of the quantized products (the f32 sums of a block: 64 × rows × 4 bytes). */
const QUANTIZED_BLOCK_EDGES = 64;
/** Bytes of double-precision residuals copied per block when they are not resident (64 edges up to S = 16,000). */
const QUANTIZED_STAGING_BYTES = 8 * 1024 * 1024;
/**
 * Subjects per chunk of the group-sum subset tables, chosen per run from the
 * batch: each relabeling's sum is ⌈S/k⌉ table entries (one load and add of a
 * tile each) instead of its group's rows, and each tile first builds 2^k
 * entries per chunk (by doubling, about the cost of a lookup each). A large
 * batch amortises big tables (k = 7 for 512 relabelings); a small one (a retry
 * of a few relabelings) wants small ones. Measured by `npm run bench` (S = 200,
 * E = 79,800, 512 relabelings, one core, ms per relabeling): k = 4: 0.31,
 * 5: 0.25, 6: 0.21–0.25, 7: 0.19–0.21, 8: 0.21.
 */
export function groupChunkSize(subjects: number, batch: number): number {
  let best = MIN_CHUNK_SUBJECTS;
  let bestCost = Infinity;
  for (let k = MIN_CHUNK_SUBJECTS; k <= MAX_CHUNK_SUBJECTS; k++) {
    const chunks = Math.ceil(subjects / k);
    const cost = chunks * ((1 << k) + batch);
    if (cost < bestCost) {
      best = k;
      bestCost = cost;
    }
  }
  return best;
}
const MIN_CHUNK_SUBJECTS = 2;
const MAX_CHUNK_SUBJECTS = 8;
/** The resident limit in force (tests lower it to exercise the block-by-block path). */
export const screenMemory = { residentBytes: RESIDENT_BYTES };

/** Bytes of the products screen's integer residuals (tiles of 4 edges, pairs of subjects). */
function quantizedResidentBytes(subjects: number, edges: number): number {
  return Math.ceil(edges / 4) * Math.ceil(subjects / 2) * 16;
}

/** Whether the products screen keeps these residuals resident (otherwise each batch converts them block by block). */
export function quantizedResident(subjects: number, edges: number): boolean {
  return quantizedResidentBytes(subjects, edges) <= screenMemory.residentBytes;
}

/** Bytes of residuals per block on the two-level paths (copied, then transposed beside the copy: in double precision, or rounded to single). */
const GROUP_BLOCK_BYTES = 128 * 1024;

const alignUp = (n: number): number => Math.ceil(n / ALIGN) * ALIGN;

export class WasmPermutationKernel {
  /** Rows per register tile (lanes × row pairs) and edges per tile. */
  readonly rowsPerTile: number = PERMUTE_KERNEL_TILE.rowPairs * 2;
  readonly edgesPerTile: number = PERMUTE_KERNEL_TILE.edgesPerTile;
  readonly groupEdgesPerTile: number = PERMUTE_KERNEL_TILE.groupPairs * 2;
  /** The screen's tiles: rows per products tile, 4 edges per tile, and edges per group-sum tile. */
  readonly screenRowsPerTile: number = PERMUTE_KERNEL_TILE.rowQuads * 4;
  readonly screenEdgesPerTile = 4;
  readonly screenGroupEdgesPerTile: number = PERMUTE_KERNEL_TILE.groupQuads * 4;
  private readonly exports: KernelExports;
  private f64 = new Float64Array(0);
  private current: object | undefined;
  /** Residuals kept in single precision at offset 0 across screened batches: whose, and in which layout. */
  private resident: { data: KernelData; layout: string } | undefined;

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

  /** Marks memory as used by a new batch (or a test call); residuals kept resident survive only a screen's own re-preparation. */
  private claim(token: object | undefined, keepResident = false): void {
    this.current = token;
    if (!keepResident) this.resident = undefined;
  }

  private refreshViews(): void {
    const buffer = this.exports.memory.buffer;
    if (this.f64.buffer !== buffer) {
      this.f64 = new Float64Array(buffer);
    }
  }

  /** Grows the memory to `bytes`; false when the engine refuses (beyond 4 GiB or out of memory). */
  private reserve(bytes: number): boolean {
    const have = this.exports.memory.buffer.byteLength;
    if (bytes > have) {
      try {
        this.exports.memory.grow(Math.ceil((bytes - have) / PAGE_BYTES));
      } catch {
        return false;
      }
    }
    this.refreshViews();
    return true;
  }

  /** Copies the residuals (edge-major) to `at` W edges at a time (the last block narrower), calling body after each copy. */
  private eachBlock(residuals: Float64Array, S: number, E: number, W: number, at: number, body: (e0: number, width: number) => void): void {
    for (let e0 = 0; e0 < E; e0 += W) {
      const width = Math.min(W, E - e0);
      this.f64.set(residuals.subarray(e0 * S, (e0 + width) * S), at / 8);
      body(e0, width);
    }
  }

  /** Edges per copied block for S subjects: a multiple of the edge tile P. */
  blockWidth(S: number, E: number, P: number = this.edgesPerTile, bytes: number = BLOCK_BYTES): number {
    const fit = Math.max(1, Math.floor(bytes / (8 * Math.max(1, S)) / P)) * P;
    return Math.min(fit, Math.ceil(E / P) * P);
  }

  /** The valid flags as 64-bit lane masks (all ones or zero) at `at`, zero for `padding` edges past the end. */
  private writeValidMask(valid: Uint8Array, at: number, padding: number): void {
    const E = valid.length;
    const mask = new Int32Array(this.exports.memory.buffer, at, 2 * (E + padding));
    mask.fill(0);
    for (let e = 0; e < E; e++) {
      const bits = valid[e] === 0 ? 0 : -1;
      mask[2 * e] = bits;
      mask[2 * e + 1] = bits;
    }
  }

  /**
   * Packs rows × S weights as 16-bit integers by row tiles and subject pairs (screening.ts
   * quantizedScales): panel[t][j][r] = (q(s = 2j), q(2j + 1)) of row t·RT + r, with q = nearest(w / τ_k)
   * for the row's vector k = row mod vectors; zero past the last row and the last subject.
   */
  private packQuantizedWeights(weights: Float64Array, rows: number, vectors: number, S: number, rowTiles: number, inverse: Float64Array, at: number): void {
    const RT = this.screenRowsPerTile;
    const S2 = Math.ceil(S / 2);
    const i16 = new Int16Array(this.exports.memory.buffer, at, rowTiles * RT * S2 * 2);
    let o = 0;
    for (let t = 0; t < rowTiles; t++) {
      for (let j = 0; j < S2; j++) {
        const s = 2 * j;
        for (let r = 0; r < RT; r++) {
          const row = t * RT + r;
          if (row >= rows) {
            i16[o++] = 0;
            i16[o++] = 0;
            continue;
          }
          const inv = inverse[row % vectors];
          const at = row * S + s;
          i16[o++] = Math.round(weights[at] * inv);
          i16[o++] = s + 1 < S ? Math.round(weights[at + 1] * inv) : 0;
        }
      }
    }
  }

  /** The rows' weight steps τ (single precision) at `at`, zero past the last row. */
  private writeRowSteps(step: Float64Array, rows: number, paddedRows: number, at: number): void {
    const f32 = new Float32Array(this.exports.memory.buffer, at, paddedRows);
    const vectors = step.length;
    for (let j = 0; j < paddedRows; j++) f32[j] = j < rows ? step[j % vectors] : 0;
  }

  /**
   * The screened batch (../screening.ts): products in 16-bit integers (quantizedScales), a
   * double-precision screen; undefined if that much WebAssembly memory is refused.
   */
  prepareScreen(data: KernelData, batchSize: number, vectors: number, settings: ScreenSettings): ScreenBatch | undefined {
    const { subjects: S, edges: E, residuals, effectNorm2, df } = data;
    const RT = this.screenRowsPerTile;
    const P = this.screenEdgesPerTile;
    const S2 = Math.ceil(S / 2);
    const paddedRows = Math.max(1, Math.ceil((batchSize * vectors) / RT)) * RT;
    const maxRowTiles = paddedRows / RT;
    // Blocks of at most 64 edges: each chunk of the panel serves the block's 16 tiles from the cache.
    const W = Math.min(QUANTIZED_BLOCK_EDGES, this.blockWidth(S, E, P, QUANTIZED_STAGING_BYTES));
    const { capacity, quantized } = settings;
    // Residuals of up to RESIDENT_BYTES stay in memory as integers, interleaved, for every batch of the run.
    const residentBytes = quantizedResidentBytes(S, E);
    const resident = quantizedResident(S, E);
    const layout = `quantized:${S}:${E}`;
    const sumSquaresAt = resident ? alignUp(residentBytes) : 0;
    const boundAt = alignUp(sumSquaresAt + (E + P) * 8);
    const maskAt = alignUp(boundAt + (E + P) * 8);
    const inverseAt = alignUp(maskAt + (E + P) * 8);
    const edgeStepAt = alignUp(inverseAt + (E + P) * 8);
    const normsAt = alignUp(edgeStepAt + (E + P) * 4);
    const rowStepAt = alignUp(normsAt + vectors * 8);
    const panelAt = alignUp(rowStepAt + paddedRows * 4);
    const stagingAt = alignUp(panelAt + paddedRows * S2 * 4);
    const residualsAt = alignUp(stagingAt + W * S * 8);
    const scratchAt = alignUp(residualsAt + (W / P) * S2 * P * 4);
    const productsAt = alignUp(scratchAt + (W / P) * maxRowTiles * RT * P * 4);
    const countsAt = alignUp(productsAt + paddedRows * P * 4);
    const listsAt = alignUp(countsAt + batchSize * 4);
    const end = listsAt + batchSize * capacity * 4;
    if (!this.reserve(end)) return undefined;
    const token = {};
    const kept = resident && this.resident?.data === data && this.resident.layout === layout;
    this.claim(token, kept);
    this.f64.set(quantized.inverse.subarray(0, E), inverseAt / 8);
    this.f64.fill(0, inverseAt / 8 + E, inverseAt / 8 + E + P);
    if (resident && !kept) {
      this.eachBlock(residuals, S, E, W, stagingAt, (e0, width) =>
        this.exports.quantizeInterleaveBlock(stagingAt, e0 * S2 * 4, S, Math.ceil(width / P), inverseAt + e0 * 8),
      );
      this.resident = { data, layout };
    }
    this.f64.set(data.sumSquares, sumSquaresAt / 8);
    this.f64.fill(0, sumSquaresAt / 8 + E, sumSquaresAt / 8 + E + P);
    this.f64.set(quantized.bound.subarray(0, E), boundAt / 8);
    this.f64.fill(0, boundAt / 8 + E, boundAt / 8 + E + P);
    this.writeValidMask(settings.valid, maskAt, P);
    const buffer = this.exports.memory.buffer;
    const edgeStep = new Float32Array(buffer, edgeStepAt, E + P);
    edgeStep.fill(0);
    edgeStep.set(quantized.step.subarray(0, E));
    this.f64.set(settings.norms, normsAt / 8);
    const steps = weightSteps(settings.norms);
    const counts = new Int32Array(buffer, countsAt, batchSize);
    const lists = new Int32Array(buffer, listsAt, batchSize * capacity);
    const weights = new Float64Array(batchSize * vectors * S);
    let rhs = settings.threshold * settings.threshold * effectNorm2;
    const run = (batch: number): void => {
      if (this.current !== token) throw new Error("internal: a kernel batch was used after another was prepared on this thread");
      counts.fill(0);
      if (E === 0 || batch === 0) return;
      const rows = batch * vectors;
      const rowTiles = Math.ceil(rows / RT);
      this.packQuantizedWeights(weights, rows, vectors, S, rowTiles, steps.inverse, panelAt);
      this.writeRowSteps(steps.step, rows, rowTiles * RT, rowStepAt);
      const f64 = this.f64;
      for (let e0 = 0; e0 < E; e0 += W) {
        const width = Math.min(W, E - e0);
        let block = e0 * S2 * 4;
        if (!resident) {
          f64.set(residuals.subarray(e0 * S, (e0 + width) * S), stagingAt / 8);
          this.exports.quantizeInterleaveBlock(stagingAt, residualsAt, S, Math.ceil(width / P), inverseAt + e0 * 8);
          block = residualsAt;
        }
        this.exports.quantizedScreenBlock(
          panelAt,
          rowTiles,
          S2,
          block,
          width,
          scratchAt,
          rowStepAt,
          edgeStepAt + e0 * 4,
          productsAt,
          batch,
          vectors,
          sumSquaresAt + e0 * 8,
          boundAt + e0 * 8,
          maskAt + e0 * 8,
          normsAt,
          1 / effectNorm2,
          df,
          rhs,
          settings.upper ? 1 : 0,
          settings.lower ? 1 : 0,
          e0,
          listsAt,
          countsAt,
          capacity,
        );
      }
    };
    const setThreshold = (threshold: number): void => {
      rhs = threshold * threshold * effectNorm2;
    };
    return { weights, counts, lists, capacity, run, setThreshold };
  }

  /**
   * The two-level path's screened batch: single-precision group sums against
   * per-edge bounds (screening.ts groupSumBounds, with one tile of padding);
   * undefined if that much WebAssembly memory is refused.
   */
  prepareGroupScreen(
    data: KernelData,
    batchSize: number,
    groupSize: number,
    bounds: GroupSumBounds,
    capacity: number,
    near?: { bounds: GroupSumBounds; capacity: number },
  ): GroupScreenBatch | undefined {
    const { subjects: S, edges: E, residuals } = data;
    const T = this.screenGroupEdgesPerTile;
    const W = this.blockWidth(S, E, T, GROUP_BLOCK_BYTES);
    const G = groupSize;
    // No resident copy: each batch converts the residuals block by block (about 16 ms per pass for
    // S = 200, E = 79,800, against about 0.2 ms per relabeling of a batch of 512), which costs less than
    // touching 64 MB of fresh memory for a resident copy where page faults are dear (3.5 ms per MB on a
    // virtual machine measured in bench/README.md), and keeps memory down.
    const nearCapacity = near?.capacity ?? 0;
    const sLoAt = 0;
    const sHiAt = alignUp(sLoAt + (E + T) * 4);
    const nLoAt = alignUp(sHiAt + (E + T) * 4);
    const nHiAt = alignUp(nLoAt + (E + T) * 4);
    const nearCountsAt = alignUp(nHiAt + (E + T) * 4);
    const nearListsAt = alignUp(nearCountsAt + batchSize * 4);
    const membersAt = alignUp(nearListsAt + batchSize * nearCapacity * 4);
    const blockAt = alignUp(membersAt + batchSize * G * 4);
    const singleAt = alignUp(blockAt + W * S * 8);
    const countsAt = alignUp(singleAt + W * S * 4);
    const listsAt = alignUp(countsAt + batchSize * 4);
    // Subset tables: one entry of T single-precision sums per subset of each chunk of subjects (room for any chunk size).
    const mostChunks = Math.ceil(S / MIN_CHUNK_SUBJECTS);
    const entryBytes = T * 4;
    const chunkOffsetsAt = alignUp(listsAt + batchSize * capacity * 4);
    const tablesAt = alignUp(chunkOffsetsAt + batchSize * mostChunks * 4);
    let tableBytes = 0;
    for (let k = MIN_CHUNK_SUBJECTS; k <= MAX_CHUNK_SUBJECTS; k++) tableBytes = Math.max(tableBytes, Math.ceil(S / k) * (1 << k) * entryBytes);
    const end = tablesAt + tableBytes;
    if (!this.reserve(end)) return undefined;
    const token = {};
    this.claim(token);
    const buffer = this.exports.memory.buffer;
    const views = [sLoAt, sHiAt, nLoAt, nHiAt].map((at) => new Float32Array(buffer, at, E + T));
    const [sLo, sHi, nLo, nHi] = views;
    // Near bounds lie within the bounds (clamped, so that every lane the bounds list is near-listed first).
    const setBounds = (next: GroupSumBounds, nextNear: GroupSumBounds = next): void => {
      for (const [view, value] of [
        [sLo, -Infinity],
        [sHi, Infinity],
        [nLo, -Infinity],
        [nHi, Infinity],
      ] as const) {
        view.fill(value);
      }
      sLo.set(next.sLo.subarray(0, E));
      sHi.set(next.sHi.subarray(0, E));
      for (let e = 0; e < E; e++) {
        nLo[e] = Math.max(nextNear.sLo[e], sLo[e]);
        nHi[e] = Math.min(nextNear.sHi[e], sHi[e]);
      }
    };
    setBounds(bounds, near?.bounds);
    const nearCounts = new Int32Array(buffer, nearCountsAt, batchSize);
    const nearLists = new Int32Array(buffer, nearListsAt, batchSize * nearCapacity);
    const members = new Int32Array(buffer, membersAt, batchSize * G);
    const counts = new Int32Array(buffer, countsAt, batchSize);
    const lists = new Int32Array(buffer, listsAt, batchSize * capacity);
    const chunkOffsets = new Int32Array(buffer, chunkOffsetsAt, batchSize * mostChunks);
    const writeChunkOffsets = (batch: number, chunkSize: number, chunks: number): void => {
      const entries = 1 << chunkSize;
      for (let b = 0; b < batch; b++) {
        const at = b * chunks;
        for (let c = 0; c < chunks; c++) chunkOffsets[at + c] = c * entries;
        for (let m = b * G; m < (b + 1) * G; m++) {
          const s = members[m];
          const c = Math.floor(s / chunkSize);
          chunkOffsets[at + c] += 1 << (s - c * chunkSize);
        }
        for (let c = 0; c < chunks; c++) chunkOffsets[at + c] *= entryBytes;
      }
    };
    const run = (batch: number, chunkSize = groupChunkSize(S, batch)): void => {
      if (this.current !== token) throw new Error("internal: a kernel batch was used after another was prepared on this thread");
      if (!(chunkSize >= MIN_CHUNK_SUBJECTS && chunkSize <= MAX_CHUNK_SUBJECTS)) throw new Error(`internal: chunks of ${chunkSize} subjects`);
      counts.fill(0);
      nearCounts.fill(0);
      if (E === 0 || batch === 0) return;
      const chunks = Math.ceil(S / chunkSize);
      writeChunkOffsets(batch, chunkSize, chunks);
      this.eachBlock(residuals, S, E, W, blockAt, (e0, width) => {
        this.exports.transposeDemoteBlock(blockAt, singleAt, S, W);
        this.exports.groupTableScreenBlock(
          singleAt,
          W,
          width,
          S,
          chunkSize,
          chunkOffsetsAt,
          chunks,
          batch,
          tablesAt,
          sLoAt + e0 * 4,
          sHiAt + e0 * 4,
          e0,
          listsAt,
          countsAt,
          capacity,
          nLoAt + e0 * 4,
          nHiAt + e0 * 4,
          nearListsAt,
          nearCountsAt,
          nearCapacity,
        );
      });
    };
    return { members, counts, lists, capacity, nearCounts, nearLists, nearCapacity, run, setBounds };
  }

  /**
   * The quantized products of one tile of 4 edges (for tests; residuals edge-major, 4 × S):
   * products[j·4 + p] for rows j, each row's vector k = j mod vectors.
   */
  quantizedTileProducts(weights: Float64Array, rows: number, vectors: number, S: number, residuals: Float64Array, quantized: QuantizedScales, norms: Float64Array, products: Float32Array): boolean {
    const RT = this.screenRowsPerTile;
    const P = this.screenEdgesPerTile;
    const S2 = Math.ceil(S / 2);
    const rowTiles = Math.ceil(rows / RT);
    const panelAt = 0;
    const rowStepAt = alignUp(panelAt + rowTiles * RT * S2 * 4);
    const edgeStepAt = alignUp(rowStepAt + rowTiles * RT * 4);
    const inverseAt = alignUp(edgeStepAt + P * 4);
    const stagingAt = alignUp(inverseAt + P * 8);
    const residualsAt = alignUp(stagingAt + P * S * 8);
    const scratchAt = alignUp(residualsAt + S2 * P * 4);
    const productsAt = alignUp(scratchAt + rowTiles * RT * P * 4);
    if (!this.reserve(productsAt + rowTiles * RT * P * 4)) return false;
    this.claim(undefined);
    const steps = weightSteps(norms);
    this.packQuantizedWeights(weights, rows, vectors, S, rowTiles, steps.inverse, panelAt);
    this.writeRowSteps(steps.step, rows, rowTiles * RT, rowStepAt);
    const buffer = this.exports.memory.buffer;
    new Float32Array(buffer, edgeStepAt, P).set(quantized.step.subarray(0, P));
    this.f64.set(quantized.inverse.subarray(0, P), inverseAt / 8);
    this.f64.fill(0, stagingAt / 8, stagingAt / 8 + P * S);
    this.f64.set(residuals.subarray(0, P * S), stagingAt / 8);
    this.exports.quantizeInterleaveBlock(stagingAt, residualsAt, S, 1, inverseAt);
    this.exports.quantizedTileProducts(panelAt, rowTiles, S2, residualsAt, scratchAt, rowStepAt, edgeStepAt, productsAt);
    products.set(new Float32Array(buffer, productsAt, rows * P));
    return true;
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

  /**
   * Reserves memory for batches of up to `batchSize` relabelings on `data`
   * (statistics, ‖R‖² and valid flags, packed weights, one block of residuals,
   * one tile of products); undefined if that much WebAssembly memory is refused.
   */
  prepareBatch(data: KernelData, batchSize: number, vectors: number): KernelBatch | undefined {
    const { subjects: S, edges: E, residuals, effectNorm2, df } = data;
    const paddedRows = Math.max(1, Math.ceil((batchSize * vectors) / this.rowsPerTile)) * this.rowsPerTile;
    const W = this.blockWidth(S, E);
    const P = this.edgesPerTile;
    const statisticsAt = 0;
    const sumSquaresAt = alignUp(statisticsAt + batchSize * E * 8);
    const maskAt = alignUp(sumSquaresAt + (E + P) * 8);
    const panelAt = alignUp(maskAt + (E + P) * 8);
    const residualsAt = alignUp(panelAt + paddedRows * S * 8);
    const productsAt = alignUp(residualsAt + W * S * 8);
    const end = productsAt + P * paddedRows * 8;
    if (!this.reserve(end)) return undefined;
    const token = {};
    this.claim(token);
    this.f64.set(data.sumSquares, sumSquaresAt / 8);
    this.writeValidMask(data.valid, maskAt, P);
    const weights = new Float64Array(batchSize * vectors * S);
    const statistics = new Float64Array(this.exports.memory.buffer, statisticsAt, batchSize * E);
    const run = (batch: number): void => {
      if (this.current !== token) throw new Error("internal: a kernel batch was used after another was prepared on this thread");
      if (E === 0 || batch === 0) return;
      const rows = batch * vectors;
      const rowTiles = Math.ceil(rows / this.rowsPerTile);
      this.packWeights(weights, rows, S, rowTiles, panelAt);
      this.eachBlock(residuals, S, E, W, residualsAt, (e0, width) =>
        this.exports.statisticsBlock(
          panelAt,
          rowTiles,
          S,
          residualsAt,
          width,
          productsAt,
          batch,
          vectors,
          sumSquaresAt + e0 * 8,
          maskAt + e0 * 8,
          effectNorm2,
          df,
          statisticsAt + e0 * 8,
          E,
        ),
      );
    };
    return { weights, statistics, run };
  }

  /**
   * The two-level path (groupSums.ts): memory for batches of up to `batchSize`
   * relabelings, each given as the ascending list of its summed group's subjects;
   * undefined if that much WebAssembly memory is refused.
   */
  prepareGroups(data: KernelData, batchSize: number, level: TwoLevelEffect): GroupBatch | undefined {
    const { subjects: S, edges: E, residuals, effectNorm2, df } = data;
    const T = this.groupEdgesPerTile;
    const W = this.blockWidth(S, E, T, GROUP_BLOCK_BYTES);
    const G = level.groupSize;
    const statisticsAt = 0;
    const rowSumsAt = alignUp(statisticsAt + batchSize * E * 8);
    const sumSquaresAt = alignUp(rowSumsAt + (E + T) * 8);
    const maskAt = alignUp(sumSquaresAt + (E + T) * 8);
    const membersAt = alignUp(maskAt + (E + T) * 8);
    const offsetsAt = alignUp(membersAt + batchSize * G * 4);
    const blockAt = alignUp(offsetsAt + batchSize * G * 4);
    const transposedAt = alignUp(blockAt + W * S * 8);
    const end = transposedAt + W * S * 8;
    if (!this.reserve(end)) return undefined;
    const token = {};
    this.claim(token);
    this.f64.set(residualSums(data), rowSumsAt / 8);
    this.f64.set(data.sumSquares, sumSquaresAt / 8);
    this.writeValidMask(data.valid, maskAt, T);
    const buffer = this.exports.memory.buffer;
    const members = new Int32Array(buffer, membersAt, batchSize * G);
    const offsets = new Int32Array(buffer, offsetsAt, batchSize * G);
    const rowBytes = W * 8;
    const statistics = new Float64Array(buffer, statisticsAt, batchSize * E);
    const run = (batch: number): void => {
      if (this.current !== token) throw new Error("internal: a kernel batch was used after another was prepared on this thread");
      if (E === 0 || batch === 0) return;
      for (let i = 0; i < batch * G; i++) offsets[i] = members[i] * rowBytes;
      this.eachBlock(residuals, S, E, W, blockAt, (e0, width) => {
        this.exports.transposeBlock(blockAt, transposedAt, S, W);
        this.exports.groupStatisticsBlock(
          transposedAt,
          W,
          width,
          offsetsAt,
          G,
          batch,
          rowSumsAt + e0 * 8,
          sumSquaresAt + e0 * 8,
          maskAt + e0 * 8,
          level.difference,
          level.other,
          effectNorm2,
          df,
          statisticsAt + e0 * 8,
          E,
        );
      });
    };
    return { members, statistics, run };
  }

  /** Same contract as permutedStatistics (weights: batch × vectors × S; out: batch × E); false if memory is refused. */
  statistics(data: KernelData, weights: Float64Array, batch: number, vectors: number, out: Float64Array): boolean {
    const prepared = this.prepareBatch(data, batch, vectors);
    if (!prepared) return false;
    prepared.weights.set(weights.subarray(0, prepared.weights.length));
    prepared.run(batch);
    out.set(prepared.statistics.subarray(0, batch * data.edges));
    return true;
  }

  /** Same contract as weightedSums: products[j·width + i] for rows j and edges e0..e0+width−1; false if memory is refused. */
  weightedSums(
    residuals: Float64Array,
    S: number,
    weights: Float64Array,
    rows: number,
    e0: number,
    width: number,
    products: Float64Array,
  ): boolean {
    if (width === 0 || rows === 0) return true;
    const P = this.edgesPerTile;
    const rowTiles = Math.ceil(rows / this.rowsPerTile);
    const paddedRows = rowTiles * this.rowsPerTile;
    const W = Math.ceil(width / P) * P;
    const panelAt = 0;
    const residualsAt = alignUp(panelAt + paddedRows * S * 8);
    const productsAt = alignUp(residualsAt + W * S * 8);
    if (!this.reserve(productsAt + P * paddedRows * 8)) return false;
    this.claim(undefined);
    this.packWeights(weights, rows, S, rowTiles, panelAt);
    const f64 = this.f64;
    f64.fill(0, residualsAt / 8, residualsAt / 8 + W * S);
    f64.set(residuals.subarray(e0 * S, (e0 + width) * S), residualsAt / 8);
    for (let i0 = 0; i0 < width; i0 += P) {
      this.exports.tileProducts(panelAt, rowTiles, S, residualsAt + i0 * S * 8, productsAt);
      for (let p = 0; p < P && i0 + p < width; p++) {
        for (let j = 0; j < rows; j++) products[j * width + i0 + p] = f64[productsAt / 8 + j * P + p];
      }
    }
    return true;
  }
}
