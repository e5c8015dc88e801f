// The single-precision screen (src/permute/screening.ts, screenedRange.ts) must
// leave every null row exactly as the plain TypeScript kernel computes it
// (src/permute/permutedStatistics.ts and kernels/groupSums.ts, themselves checked
// against naive refits with ml-matrix in freedmanLane.test.ts). The comparisons
// are bit for bit (tolerance 0). The error bound the screen relies on is checked
// against ml-matrix's double-precision product (a general-purpose library) and
// Math.fround (the IEEE 754 single-precision rounding of the JavaScript standard).
import seedrandom from "seedrandom";
import { Matrix } from "ml-matrix";
import { describe, expect, it } from "vitest";
import { computeNullRange } from "../../../src/permute/nullRange.js";
import type { NullChunk, NullContext, ScreenTally } from "../../../src/permute/nullRangeTypes.js";
import { permutedStatistics, statisticAt, statisticsAtEdges } from "../../../src/permute/permutedStatistics.js";
import { groupStatisticsAtEdges, groupSumStatistics, residualSums, twoLevelEffect } from "../../../src/permute/kernels/groupSums.js";
import { relabelingWriter } from "../../../src/permute/relabelingWriter.js";
import { WasmPermutationKernel, groupChunkSize, screenMemory } from "../../../src/permute/kernels/wasmKernel.js";
import { float32AtLeast, float32AtMost, gamma, quantizedScales, residualScales, screeningApplies } from "../../../src/permute/screening.js";
import { nullContext, type NullContextOptions } from "./nullContextFixture.js";

function bitsDiffer(a: Float64Array, b: Float64Array): string | undefined {
  for (let i = 0; i < a.length; i++) {
    if (!Object.is(a[i], b[i])) return `relabeling ${i + 1}: screened ${a[i]}, reference ${b[i]}, difference ${a[i] - b[i]}, tolerance 0 (bit-identical)`;
  }
  return a.length === b.length ? undefined : `lengths ${a.length} vs ${b.length}`;
}

function expectSameNull(actual: NullChunk, expected: NullChunk, label: string): void {
  for (const key of ["maxExtent", "maxMass", "maxStatistic"] as const) {
    const miss = bitsDiffer(actual[key], expected[key]);
    if (miss) throw new Error(`${label}: ${key} differs from the TypeScript reference kernel\n  ${miss}`);
  }
  expect(actual.extraNames).toEqual(expected.extraNames);
  actual.extra.forEach((column, j) => {
    const miss = bitsDiffer(column, expected.extra[j]);
    if (miss) throw new Error(`${label}: ${expected.extraNames[j]} differs from the TypeScript reference kernel\n  ${miss}`);
  });
}

/** Screened null against the reference, with the tally of how many relabelings the screen settled. */
function compare(context: NullContext, label: string, capacity?: number): ScreenTally {
  const to = context.plan.count + 1;
  const reference = computeNullRange(context, 1, to, { kernel: "typescript" });
  const tally: ScreenTally = { screened: 0, full: 0 };
  const screened = computeNullRange(context, 1, to, { kernel: "wasm", tally, screenCapacity: capacity });
  expectSameNull(screened, reference, label);
  // Another split of the range gives the same rows (batch boundaries move).
  const head = computeNullRange(context, 1, 38, { kernel: "wasm" });
  const rest = computeNullRange(context, 38, to, { kernel: "wasm" });
  const joined = Float64Array.from([...head.maxMass, ...rest.maxMass]);
  const miss = bitsDiffer(joined, reference.maxMass);
  if (miss) throw new Error(`${label}, split at 38: maxMass differs\n  ${miss}`);
  return tally;
}

