// Shared typed arrays reach a worker thread whole (src/parallel/sharedViews.ts).
// The reference is the memory itself: the worker reads and writes through its
// views, and the calling thread sees the values at the positions it chose.
import { Worker } from "node:worker_threads";
import { describe, expect, it } from "vitest";
import { packSharedViews, unpackSharedViews } from "../../../src/parallel/sharedViews.js";

const UNPACK_IN_WORKER = `
const { parentPort, workerData } = require("node:worker_threads");
const kinds = { Float64Array, Float32Array, Int32Array, Uint32Array, Int16Array, Uint16Array, Int8Array, Uint8Array, Uint8ClampedArray };
const unpack = (v) => {
  if (v === null || typeof v !== "object" || ArrayBuffer.isView(v)) return v;
  if (Array.isArray(v)) return v.map(unpack);
  if (typeof v.sharedView === "string" && v.buffer instanceof SharedArrayBuffer) return new kinds[v.sharedView](v.buffer, v.byteOffset, v.length);
  return Object.fromEntries(Object.entries(v).map(([k, e]) => [k, unpack(e)]));
};
const data = unpack(workerData);
data.view[0] = 42;
parentPort.postMessage({ length: data.view.length, last: data.view[data.view.length - 1] });
`;

function inWorker(workerData: unknown): Promise<{ length: number; last: number }> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(UNPACK_IN_WORKER, { eval: true, workerData });
    worker.once("message", (message) => {
      void worker.terminate();
      resolve(message);
    });
    worker.once("error", reject);
  });
}

describe("shared views travel to worker threads whole", () => {
  it("a Float64Array over more than 4 GiB keeps its length (posted as a view, Node wraps it at 2^32 bytes)", async () => {
    // 552,780,000 values: 10,000 participants × 55,278 edges, 4.42 GB. The buffer is
    // allocated lazily, so only the pages touched here take memory.
    const length = 552_780_000;
    const view = new Float64Array(new SharedArrayBuffer(length * 8));
    view[length - 1] = 7.5;
    const seen = await inWorker(packSharedViews({ view }));
    expect(seen.length).toBe(length);
    expect(seen.last).toBe(7.5);
    expect(view[0]).toBe(42); // written by the worker into the same memory
  });

  it("round-trips offsets, kinds and nesting, and leaves unshared arrays and other values alone", () => {
    const shared = new SharedArrayBuffer(64);
    const f64 = new Float64Array(shared, 8, 3);
    const i32 = new Int32Array(shared, 40, 2);
    const local = new Float64Array([1, 2]);
    const packed = packSharedViews({ a: { f64, list: [i32, 5, "x"] }, local, n: null }) as Record<string, unknown>;
    expect(packed.local).toBe(local);
    const back = unpackSharedViews<{ a: { f64: Float64Array; list: [Int32Array, number, string] }; local: Float64Array; n: null }>(packed);
    expect(back.a.f64).toBeInstanceOf(Float64Array);
    expect([back.a.f64.byteOffset, back.a.f64.length, back.a.f64.buffer]).toEqual([8, 3, shared]);
    expect(back.a.list[0]).toBeInstanceOf(Int32Array);
    expect([back.a.list[0].byteOffset, back.a.list[0].length]).toEqual([40, 2]);
    expect(back.a.list.slice(1)).toEqual([5, "x"]);
    expect(back.n).toBeNull();
    back.a.f64[1] = 3.25;
    expect(f64[1]).toBe(3.25);
  });
});
