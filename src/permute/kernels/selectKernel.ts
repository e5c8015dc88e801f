import { permutedStatistics, EDGE_BLOCK, type KernelData } from "../permutedStatistics.js";
import { groupSumStatistics, type TwoLevelEffect } from "./groupSums.js";
import { WasmPermutationKernel, type GroupBatch, type KernelBatch } from "./wasmKernel.js";

/**
 * Which kernel computes the permuted statistics. Both give bit-identical
 * results (test/unit/permute/kernels.test.ts); "auto" takes the WebAssembly
 * SIMD kernel where the engine runs it and the TypeScript reference elsewhere.
 * The environment variable PLEXUS_KERNEL (auto, wasm, typescript) overrides
 * "auto", for benchmarks and for exercising the fallback.
 */
export type KernelChoice = "auto" | "wasm" | "typescript";

export interface StatisticsKernel {
  name: "wasm-simd" | "typescript";
  /** Relabelings per call that use the kernel well for c vectors and E edges. */
  batchSize(vectors: number, edges: number): number;
  /**
   * Buffers for repeated calls on `data`: fill `weights` (batch × vectors × S, as
   * for permutedStatistics), call run(batch), read `statistics` (batch × E).
   */
  prepare(data: KernelData, batchSize: number, vectors: number): KernelBatch;
  /**
   * The two-level path (groupSums.ts, one vector with two values): fill `members`
   * (batch × groupSize, each relabeling's summed group in ascending order), call
   * run(batch), read `statistics` (batch × E).
   */
  prepareGroups(data: KernelData, batchSize: number, level: TwoLevelEffect): GroupBatch;
}

export type { GroupBatch, KernelBatch };

/** Rows (relabelings × vectors) per call for the SIMD kernel: each residual copied in is used this many times. */
const WASM_ROWS = 96;
/** Upper bound on the batch's statistics (batch × E values) per thread. */
const STATISTICS_BYTES = 48 * 1024 * 1024;

function referenceBatch(data: KernelData, batchSize: number, vectors: number): KernelBatch {
  const weights = new Float64Array(batchSize * vectors * data.subjects);
  const statistics = new Float64Array(batchSize * data.edges);
  const products = new Float64Array(batchSize * vectors * EDGE_BLOCK);
  return { weights, statistics, run: (batch) => permutedStatistics(data, weights, batch, vectors, statistics, products) };
}

function referenceGroups(data: KernelData, batchSize: number, level: TwoLevelEffect): GroupBatch {
  const members = new Int32Array(batchSize * level.groupSize);
  const statistics = new Float64Array(batchSize * data.edges);
  return { members, statistics, run: (batch) => groupSumStatistics(data, level, members, batch, statistics) };
}

function referenceKernel(): StatisticsKernel {
  return { name: "typescript", batchSize: () => 8, prepare: referenceBatch, prepareGroups: referenceGroups };
}

function wasmKernel(instance: WasmPermutationKernel): StatisticsKernel {
  return {
    name: "wasm-simd",
    batchSize(vectors, edges) {
      const wanted = Math.max(8, Math.ceil(WASM_ROWS / Math.max(1, vectors)));
      const fits = Math.floor(STATISTICS_BYTES / (8 * Math.max(1, edges)));
      return Math.max(1, Math.min(wanted, fits));
    },
    // Where WebAssembly memory is refused (beyond 4 GiB), the reference kernel does the work.
    prepare: (data, batchSize, vectors) => instance.prepareBatch(data, batchSize, vectors) ?? referenceBatch(data, batchSize, vectors),
    prepareGroups: (data, batchSize, level) => instance.prepareGroups(data, batchSize, level) ?? referenceGroups(data, batchSize, level),
  };
}

export function kernelChoiceFromEnvironment(): KernelChoice {
  const value = (typeof process === "object" ? process.env.PLEXUS_KERNEL : undefined)?.trim().toLowerCase();
  return value === "wasm" || value === "typescript" ? value : "auto";
}

let sharedWasm: WasmPermutationKernel | null | undefined;

/** One WebAssembly instance per thread, made on first use; null where SIMD is missing. */
function threadWasmKernel(): WasmPermutationKernel | null {
  if (sharedWasm === undefined) sharedWasm = WasmPermutationKernel.create() ?? null;
  return sharedWasm;
}

/**
 * The kernel for this thread. "wasm" where WebAssembly SIMD is missing falls
 * back to the reference, like "auto": the results are the same either way.
 */
export function selectKernel(choice: KernelChoice = "auto"): StatisticsKernel {
  const resolved = choice === "auto" ? kernelChoiceFromEnvironment() : choice;
  if (resolved === "typescript") return referenceKernel();
  const wasm = threadWasmKernel();
  return wasm ? wasmKernel(wasm) : referenceKernel();
}

let screenWasm: WasmPermutationKernel | null | undefined;

/**
 * The WebAssembly instance that screens in single precision (../screenedRange.ts),
 * separate from the one selectKernel uses, since both keep prepared memory at
 * once; undefined where the choice is the TypeScript reference or SIMD is missing.
 */
export function screeningInstance(choice: KernelChoice = "auto"): WasmPermutationKernel | undefined {
  const resolved = choice === "auto" ? kernelChoiceFromEnvironment() : choice;
  if (resolved === "typescript") return undefined;
  if (screenWasm === undefined) screenWasm = WasmPermutationKernel.create() ?? null;
  return screenWasm ?? undefined;
}