describe("single-precision rounding helpers", () => {
  it("float32AtMost / float32AtLeast give the nearest single-precision values below / above (checked with Math.fround)", () => {
    const random = seedrandom("f32-bounds");
    const cases = [0, -0, 1, -1, 1 / 3, -1 / 3, 1e-45, -1e-45, 1e-50, -1e-50, 3.5e38, -3.5e38, Infinity, -Infinity, 2 ** -149];
    for (let i = 0; i < 2000; i++) cases.push((random() - 0.5) * 10 ** Math.floor(random() * 80 - 40));
    for (const x of cases) {
      const low = float32AtMost(x);
      const high = float32AtLeast(x);
      expect(Math.fround(low), `${x}: float32AtMost is a single-precision value`).toBe(low);
      expect(Math.fround(high), `${x}: float32AtLeast is a single-precision value`).toBe(high);
      expect(low <= x && x <= high, `${x}: ${low} ≤ x ≤ ${high}`).toBe(true);
      // Nothing single-precision lies strictly between: the midpoint rounds to one of them.
      if (low !== high) {
        const mid = low / 2 + high / 2;
        const rounded = Math.fround(mid);
        expect(rounded === low || rounded === high, `${x}: no single-precision value between ${low} and ${high}`).toBe(true);
      }
    }
  });

  it("γ_n = n·u/(1 − n·u) (Higham 2002, Lemma 3.1)", () => {
    expect(gamma(10, 2 ** -24)).toBe((10 * 2 ** -24) / (1 - 10 * 2 ** -24));
    expect(gamma(2 ** 24, 2 ** -24)).toBe(Infinity);
  });

  it("screening applies only where few edges pass and the statistic is well conditioned (two-sided Student t tail ≤ 5%)", () => {
    // t(0.975, 30) = 2.042 (NIST/SEMATECH e-Handbook t table, from memory): the two-sided tail at 2.0 is just above 5%.
    expect(screeningApplies(2.0, 30)).toBe(false);
    expect(screeningApplies(2.1, 30)).toBe(true);
    expect(screeningApplies(3, 200)).toBe(true);
    expect(screeningApplies(150, 1)).toBe(false);
    expect(screeningApplies(3, 0)).toBe(false);
  });
});

describe("the per-pair recomputation", () => {
  it("statisticAt gives the batch kernel's bits at every (relabeling, edge)", () => {
    for (const covariates of [true, false]) {
      const context = nullContext({ S: 37, regions: 14, scheme: "permute", covariates, permutations: 20 });
      const c = context.vectors.length;
      const S = context.kernel.subjects;
      const E = context.kernel.edges;
      const batch = 5;
      const weights = new Float64Array(batch * c * S);
      const writer = relabelingWriter(context);
      for (let b = 0; b < batch; b++) writer.weights(b + 2, b, weights);
      const expected = new Float64Array(batch * E);
      permutedStatistics(context.kernel, weights, batch, c, expected);
      for (let b = 0; b < batch; b++) {
        for (let e = 0; e < E; e++) {
          const actual = statisticAt(context.kernel, weights, b * c * S, c, e);
          if (!Object.is(actual, expected[b * E + e])) {
            throw new Error(`relabeling slot ${b}, edge ${e}: statisticAt ${actual}, batch kernel ${expected[b * E + e]}, tolerance 0 (bit-identical)`);
          }
        }
        // A list of edges (an odd count, from an offset), as the screen passes them.
        const edges = Int32Array.from({ length: E }, (_, e) => (e * 5) % E).filter((_, i) => i % 3 !== 1);
        const out = new Float64Array(E).fill(12345);
        statisticsAtEdges(context.kernel, weights, b * c * S, c, edges, 2, 7, out);
        edges.subarray(2, 9).forEach((e) => expect(Object.is(out[e], expected[b * E + e]), `statisticsAtEdges, slot ${b}, edge ${e}`).toBe(true));
      }
    }
  });

  it("groupStatisticsAtEdges (four edges at a time) gives the two-level reference's bits at every (relabeling, edge)", () => {
    const context = nullContext({ S: 37, regions: 14, scheme: "permute", covariates: false, permutations: 20 });
    const level = twoLevelEffect(context.vectors[0]);
    if (!level) throw new Error("the fixture should take the two-level path");
    const E = context.kernel.edges;
    const batch = 5;
    const members = new Int32Array(batch * level.groupSize);
    const writer = relabelingWriter(context);
    for (let b = 0; b < batch; b++) writer.members(b + 2, b, members, level);
    const expected = new Float64Array(batch * E);
    groupSumStatistics(context.kernel, level, members, batch, expected);
    const sums = residualSums(context.kernel);
    // Every edge in a scrambled order, then lists of every length 0–9 from an offset (the four-at-a-time loop and its rest).
    const scrambled = Int32Array.from({ length: E }, (_, e) => (e * 37) % E);
    for (let b = 0; b < batch; b++) {
      for (const [from, count] of [[0, E], ...Array.from({ length: 10 }, (_, n) => [3, n])]) {
        const out = new Float64Array(E).fill(12345);
        groupStatisticsAtEdges(context.kernel, level, sums, members, b * level.groupSize, scrambled, from, count, out);
        for (const e of scrambled.subarray(from, from + count)) {
          if (!Object.is(out[e], expected[b * E + e])) {
            throw new Error(`slot ${b}, edge ${e}: groupStatisticsAtEdges ${out[e]}, groupSumStatistics ${expected[b * E + e]}, tolerance 0 (bit-identical)`);
          }
        }
      }
    }
  });
});

