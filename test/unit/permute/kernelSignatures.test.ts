// The TypeScript declarations of the WebAssembly kernel's exports
// (src/permute/kernels/generated/kernelSignatures.ts, written by build/buildWasm.mjs from
// build/kernelExports.mjs, the description the generators write the functions' headers from)
// against the module itself: the names the engine lists (WebAssembly.Module.exports and
// .imports), each function's parameter count (an exported function's `length`) and the
// parameter types read back from the binary by the wabt package's disassembler.
import wabtFactory from "wabt";
import { describe, expect, it } from "vitest";
import { PERMUTE_KERNEL_BASE64, PERMUTE_KERNEL_TILE } from "../../../src/permute/kernels/generated/permuteKernelBytes.js";
import { SUBJECTS_PER_SUM } from "../../../src/permute/screening.js";
import { KERNEL_FUNCTION_TYPES } from "../../../src/permute/kernels/generated/kernelSignatures.js";

/** The part of the WebAssembly JavaScript API used here (the compiler settings do not declare it). */
interface WebAssemblyApi {
  Module: { new (bytes: Uint8Array): object; exports(module: object): { name: string; kind: string }[]; imports(module: object): unknown[] };
  Instance: new (module: object, imports: object) => { exports: Record<string, { length?: number; value?: number }> };
}
const api = (globalThis as unknown as { WebAssembly: WebAssemblyApi }).WebAssembly;
const bytes = Uint8Array.from(Buffer.from(PERMUTE_KERNEL_BASE64, "base64"));
const module = new api.Module(bytes);
const declared = Object.keys(KERNEL_FUNCTION_TYPES).sort();

describe("the kernel module's exports match their generated declarations", () => {
  it("the module exports exactly the declared functions, and its memory, and imports nothing", () => {
    const exports = api.Module.exports(module);
    expect(exports.filter((e) => e.kind === "function").map((e) => e.name).sort()).toEqual(declared);
    expect(exports.filter((e) => e.kind === "memory").map((e) => e.name)).toEqual(["memory"]);
    expect(api.Module.imports(module)).toEqual([]);
  });

  it("each exported function takes as many parameters as its declaration", () => {
    const instance = new api.Instance(module, {});
    for (const name of declared) {
      const types = KERNEL_FUNCTION_TYPES[name as keyof typeof KERNEL_FUNCTION_TYPES];
      expect(instance.exports[name].length, `${name}: parameters`).toBe(types.length);
    }
  });

  it("each exported function's parameter types, read from the binary, are the declared ones", async () => {
    const wabt = await wabtFactory();
    const disassembled = wabt.readWasm(bytes, { readDebugNames: false, simd: true });
    let text: string;
    try {
      text = disassembled.toText({ foldExprs: false, inlineExport: true });
    } finally {
      disassembled.destroy();
    }
    const found = new Map<string, string[]>();
    for (const match of text.matchAll(/\(func \(;\d+;\) \(export "(\w+)"\) \(type \d+\)((?: \(param[^)]*\))*)/g)) {
      found.set(match[1], [...match[2].matchAll(/\(param ([^)]*)\)/g)].flatMap((p) => p[1].trim().split(/\s+/)));
    }
    expect([...found.keys()].sort()).toEqual(declared);
    for (const name of declared) expect(found.get(name), name).toEqual(KERNEL_FUNCTION_TYPES[name as keyof typeof KERNEL_FUNCTION_TYPES]);
  });

  it("the tile sizes the module exports are those the TypeScript side derives from PERMUTE_KERNEL_TILE", () => {
    const instance = new api.Instance(module, {});
    const value = (name: string) => instance.exports[name].value;
    expect(value("rowsPerTile")).toBe(PERMUTE_KERNEL_TILE.rowPairs * 2);
    expect(value("edgesPerTile")).toBe(PERMUTE_KERNEL_TILE.edgesPerTile);
    expect(value("groupEdgesPerTile")).toBe(PERMUTE_KERNEL_TILE.groupPairs * 2);
    expect(value("screenRowsPerTile")).toBe(PERMUTE_KERNEL_TILE.rowQuads * 4);
    expect(value("screenGroupEdgesPerTile")).toBe(PERMUTE_KERNEL_TILE.groupQuads * 4);
    // The integer screen's exact 32-bit sums: the bound (screening.ts quantizedScales) counts one conversion per sum.
    expect(value("quantizedPairsPerChunk")).toBe(SUBJECTS_PER_SUM / 2);
  });
});
