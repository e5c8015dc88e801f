// How a run's relabelings are cut into chunks (src/run/permutationInference.ts engineChunkSize).
// The null rows never depend on the chunks (test/cli/permutationInvariance.test.ts); these
// checks pin the rule itself: at least eight chunks per run, so that a short run of a large
// cohort keeps every thread busy, with a grid that depends on the count alone when checkpointed.
// Expected values are worked by hand from the rule (no outside source applies).
import { describe, expect, it } from "vitest";
import { engineChunkSize } from "../../../src/run/permutationInference.js";

describe("engineChunkSize", () => {
  it("cuts a run into at least eight chunks, at most the run's chunk size each", () => {
    expect(engineChunkSize(5000, { threads: 2, chunkSize: 500 })).toBe(500);
    expect(engineChunkSize(500, { threads: 2, chunkSize: 500 })).toBe(63);
    expect(engineChunkSize(7, { threads: 2, chunkSize: 500 })).toBe(1);
    expect(engineChunkSize(0, { threads: 2, chunkSize: 500 })).toBe(1);
  });

  it("keeps the same grid whatever the threads when a checkpoint is kept", () => {
    for (const threads of [1, 2, 8, 64]) {
      expect(engineChunkSize(600, { threads, chunkSize: 500, checkpoint: {} })).toBe(75);
      expect(engineChunkSize(600, { threads, chunkSize: 500, shard: { index: 1, count: 2 }, checkpoint: {} })).toBe(75);
    }
  });

  it("cuts a shard's share finer when that keeps more threads busy", () => {
    expect(engineChunkSize(250, { threads: 4, chunkSize: 500, shard: { index: 1, count: 20 } })).toBe(32);
    expect(engineChunkSize(250, { threads: 16, chunkSize: 500, shard: { index: 1, count: 20 } })).toBe(16);
  });
});