describe("the quantized products stay within the bound the screen assumes", () => {
  it("|16-bit product − exact| ≤ ‖v_k‖∞·bound_e against ml-matrix's double-precision product (one to three 256-subject sums)", () => {
    const kernel = WasmPermutationKernel.create();
    if (!kernel) throw new Error("no WebAssembly SIMD in this Node");
    const random = seedrandom("quantized-products");
    let tightest = Infinity;
    for (const S of [1, 2, 7, 64, 203, 600]) {
      const rows = 11;
      const vectors = 3;
      const weights = Float64Array.from({ length: rows * S }, () => (random() - 0.5) * 10 ** Math.floor(random() * 4 - 2));
      // Edge 3 holds one large value among small ones: its step is coarse for the rest.
      const residuals = Float64Array.from({ length: 4 * S }, (_, i) => (i === 3 * S ? 50 : (random() - 0.5) * 10 ** Math.floor(random() * 6 - 3)));
      const norms = new Float64Array(vectors);
      for (let j = 0; j < rows; j++) for (let s = 0; s < S; s++) norms[j % vectors] = Math.max(norms[j % vectors], Math.abs(weights[j * S + s]));
      const data = { subjects: S, edges: 4, residuals, sumSquares: new Float64Array(4), valid: new Uint8Array(4).fill(1), effectNorm2: 1, df: 1 };
      const quantized = quantizedScales(data, 4);
      const products = new Float32Array(rows * 4);
      expect(kernel.quantizedTileProducts(weights, rows, vectors, S, residuals, quantized, norms, products)).toBe(true);
      const w = new Matrix(rows, S);
      for (let j = 0; j < rows; j++) for (let s = 0; s < S; s++) w.set(j, s, weights[j * S + s]);
      const r = new Matrix(S, 4);
      for (let p = 0; p < 4; p++) for (let s = 0; s < S; s++) r.set(s, p, residuals[p * S + s]);
      const reference = w.mmul(r);
      for (let j = 0; j < rows; j++) {
        for (let p = 0; p < 4; p++) {
          const difference = Math.abs(products[j * 4 + p] - reference.get(j, p));
          const bound = norms[j % vectors] * quantized.bound[p];
          if (!(difference <= bound)) {
            throw new Error(`S=${S}, row ${j}, edge ${p}: quantized ${products[j * 4 + p]}, ml-matrix ${reference.get(j, p)}, difference ${difference}, bound (tolerance) ${bound}`);
          }
          if (difference > 0) tightest = Math.min(tightest, bound / difference);
        }
      }
    }
    // The bound is a worst case, yet not vacuous: some products come within a factor 10 of it.
    expect(tightest).toBeLessThan(10);
  });
});

