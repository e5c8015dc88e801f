// The functions the kernel module exports, with their parameters in order: the one
// description from which the generators write each exported function's header
// (permuteKernelWat.mjs, screenKernelWat.mjs) and buildWasm.mjs writes the TypeScript
// declarations that wasmKernel.ts calls them through (generated/kernelSignatures.ts).
// Parameter names are the WebAssembly text's; what each holds is described where the
// function is generated. Every exported function returns nothing.

/** Parameters from "name type" pairs separated by commas. */
const parameters = (text) =>
  text.split(",").map((pair) => {
    const [name, type] = pair.trim().split(/\s+/);
    return { name, type };
  });

export const KERNEL_FUNCTIONS = {
  // permuteKernelWat.mjs: statistics in double precision
  statisticsBlock: parameters(
    "panel i32, rowTiles i32, S i32, res i32, width i32, prod i32, batch i32, vectors i32, ss i32, mask i32, effectNorm2 f64, df f64, out i32, outStride i32",
  ),
  transposeBlock: parameters("src i32, dst i32, S i32, W i32"),
  groupStatisticsBlock: parameters(
    "blockT i32, W i32, width i32, offsets i32, groupSize i32, batch i32, rowSum i32, ss i32, mask i32, difference f64, other f64, effectNorm2 f64, df f64, out i32, outStride i32",
  ),
  tileProducts: parameters("panel i32, rowTiles i32, S i32, res i32, prod i32"),
  // screenKernelWat.mjs: the single-precision screen
  transposeDemoteBlock: parameters("src i32, dst i32, S i32, W i32"),
  groupTableScreenBlock: parameters(
    "blockT i32, W i32, width i32, S i32, chunkSize i32, offsets i32, chunks i32, batch i32, tables i32, sLo i32, sHi i32, first i32, lists i32, counts i32, capacity i32, nLo i32, nHi i32, nearLists i32, nearCounts i32, nearCapacity i32",
  ),
  // quantizedScreenWat.mjs: the products screen in 16-bit integers
  quantizeInterleaveBlock: parameters("src i32, dst i32, S i32, tiles i32, inverse i32"),
  quantizedScreenBlock: parameters(
    "panel i32, rowTiles i32, S2 i32, res i32, width i32, scratch i32, rowScale i32, edgeScale i32, prod i32, batch i32, vectors i32, ss i32, l1 i32, mask i32, norms i32, invNorm f64, df f64, rhs f64, upper i32, lower i32, first i32, lists i32, counts i32, capacity i32",
  ),
  quantizedTileProducts: parameters("panel i32, rowTiles i32, S2 i32, res i32, scratch i32, rowScale i32, edgeScale i32, prod i32"),
};

/** Parameters per line of the WebAssembly text. */
const PER_LINE = 6;

/**
 * Writes the WebAssembly text that opens exported function `name`: `(func`, an internal
 * name when other functions call it, the export and its parameters; locals and body follow.
 * @param {(indent: number, text: string) => void} emit
 * @param {number} indent the function's indent (parameters go one level deeper)
 * @param {string} name
 * @param {string} [internal] the function's name inside the module, without `$`
 */
export function emitExportedFunction(emit, indent, name, internal) {
  const signature = KERNEL_FUNCTIONS[name];
  if (!signature) throw new Error(`kernelExports: no exported function ${name}`);
  const params = signature.map(({ name: param, type }) => `(param $${param} ${type})`);
  emit(indent, `(func${internal ? ` $${internal}` : ""} (export "${name}")`);
  for (let i = 0; i < params.length; i += PER_LINE) emit(indent + 1, params.slice(i, i + PER_LINE).join(" "));
}
