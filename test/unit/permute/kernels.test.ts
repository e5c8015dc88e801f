// The WebAssembly SIMD permutation kernel against the plain TypeScript kernel
// (src/permute/permutedStatistics.ts), which test/unit/permute/freedmanLane.test.ts
// checks against a naive refit with ml-matrix. The two kernels promise the same
// floating-point operations in the same order, so they are compared bit for bit
// (tolerance 0: every product, statistic and null row has the same 64 bits).
// One check also compares the SIMD products with ml-matrix's matrix product
// (a general-purpose library) within a stated rounding bound.
import seedrandom from "seedrandom";
import { Matrix } from "ml-matrix";
import { afterEach, describe, expect, it, vi } from "vitest";
import { computeNullRange } from "../../../src/permute/nullRange.js";
import type { NullChunk } from "../../../src/permute/nullRangeTypes.js";
import { nullContext } from "./nullContextFixture.js";
import { permutedStatistics, weightedSums, type KernelData } from "../../../src/permute/permutedStatistics.js";
import { groupSumStatistics, twoLevelEffect } from "../../../src/permute/kernels/groupSums.js";
import { selectKernel } from "../../../src/permute/kernels/selectKernel.js";
import { WasmPermutationKernel, wasmSimdSupported } from "../../../src/permute/kernels/wasmKernel.js";
import { EPS, expectAllClose } from "../../helpers/close.js";

/** The index and both bit patterns of the first difference, or undefined when every bit agrees. */
function firstBitDifference(actual: Float64Array, expected: Float64Array): string | undefined {
  if (actual.length !== expected.length) return `length ${actual.length} vs ${expected.length}`;
  const a = new BigUint64Array(actual.buffer, actual.byteOffset, actual.length);
  const b = new BigUint64Array(expected.buffer, expected.byteOffset, expected.length);
  for (let i = 0; i < a.length; i++) {
    if (a[i] !== b[i]) {
      return `index ${i}: expected ${expected[i]} (0x${b[i].toString(16)}), actual ${actual[i]} (0x${a[i].toString(16)}), difference ${actual[i] - expected[i]}, tolerance 0 (bit-identical)`;
    }
  }
  return undefined;
}

function expectBitIdentical(actual: Float64Array, expected: Float64Array, label: string, inputs: unknown): void {
  const miss = firstBitDifference(actual, expected);
  if (miss) throw new Error(`${label} differs from the TypeScript reference kernel\n  ${miss}\n  inputs: ${JSON.stringify(inputs)}`);
}

/** Values of mixed sign and scale, with exact zeros and negative zeros among them. */
function awkwardValues(random: () => number, length: number): Float64Array {
  const out = new Float64Array(length);
  for (let i = 0; i < length; i++) {
    const u = random();
    if (u < 0.03) out[i] = 0;
    else if (u < 0.05) out[i] = -0;
    else out[i] = (random() - 0.5) * 10 ** Math.floor(random() * 7 - 3);
  }
  return out;
}

function newKernel(): WasmPermutationKernel {
  const kernel = WasmPermutationKernel.create();
  if (!kernel) throw new Error("this Node has no WebAssembly SIMD; the kernel tests need it (Node 20 has it)");
  return kernel;
}