describe("the two-level screen's subset tables", () => {
  it("list every (relabeling, edge) whose group sum lies beyond its bounds, near-list those between the near bounds and the bounds, for every chunk size (sums from ml-matrix)", () => {
    const kernel = WasmPermutationKernel.create();
    if (!kernel) throw new Error("no WebAssembly SIMD in this Node");
    const random = seedrandom("subset-tables");
    // 53 subjects (prime: every chunk size leaves a short last chunk), 70 edges (not a multiple of the 16-edge tile).
    const S = 53;
    const E = 70;
    const G = 21;
    const residuals = Float64Array.from({ length: S * E }, () => (random() - 0.5) * 10 ** Math.floor(random() * 4 - 2));
    const data = { subjects: S, edges: E, residuals, sumSquares: new Float64Array(E), valid: new Uint8Array(E).fill(1), effectNorm2: 1, df: 1 };
    const { scale } = residualScales(data, 0);
    const r = new Matrix(S, E);
    for (let e = 0; e < E; e++) for (let s = 0; s < S; s++) r.set(s, e, residuals[e * S + s]);
    const chunkSizes = new Set<number>();
    for (const batch of [1, 5, 40, 100, 200, 512, 2048]) {
      chunkSizes.add(groupChunkSize(S, batch));
      // Bounds around the spread of the group sums, so that about a third of the pairs are listed.
      const sLo = new Float32Array(E);
      const sHi = new Float32Array(E);
      for (let e = 0; e < E; e++) {
        let norm2 = 0;
        for (let s = 0; s < S; s++) norm2 += residuals[e * S + s] ** 2;
        const spread = Math.sqrt((norm2 * G) / S);
        sLo[e] = Math.fround(-spread * (0.5 + random()));
        sHi[e] = Math.fround(spread * (0.5 + random()));
      }
      // Near bounds (a lower threshold's) at 60–90 % of the bounds: lanes between go to the near lists.
      const nLo = sLo.map((v) => Math.fround(v * (0.6 + 0.3 * random())));
      const nHi = sHi.map((v) => Math.fround(v * (0.6 + 0.3 * random())));
      const screen = kernel.prepareGroupScreen(data, batch, G, { sLo, sHi }, E, { bounds: { sLo: nLo, sHi: nHi }, capacity: E });
      if (!screen) throw new Error("WebAssembly memory refused");
      const membership = new Matrix(batch, S);
      for (let b = 0; b < batch; b++) {
        const subjects = Array.from({ length: S }, (_, s) => s);
        for (let i = S - 1; i > 0; i--) {
          const j = Math.floor(random() * (i + 1));
          [subjects[i], subjects[j]] = [subjects[j], subjects[i]];
        }
        const group = subjects.slice(0, G).sort((x, y) => x - y);
        screen.members.set(group, b * G);
        for (const s of group) membership.set(b, s, 1);
      }
      screen.run(batch);
      const exact = membership.mmul(r);
      let listedPairs = 0;
      let nearPairs = 0;
      for (let b = 0; b < batch; b++) {
        const count = screen.counts[b];
        expect(count).toBeLessThanOrEqual(E);
        const listed = new Set(screen.lists.subarray(b * E, b * E + count));
        const nearCount = screen.nearCounts[b];
        const nearListed = new Set(screen.nearLists.subarray(b * E, b * E + nearCount));
        listedPairs += count;
        nearPairs += nearCount;
        for (let e = 0; e < E; e++) {
          // The single-precision sum's error is at most (S + 2)·2⁻²⁴·‖R_e‖₁ (Higham 2002, γ_n; demotion included): scale / 4.
          const tolerance = scale[e] / 4;
          const sum = exact.get(b, e);
          const beyond = (lo: number, hi: number) => sum >= hi + tolerance || sum <= lo - tolerance;
          const within = (lo: number, hi: number) => sum < hi - tolerance && sum > lo + tolerance;
          const expected = beyond(sLo[e], sHi[e]) ? "listed" : within(nLo[e], nHi[e]) ? "neither" : within(sLo[e], sHi[e]) && beyond(nLo[e], nHi[e]) ? "near" : "either";
          const actual = listed.has(e) ? (nearListed.has(e) ? "both" : "listed") : nearListed.has(e) ? "near" : "neither";
          if (actual === "both" || (expected !== "either" && expected !== actual)) {
            throw new Error(
              `batch ${batch} (chunks of ${groupChunkSize(S, batch)}), relabeling ${b}, edge ${e}: ml-matrix sum ${sum}, bounds [${sLo[e]}, ${sHi[e]}], near bounds [${nLo[e]}, ${nHi[e]}], tolerance ${tolerance}: expected ${expected}, got ${actual}`,
            );
          }
        }
      }
      expect(listedPairs).toBeGreaterThan(batch * E * 0.1);
      expect(nearPairs).toBeGreaterThan(batch * E * 0.05);
    }
    expect([...chunkSizes].sort()).toEqual([2, 3, 4, 5, 6, 7, 8]);
  });
});

