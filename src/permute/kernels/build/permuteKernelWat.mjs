// The WebAssembly text of the SIMD permutation kernel. This generator is the
// kernel's source: it writes the register tile out in full (WebAssembly text
// has no macros), and build/buildWasm.mjs assembles its output with wabt.
//
// What the kernel computes is exactly what src/permute/permutedStatistics.ts
// computes, in the same order of floating-point operations, so the results are
// bit-identical:
//   products[j, e] = Σ_s weights[j, s] · residuals[e, s], the sum over subjects in
//                    ascending order from +0, one rounding per multiply and one per add
//                    (no fused multiply–add);
//   t[b, e]        = a / √((SSE / df) · x̃'x̃), SSE = ‖R_e‖² − a²/x̃'x̃ − Σ_k g_k²,
//                    NaN where SSE ≤ 0 or the edge is not valid.
// The f64x2 lanes hold two rows (relabelings' vectors) of the same edge, so every
// lane is an ordinary sequential sum: SIMD across rows, never across subjects.
//
// Memory layout (byte offsets passed in by the caller, src/permute/kernels/wasmKernel.ts):
//   panel     the weights packed by tiles of ROWS_PER_TILE rows: panel[t][s][r] = weights[t·RT + r, s];
//             rows beyond the real ones are zero.
//   residuals a block of edges, edge-major as in KernelData (block[i·S + s]), with room for
//             whole tiles of EDGES_PER_TILE edges (the padding's products are never used).
//   products  scratch of EDGES_PER_TILE × paddedRows: products[p·paddedRows + j].
//   sumSquares, valid   ‖R_e‖² (f64) and the valid flag (u8) of the block's edges.
//   out       t for the block: out[b·outStride + i].

/** Rows per f64x2 accumulator. */
const LANES = 2;

/**
 * @param {{ rowPairs: number, edgesPerTile: number }} tile
 *   rowPairs × edgesPerTile f64x2 accumulators (each holding two rows of one edge).
 *   V8 keeps 15 xmm registers for wasm on x64: accumulators + rowPairs weights + 2 temporaries must fit.
 * @returns {string} WebAssembly text
 */