describe("WebAssembly SIMD kernel", () => {
  it("is supported by this Node (the SIMD module validates)", () => {
    expect(wasmSimdSupported()).toBe(true);
  });

  // Sizes chosen to miss every tile: S odd or 1, widths not multiples of the edge tile,
  // rows not multiples of the row tile, blocks starting mid-array.
  const shapes = [
    { S: 1, E: 3, e0: 0, width: 3, rows: 1 },
    { S: 3, E: 9, e0: 2, width: 7, rows: 5 },
    { S: 17, E: 23, e0: 1, width: 21, rows: 7 },
    { S: 101, E: 40, e0: 5, width: 33, rows: 13 },
    { S: 64, E: 16, e0: 0, width: 16, rows: 8 },
    { S: 255, E: 11, e0: 3, width: 5, rows: 3 },
  ];
  for (const shape of shapes) {
    it(`weightedSums is bit-identical to the reference (S=${shape.S}, rows=${shape.rows}, width=${shape.width}, e0=${shape.e0})`, () => {
      const random = seedrandom(`weighted-sums-${JSON.stringify(shape)}`);
      const { S, E, e0, width, rows } = shape;
      const residuals = awkwardValues(random, S * E);
      const weights = awkwardValues(random, rows * S);
      const expected = new Float64Array(rows * width);
      const actual = new Float64Array(rows * width).fill(Number.NaN);
      weightedSums(residuals, S, weights, rows, e0, width, expected);
      newKernel().weightedSums(residuals, S, weights, rows, e0, width, actual);
      expectBitIdentical(actual, expected, "products", shape);
    });
  }

  it("weightedSums agrees with ml-matrix's matrix product within 2·S·EPS·Σ|w·r|", () => {
    // Source: ml-matrix Matrix.mmul (a general-purpose library); bound: the standard
    // dot-product rounding error bound |error| ≤ γ_S Σ|w_s r_s| (Higham 2002, Accuracy and
    // Stability of Numerical Algorithms, §3.1), doubled for the library's own rounding.
    const random = seedrandom("weighted-sums-ml-matrix");
    const S = 37;
    const E = 19;
    const rows = 11;
    const residuals = awkwardValues(random, S * E);
    const weights = awkwardValues(random, rows * S);
    const actual = new Float64Array(rows * E);
    newKernel().weightedSums(residuals, S, weights, rows, 0, E, actual);
    const w = new Matrix(Array.from({ length: rows }, (_, j) => Array.from(weights.subarray(j * S, (j + 1) * S))));
    const r = new Matrix(Array.from({ length: S }, (_, s) => Array.from({ length: E }, (_, e) => residuals[e * S + s])));
    const expected = Float64Array.from(w.mmul(r).to1DArray());
    for (let j = 0; j < rows; j++) {
      for (let e = 0; e < E; e++) {
        let magnitude = 0;
        for (let s = 0; s < S; s++) magnitude += Math.abs(weights[j * S + s] * residuals[e * S + s]);
        expectAllClose([actual[j * E + e]], [expected[j * E + e]], {
          abs: 2 * S * EPS * magnitude,
          label: `product row ${j}, edge ${e} vs ml-matrix mmul`,
        });
      }
    }
  });

  const batches = [
    { S: 19, E: 29, batch: 5, vectors: 3 },
    { S: 33, E: 130, batch: 7, vectors: 1 },
    { S: 8, E: 5, batch: 3, vectors: 4 },
    { S: 101, E: 1203, batch: 11, vectors: 2 },
  ];
  for (const shape of batches) {
    it(`statistics are bit-identical to permutedStatistics (S=${shape.S}, E=${shape.E}, batch=${shape.batch}, c=${shape.vectors})`, () => {
      const random = seedrandom(`statistics-${JSON.stringify(shape)}`);
      const { S, E, batch, vectors } = shape;
      const residuals = awkwardValues(random, S * E);
      const sumSquares = new Float64Array(E);
      const valid = new Uint8Array(E);
      for (let e = 0; e < E; e++) {
        let ss = 0;
        for (let s = 0; s < S; s++) ss += residuals[e * S + s] ** 2;
        // Some edges invalid, some with ‖R‖² too small (SSE ≤ 0 → NaN), most ordinary.
        valid[e] = random() < 0.9 ? 1 : 0;
        sumSquares[e] = random() < 0.1 ? ss * 1e-6 : ss * (1 + random());
      }
      const data: KernelData = { subjects: S, edges: E, residuals, sumSquares, valid, effectNorm2: 0.5 + random(), df: S - vectors - 1 };
      const weights = new Float64Array(batch * vectors * S);
      for (let i = 0; i < weights.length; i++) weights[i] = (random() - 0.5) / Math.sqrt(S);
      const expected = new Float64Array(batch * E);
      const actual = new Float64Array(batch * E);
      permutedStatistics(data, weights, batch, vectors, expected);
      newKernel().statistics(data, weights, batch, vectors, actual);
      expect(expected.some((t) => Number.isNaN(t)), "some statistics are NaN (invalid or SSE ≤ 0)").toBe(true);
      expect(expected.some((t) => Number.isFinite(t)), "some statistics are finite").toBe(true);
      expectBitIdentical(actual, expected, "statistics", shape);
    });
  }
});