describe("the screened null equals the reference null, bit for bit", () => {
  const base = { S: 48, regions: 40, permutations: 150 };
  const cases: (NullContextOptions & { label: string })[] = [
    { ...base, label: "covariates (products path), two-tailed", scheme: "permute", covariates: true, thresholds: [2.6] },
    { ...base, label: "covariates, upper tail", scheme: "permute", covariates: true, thresholds: [2.4], tail: "upper" },
    { ...base, label: "covariates, lower tail", scheme: "permute", covariates: true, thresholds: [2.4], tail: "lower" },
    { ...base, label: "two groups only (group-sum path), two-tailed", scheme: "permute", covariates: false, thresholds: [2.6] },
    { ...base, label: "two groups only, upper tail", scheme: "permute", covariates: false, thresholds: [2.3], tail: "upper" },
    { ...base, label: "two groups only, lower tail", scheme: "permute", covariates: false, thresholds: [2.3], tail: "lower" },
    { ...base, label: "sign flips", scheme: "sign-flip", covariates: false, thresholds: [2.3] },
    { ...base, label: "threshold sweep", scheme: "permute", covariates: true, thresholds: [3, 2.5, 3.5] },
    { ...base, label: "group-sum path, threshold sweep", scheme: "permute", covariates: false, thresholds: [3, 2.5, 3.5] },
    // 10 subjects, 4 in one group: all 210 distinct arrangements enumerated, the identity first.
    { S: 10, regions: 40, permutations: 1000, label: "exact enumeration (group-sum path)", scheme: "permute", covariates: false, thresholds: [2.5] },
  ];
  for (const options of cases) {
    it(options.label, () => {
      const context = nullContext(options);
      if (options.S === 10) expect(context.plan.exact && context.plan.count === 210).toBe(true);
      const tally = compare(context, options.label);
      // The screen must actually have settled most relabelings, or this test would compare the full path with itself.
      expect(tally.screened, `settled by the screen: ${tally.screened}, computed in full: ${tally.full}`).toBeGreaterThan(tally.full);
    });
  }

  it("a threshold equal to a permuted statistic (a tie at the threshold) and the next value above it", () => {
    for (const covariates of [true, false]) {
      const context = nullContext({ ...base, scheme: "permute", covariates, thresholds: [2.5] });
      // The reference statistics of relabeling 5: take its third-largest |t| as the threshold.
      const reference = computeNullRange(context, 5, 6, { kernel: "typescript" });
      expect(reference.maxStatistic[0]).toBeGreaterThan(0);
      const weights = new Float64Array(context.vectors.length * context.kernel.subjects);
      const out = new Float64Array(context.kernel.edges);
      // Relabeling 5's vectors, as the engine writes them.
      relabelingWriter(context).weights(5, 0, weights);
      permutedStatistics(context.kernel, weights, 1, context.vectors.length, out);
      const sorted = Array.from(out, Math.abs).filter(Number.isFinite).sort((a, b) => b - a);
      for (const threshold of [sorted[2], sorted[2] * (1 + 2 ** -52)]) {
        const tied = { ...context, threshold, thresholds: [threshold] };
        compare(tied, `covariates ${covariates}, threshold ${threshold}`);
      }
    }
  });

  it("edges whose residuals are out of the screen's range are recomputed for every relabeling", () => {
    const context = nullContext({ ...base, scheme: "permute", covariates: true, thresholds: [2.6] });
    const { kernel } = context;
    const S = kernel.subjects;
    // Scale two edges' residuals by powers of two (exact): tiny and huge; t is unchanged.
    const residuals = Float64Array.from(kernel.residuals);
    const sumSquares = Float64Array.from(kernel.sumSquares);
    for (const [e, factor] of [
      [5, 2 ** -60],
      [9, 2 ** 60],
    ] as const) {
      for (let s = 0; s < S; s++) residuals[e * S + s] *= factor;
      sumSquares[e] *= factor * factor;
    }
    const scaled = { ...context, kernel: { ...kernel, residuals, sumSquares } };
    expect(Array.from(residualScales(scaled.kernel, 0).forced)).toEqual([5, 9]);
    compare(scaled, "out-of-range edges");
  });

  it("residuals copied in block by block (too large to keep resident) give the same rows", () => {
    const saved = screenMemory.residentBytes;
    screenMemory.residentBytes = 0;
    try {
      for (const covariates of [true, false]) {
        const context = nullContext({ ...base, scheme: "permute", covariates, thresholds: [2.5] });
        const tally = compare(context, `block by block, covariates ${covariates}`);
        expect(tally.screened).toBeGreaterThan(tally.full);
      }
    } finally {
      screenMemory.residentBytes = saved;
    }
  });

  it("group-sum path: relabelings with no edge above the threshold are settled from their near lists, edge by edge below those, or by a second run", () => {
    // t = 3.6 on 780 edges with 46 degrees of freedom: about 0.6 edges expected above it, so many relabelings have none.
    const context = nullContext({ ...base, scheme: "permute", covariates: false, thresholds: [3.6] });
    const tally = compare(context, "near lists");
    expect(tally.near ?? 0, `settled from near lists: ${tally.near}, screened: ${tally.screened}`).toBeGreaterThan(10);
    // A few relabelings have no edge above the near threshold either: computed edge by edge.
    expect(tally.direct ?? 0).toBeGreaterThan(0);
    const small = compare(context, "near lists of capacity 2", 2);
    expect(small.near ?? 0).toBeLessThan(tally.near ?? 0);
    const sweep = nullContext({ ...base, scheme: "permute", covariates: false, thresholds: [3.8, 3.5, 4.2], tail: "upper" });
    expect(compare(sweep, "near lists, upper tail, sweep").near ?? 0).toBeGreaterThan(10);
    // t = 4.6: many relabelings have no edge above 0.8 × 4.6 either, so their near lists settle nothing.
    const high = compare(nullContext({ ...base, scheme: "permute", covariates: false, thresholds: [4.6] }), "near lists, t = 4.6");
    expect(high.near ?? 0).toBeGreaterThan(0);
  });

  it("a list that overflows its capacity sends the relabeling to the full computation", () => {
    const context = nullContext({ ...base, scheme: "permute", covariates: true, thresholds: [2.4] });
    const tally = compare(context, "capacity 3", 3);
    expect(tally.full).toBeGreaterThan(0);
  });
});