export function permuteKernelWat({ rowPairs, edgesPerTile }) {
  const R = rowPairs;
  const P = edgesPerTile;
  const RT = R * LANES;
  const range = (n) => Array.from({ length: n }, (_, i) => i);
  const acc = (k, p) => `$acc_${k}_${p}`;
  const lines = [];
  const emit = (indent, text) => lines.push("  ".repeat(indent) + text);

  emit(0, "(module");
  emit(1, '(memory (export "memory") 1)');
  emit(1, `(global (export "rowsPerTile") i32 (i32.const ${RT}))`);
  emit(1, `(global (export "edgesPerTile") i32 (i32.const ${P}))`);

  // ---- products of one edge tile: all row tiles against edges i..i+P−1 ----
  emit(1, "(func $tileProducts");
  emit(2, "(param $panel i32) (param $rowTiles i32) (param $S i32) (param $res i32) (param $prod i32) (param $paddedRows i32)");
  emit(2, "(local $t i32) (local $wp i32) (local $end i32) (local $stride i32)");
  for (const p of range(P)) emit(2, `(local $r${p} i32)`);
  for (const k of range(R)) emit(2, `(local $w${k} v128)`);
  emit(2, "(local $x v128)");
  for (const k of range(R)) for (const p of range(P)) emit(2, `(local ${acc(k, p)} v128)`);
  emit(2, ";; stride: bytes between two edges of the residual block");
  emit(2, "(local.set $stride (i32.shl (local.get $S) (i32.const 3)))");
  emit(2, "(local.set $wp (local.get $panel))");
  emit(2, "(block $rowsDone");
  emit(3, "(loop $rows");
  emit(4, "(br_if $rowsDone (i32.ge_u (local.get $t) (local.get $rowTiles)))");
  for (const k of range(R)) for (const p of range(P)) emit(4, `(local.set ${acc(k, p)} (v128.const f64x2 0 0))`);
  emit(4, `(local.set $r0 (local.get $res))`);
  for (const p of range(P).slice(1)) emit(4, `(local.set $r${p} (i32.add (local.get $r${p - 1}) (local.get $stride)))`);
  emit(4, `;; end of this row tile's panel: S steps of ${RT * 8} bytes`);
  emit(4, `(local.set $end (i32.add (local.get $wp) (i32.mul (local.get $S) (i32.const ${RT * 8}))))`);
  emit(4, "(block $subjectsDone");
  emit(5, "(br_if $subjectsDone (i32.ge_u (local.get $wp) (local.get $end)))");
  emit(5, "(loop $subjects");
  for (const k of range(R)) emit(6, `(local.set $w${k} (v128.load offset=${k * 16} (local.get $wp)))`);
  for (const p of range(P)) {
    emit(6, `(local.set $x (v128.load64_splat (local.get $r${p})))`);
    for (const k of range(R)) {
      emit(6, `(local.set ${acc(k, p)} (f64x2.add (local.get ${acc(k, p)}) (f64x2.mul (local.get $w${k}) (local.get $x))))`);
    }
  }
  for (const p of range(P)) emit(6, `(local.set $r${p} (i32.add (local.get $r${p}) (i32.const 8)))`);
  emit(6, `(local.set $wp (i32.add (local.get $wp) (i32.const ${RT * 8})))`);
  emit(6, "(br_if $subjects (i32.lt_u (local.get $wp) (local.get $end)))");
  emit(5, ")");
  emit(4, ")");
  emit(4, ";; products[p·paddedRows + t·RT + 2k .. +1]");
  for (const p of range(P)) {
    for (const k of range(R)) {
      emit(
        4,
        `(v128.store (i32.add (local.get $prod) (i32.shl (i32.add (i32.mul (i32.const ${p}) (local.get $paddedRows)) (i32.add (i32.mul (local.get $t) (i32.const ${RT})) (i32.const ${k * LANES}))) (i32.const 3))) (local.get ${acc(k, p)}))`,
      );
    }
  }
  emit(4, "(local.set $t (i32.add (local.get $t) (i32.const 1)))");
  emit(4, "(br $rows)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  // ---- statistics of one edge tile (scalar: O(rows) per edge, S times less work than the products) ----
  emit(1, "(func $tileStatistics");
  emit(2, "(param $prod i32) (param $paddedRows i32) (param $count i32) (param $batch i32) (param $vectors i32)");
  emit(2, "(param $ss i32) (param $valid i32) (param $effectNorm2 f64) (param $df f64) (param $out i32) (param $outStride i32)");
  emit(2, "(local $p i32) (local $b i32) (local $k i32) (local $row i32) (local $isValid i32)");
  emit(2, "(local $sumSquares f64) (local $a f64) (local $g f64) (local $sse f64) (local $t f64)");
  emit(2, "(block $edgesDone");
  emit(3, "(loop $edges");
  emit(4, "(br_if $edgesDone (i32.ge_u (local.get $p) (local.get $count)))");
  emit(4, "(local.set $isValid (i32.load8_u (i32.add (local.get $valid) (local.get $p))))");
  emit(4, "(local.set $sumSquares (f64.load (i32.add (local.get $ss) (i32.shl (local.get $p) (i32.const 3)))))");
  emit(4, ";; row: address of products[p·paddedRows + b·vectors]");
  emit(4, "(local.set $row (i32.add (local.get $prod) (i32.shl (i32.mul (local.get $p) (local.get $paddedRows)) (i32.const 3))))");
  emit(4, "(local.set $b (i32.const 0))");
  emit(4, "(block $batchDone");
  emit(5, "(loop $relabelings");
  emit(6, "(br_if $batchDone (i32.ge_u (local.get $b) (local.get $batch)))");
  emit(6, "(local.set $a (f64.load (local.get $row)))");
  emit(6, ";; sse = ‖R‖² − a·a / x̃'x̃, then − g_k·g_k in order of k");
  emit(6, "(local.set $sse (f64.sub (local.get $sumSquares) (f64.div (f64.mul (local.get $a) (local.get $a)) (local.get $effectNorm2))))");
  emit(6, "(local.set $k (i32.const 1))");
  emit(6, "(block $nuisanceDone");
  emit(7, "(loop $nuisance");
  emit(8, "(br_if $nuisanceDone (i32.ge_u (local.get $k) (local.get $vectors)))");
  emit(8, "(local.set $g (f64.load (i32.add (local.get $row) (i32.shl (local.get $k) (i32.const 3)))))");
  emit(8, "(local.set $sse (f64.sub (local.get $sse) (f64.mul (local.get $g) (local.get $g))))");
  emit(8, "(local.set $k (i32.add (local.get $k) (i32.const 1)))");
  emit(8, "(br $nuisance)");
  emit(7, ")");
  emit(6, ")");
  emit(6, ";; t = a / √((sse / df) · x̃'x̃) where the edge is valid and sse > 0, else NaN");
  emit(6, "(local.set $t (f64.const nan))");
  emit(6, "(if (i32.and (local.get $isValid) (f64.gt (local.get $sse) (f64.const 0)))");
  emit(7, "(then (local.set $t (f64.div (local.get $a) (f64.sqrt (f64.mul (f64.div (local.get $sse) (local.get $df)) (local.get $effectNorm2)))))))");
  emit(6, "(f64.store (i32.add (local.get $out) (i32.shl (i32.add (i32.mul (local.get $b) (local.get $outStride)) (local.get $p)) (i32.const 3))) (local.get $t))");
  emit(6, "(local.set $row (i32.add (local.get $row) (i32.shl (local.get $vectors) (i32.const 3))))");
  emit(6, "(local.set $b (i32.add (local.get $b) (i32.const 1)))");
  emit(6, "(br $relabelings)");
  emit(5, ")");
  emit(4, ")");
  emit(4, "(local.set $p (i32.add (local.get $p) (i32.const 1)))");
  emit(4, "(br $edges)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  // ---- a block of edges: tiles of P edges, products then statistics ----
  emit(1, '(func (export "statisticsBlock")');
  emit(2, "(param $panel i32) (param $rowTiles i32) (param $S i32) (param $res i32) (param $width i32)");
  emit(2, "(param $prod i32) (param $batch i32) (param $vectors i32) (param $ss i32) (param $valid i32)");
  emit(2, "(param $effectNorm2 f64) (param $df f64) (param $out i32) (param $outStride i32)");
  emit(2, "(local $i i32) (local $paddedRows i32) (local $count i32)");
  emit(2, `(local.set $paddedRows (i32.mul (local.get $rowTiles) (i32.const ${RT})))`);
  emit(2, "(block $done");
  emit(3, "(loop $tiles");
  emit(4, "(br_if $done (i32.ge_u (local.get $i) (local.get $width)))");
  emit(
    4,
    "(call $tileProducts (local.get $panel) (local.get $rowTiles) (local.get $S) (i32.add (local.get $res) (i32.shl (i32.mul (local.get $i) (local.get $S)) (i32.const 3))) (local.get $prod) (local.get $paddedRows))",
  );
  emit(4, `(local.set $count (select (i32.const ${P}) (i32.sub (local.get $width) (local.get $i)) (i32.le_u (i32.add (local.get $i) (i32.const ${P})) (local.get $width))))`);
  emit(
    4,
    "(call $tileStatistics (local.get $prod) (local.get $paddedRows) (local.get $count) (local.get $batch) (local.get $vectors) (i32.add (local.get $ss) (i32.shl (local.get $i) (i32.const 3))) (i32.add (local.get $valid) (local.get $i)) (local.get $effectNorm2) (local.get $df) (i32.add (local.get $out) (i32.shl (local.get $i) (i32.const 3))) (local.get $outStride))",
  );
  emit(4, `(local.set $i (i32.add (local.get $i) (i32.const ${P})))`);
  emit(4, "(br $tiles)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  // ---- products only (for tests and the benchmark): products[p·paddedRows + j] for one tile ----
  emit(1, '(func (export "tileProducts")');
  emit(2, "(param $panel i32) (param $rowTiles i32) (param $S i32) (param $res i32) (param $prod i32) (param $paddedRows i32)");
  emit(2, "(call $tileProducts (local.get $panel) (local.get $rowTiles) (local.get $S) (local.get $res) (local.get $prod) (local.get $paddedRows))");
  emit(1, ")");
  emit(0, ")");
  return lines.join("\n") + "\n";
}