function expectSameNull(actual: NullChunk, expected: NullChunk, label: string): void {
  expect(actual.from).toBe(expected.from);
  expect(actual.to).toBe(expected.to);
  for (const key of ["maxExtent", "maxMass", "maxStatistic"] as const) {
    expectBitIdentical(actual[key], expected[key], `${label}: ${key}`, { from: expected.from, to: expected.to });
  }
}

describe("the null computed with the SIMD kernel equals the null computed with the TypeScript kernel", () => {
  const cases = [
    { S: 41, regions: 13, scheme: "permute" as const, covariates: true, permutations: 75 },
    { S: 30, regions: 9, scheme: "permute" as const, covariates: false, permutations: 61 },
    { S: 23, regions: 11, scheme: "sign-flip" as const, covariates: false, permutations: 50 },
  ];
  for (const options of cases) {
    it(`${options.scheme}, S=${options.S}, ${options.regions} regions, ${options.covariates ? "with" : "without"} covariates${options.covariates || options.scheme === "sign-flip" ? "" : " (two-level path)"}`, () => {
      const context = nullContext(options);
      expect(twoLevelEffect(context.vectors[0]) !== undefined && context.vectors.length === 1).toBe(!options.covariates && options.scheme === "permute");
      const to = context.plan.count + 1;
      const reference = computeNullRange(context, 1, to, { kernel: "typescript" });
      const simd = computeNullRange(context, 1, to, { kernel: "wasm" });
      expect(reference.maxExtent.some((x) => x > 0), "some relabelings have supra-threshold components").toBe(true);
      expectSameNull(simd, reference, "whole range");
      // Another split of the range (other batch boundaries) gives the same rows.
      const head = computeNullRange(context, 1, 20, { kernel: "wasm" });
      const tail = computeNullRange(context, 20, to, { kernel: "wasm" });
      expectBitIdentical(Float64Array.from([...head.maxMass, ...tail.maxMass]), reference.maxMass, "split range: maxMass", options);
    });
  }
});

describe("the TypeScript fallback", () => {
  afterEach(() => {
    vi.unstubAllEnvs();
    vi.unstubAllGlobals();
    vi.resetModules();
  });

  it("PLEXUS_KERNEL=typescript selects the reference kernel, and the null is unchanged", () => {
    vi.stubEnv("PLEXUS_KERNEL", "typescript");
    expect(selectKernel().name).toBe("typescript");
    expect(selectKernel("wasm").name).toBe("wasm-simd");
    const context = nullContext({ S: 21, regions: 8, scheme: "permute", covariates: true, permutations: 30 });
    const viaEnvironment = computeNullRange(context, 1, 31);
    const simd = computeNullRange(context, 1, 31, { kernel: "wasm" });
    expectSameNull(viaEnvironment, simd, "PLEXUS_KERNEL=typescript");
  });

  it("where WebAssembly is missing, auto and wasm fall back to the reference kernel", async () => {
    vi.stubGlobal("WebAssembly", undefined);
    vi.resetModules();
    const fresh = await import("../../../src/permute/kernels/selectKernel.js");
    const wasm = await import("../../../src/permute/kernels/wasmKernel.js");
    expect(wasm.wasmSimdSupported()).toBe(false);
    expect(wasm.WasmPermutationKernel.create()).toBeUndefined();
    expect(fresh.selectKernel("auto").name).toBe("typescript");
    expect(fresh.selectKernel("wasm").name).toBe("typescript");
  });
});

describe("the two-level path (group sums for a two-valued effect regressor)", () => {
  it("twoLevelEffect finds the two values and sums the smaller group (subject 0's on a tie)", () => {
    expect(twoLevelEffect(Float64Array.from([0.5, -0.5, -0.5, 0.5, -0.5]))).toEqual({ inGroup: 0.5, other: -0.5, difference: 1, groupSize: 2 });
    expect(twoLevelEffect(Float64Array.from([2, 1, 1, 2]))).toEqual({ inGroup: 2, other: 1, difference: 1, groupSize: 2 });
    expect(twoLevelEffect(Float64Array.from([1, 2, 3]))).toBeUndefined();
    expect(twoLevelEffect(Float64Array.from([1, 1, 1]))).toBeUndefined();
  });

  const shapes = [
    { S: 7, E: 5, batch: 3, groupSize: 1 },
    { S: 21, E: 37, batch: 5, groupSize: 9 },
    { S: 40, E: 300, batch: 13, groupSize: 20 },
    { S: 201, E: 1031, batch: 4, groupSize: 100 },
  ];
  for (const shape of shapes) {
    it(`SIMD group sums are bit-identical to the TypeScript reference (S=${shape.S}, E=${shape.E}, batch=${shape.batch}, group of ${shape.groupSize})`, () => {
      const random = seedrandom(`group-sums-${JSON.stringify(shape)}`);
      const { S, E, batch, groupSize } = shape;
      const residuals = awkwardValues(random, S * E);
      const sumSquares = new Float64Array(E);
      const valid = new Uint8Array(E);
      for (let e = 0; e < E; e++) {
        let ss = 0;
        for (let s = 0; s < S; s++) ss += residuals[e * S + s] ** 2;
        valid[e] = random() < 0.9 ? 1 : 0;
        sumSquares[e] = random() < 0.1 ? ss * 1e-6 : ss * (1 + random());
      }
      const data: KernelData = { subjects: S, edges: E, residuals, sumSquares, valid, effectNorm2: 0.3 + random(), df: S - 2 };
      const level = { inGroup: 0.61, other: -0.37, difference: 0.61 - -0.37, groupSize };
      const members = new Int32Array(batch * groupSize);
      for (let b = 0; b < batch; b++) {
        const chosen = Array.from({ length: S }, (_, s) => s)
          .map((s) => ({ s, key: random() }))
          .sort((x, y) => x.key - y.key)
          .slice(0, groupSize)
          .map((x) => x.s)
          .sort((x, y) => x - y);
        members.set(chosen, b * groupSize);
      }
      const expected = new Float64Array(batch * E);
      groupSumStatistics(data, level, members, batch, expected);
      const prepared = newKernel().prepareGroups(data, batch, level)!;
      prepared.members.set(members);
      prepared.run(batch);
      const actual = Float64Array.from(prepared.statistics.subarray(0, batch * E));
      expect(expected.some((t) => Number.isNaN(t)) && expected.some((t) => Number.isFinite(t))).toBe(true);
      expectBitIdentical(actual, expected, "group-sum statistics", shape);
    });
  }

  it("group sums agree with the dot-product kernel within 1e-10 relative (the same formula, rounded differently)", () => {
    // Tolerance: common practice for two evaluations of one well-conditioned formula; the
    // dot-product kernel itself is checked against an ml-matrix refit in freedmanLane.test.ts.
    const context = nullContext({ S: 30, regions: 9, scheme: "permute", covariates: false, permutations: 61 });
    const level = twoLevelEffect(context.vectors[0]);
    expect(level, "the design's effect regressor takes two values").toBeDefined();
    const S = context.kernel.subjects;
    const E = context.kernel.edges;
    const permutation = Array.from({ length: S }, (_, s) => (s * 7 + 3) % S);
    const weights = Float64Array.from(permutation, (p) => context.vectors[0][p]);
    const members = Int32Array.from(permutation.map((p, s) => (context.vectors[0][p] === level!.inGroup ? s : -1)).filter((s) => s >= 0));
    const general = new Float64Array(E);
    const grouped = new Float64Array(E);
    permutedStatistics(context.kernel, weights, 1, 1, general);
    groupSumStatistics(context.kernel, level!, members, 1, grouped);
    expectAllClose(grouped, general, { rel: 1e-10, abs: 1e-12, label: "t by group sums vs t by dot products" });
  });

  it("the two-level null matches the dot-product null (extents equal, statistics within 1e-10)", () => {
    const context = nullContext({ S: 30, regions: 9, scheme: "permute", covariates: false, permutations: 61 });
    const to = context.plan.count + 1;
    const grouped = computeNullRange(context, 1, to, { kernel: "wasm" });
    const general = computeNullRange(context, 1, to, { kernel: "wasm", groupSums: false });
    expect(Array.from(grouped.maxExtent)).toEqual(Array.from(general.maxExtent));
    // Tolerance: as above (the same formula rounded differently).
    expectAllClose(grouped.maxStatistic, general.maxStatistic, { rel: 1e-10, label: "max t, two-level vs dot products" });
    expectAllClose(grouped.maxMass, general.maxMass, { rel: 1e-9, abs: 1e-9, label: "max mass, two-level vs dot products" });
  });
});
