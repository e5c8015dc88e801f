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
//   products  scratch of paddedRows × EDGES_PER_TILE: products[j·P + p].
//   sumSquares, mask    ‖R_e‖² (f64) and the valid flag as a 64-bit mask (all ones or zero)
//             of every edge, with room for one more tile past the last edge.
//   out       t for the block: out[b·outStride + i] (the caller's batch × E statistics).
//
// The two-level path (src/permute/kernels/groupSums.ts defines it) adds two functions:
// transposeBlock turns a copied block of residuals subject-major (blockT[s·W + i]),
// and groupStatisticsBlock sums, for each relabeling, the rows of its group's subjects
// in ascending order (f64x2 lanes = two edges; additions only), then forms
//   a = (g − o)·sum + o·ΣR   and t as above with one vector.

import { emitExportedFunction } from "./kernelExports.mjs";
import { screenKernelFields } from "./screenKernelWat.mjs";
import { quantizedScreenFields } from "./quantizedScreenWat.mjs";

/** Rows per f64x2 accumulator. */
const LANES = 2;

/**
 * @param {{ rowPairs: number, edgesPerTile: number, groupPairs: number, rowQuads: number, groupQuads: number }} tile
 *   rowPairs × edgesPerTile f64x2 accumulators (each holding two rows of one edge) for the products;
 *   groupPairs f64x2 accumulators (two edges each) for the group sums; rowQuads and groupQuads
 *   size the single-precision screen (screenKernelWat.mjs).
 *   V8 keeps 15 xmm registers for wasm on x64: accumulators + rowPairs weights + 2 temporaries must fit.
 * @returns {string} WebAssembly text
 */
export function permuteKernelWat({ rowPairs, edgesPerTile, groupPairs, rowQuads, groupQuads }) {
  const R = rowPairs;
  const P = edgesPerTile;
  if (P % 2 !== 0) throw new Error("permuteKernelWat: edgesPerTile must be even (the statistics take edges in pairs)");
  const RT = R * LANES;
  const range = (n) => Array.from({ length: n }, (_, i) => i);
  const acc = (k, p) => `$acc_${k}_${p}`;
  const lines = [];
  const emit = (indent, text) => lines.push("  ".repeat(indent) + text);

  emit(0, "(module");
  emit(1, '(memory (export "memory") 1)');
  emit(1, `(global (export "rowsPerTile") i32 (i32.const ${RT}))`);
  emit(1, `(global (export "edgesPerTile") i32 (i32.const ${P}))`);
  emit(1, `(global (export "groupEdgesPerTile") i32 (i32.const ${2 * groupPairs}))`);

  // ---- products of one edge tile: all row tiles against edges i..i+P−1 ----
  emit(1, "(func $tileProducts");
  emit(2, "(param $panel i32) (param $rowTiles i32) (param $S i32) (param $res i32) (param $prod i32)");
  emit(2, "(local $t i32) (local $wp i32) (local $end i32) (local $stride i32) (local $rowAt i32)");
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
  emit(4, ";; products[j·P + p] for the tile's rows j = t·RT + 2k, +1: pairs of edges (p, p+1) interleaved into rows");
  emit(4, `(local.set $rowAt (i32.add (local.get $prod) (i32.mul (local.get $t) (i32.const ${RT * P * 8}))))`);
  for (let p = 0; p < P; p += 2) {
    for (const k of range(R)) {
      const even = `(i8x16.shuffle 0 1 2 3 4 5 6 7 16 17 18 19 20 21 22 23 (local.get ${acc(k, p)}) (local.get ${acc(k, p + 1)}))`;
      const odd = `(i8x16.shuffle 8 9 10 11 12 13 14 15 24 25 26 27 28 29 30 31 (local.get ${acc(k, p)}) (local.get ${acc(k, p + 1)}))`;
      emit(4, `(v128.store offset=${(2 * k * P + p) * 8} (local.get $rowAt) ${even})`);
      emit(4, `(v128.store offset=${((2 * k + 1) * P + p) * 8} (local.get $rowAt) ${odd})`);
    }
  }
  emit(4, "(local.set $t (i32.add (local.get $t) (i32.const 1)))");
  emit(4, "(br $rows)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  // ---- statistics of one edge tile, two edges per f64x2 (lanes are independent: the same scalar operations) ----
  const pairs = range(P / 2);
  emit(1, "(func $tileStatistics");
  emit(2, "(param $prod i32) (param $count i32) (param $batch i32) (param $vectors i32)");
  emit(2, "(param $ss i32) (param $mask i32) (param $effectNorm2 f64) (param $df f64) (param $out i32) (param $outStride i32)");
  emit(2, "(local $b i32) (local $k i32) (local $row i32) (local $o i32) (local $g v128) (local $norm v128) (local $dof v128)");
  for (const q of pairs) emit(2, `(local $ss${q} v128) (local $mask${q} v128) (local $a${q} v128) (local $sse${q} v128) (local $t${q} v128)`);
  emit(2, "(local.set $norm (f64x2.splat (local.get $effectNorm2)))");
  emit(2, "(local.set $dof (f64x2.splat (local.get $df)))");
  for (const q of pairs) {
    emit(2, `(local.set $ss${q} (v128.load offset=${q * 16} (local.get $ss)))`);
    emit(2, `(local.set $mask${q} (v128.load offset=${q * 16} (local.get $mask)))`);
  }
  emit(2, "(local.set $row (local.get $prod))");
  emit(2, "(local.set $o (local.get $out))");
  emit(2, "(block $batchDone");
  emit(3, "(loop $relabelings");
  emit(4, "(br_if $batchDone (i32.ge_u (local.get $b) (local.get $batch)))");
  emit(4, ";; sse = ‖R‖² − a·a / x̃'x̃, then − g_k·g_k in order of k (rows b·c + k of the products)");
  for (const q of pairs) {
    emit(4, `(local.set $a${q} (v128.load offset=${q * 16} (local.get $row)))`);
    emit(4, `(local.set $sse${q} (f64x2.sub (local.get $ss${q}) (f64x2.div (f64x2.mul (local.get $a${q}) (local.get $a${q})) (local.get $norm))))`);
  }
  emit(4, "(local.set $k (i32.const 1))");
  emit(4, "(block $nuisanceDone");
  emit(5, "(loop $nuisance");
  emit(6, "(br_if $nuisanceDone (i32.ge_u (local.get $k) (local.get $vectors)))");
  for (const q of pairs) {
    emit(6, `(local.set $g (v128.load offset=${q * 16} (i32.add (local.get $row) (i32.mul (local.get $k) (i32.const ${P * 8})))))`);
    emit(6, `(local.set $sse${q} (f64x2.sub (local.get $sse${q}) (f64x2.mul (local.get $g) (local.get $g))))`);
  }
  emit(6, "(local.set $k (i32.add (local.get $k) (i32.const 1)))");
  emit(6, "(br $nuisance)");
  emit(5, ")");
  emit(4, ")");
  emit(4, ";; t = a / √((sse / df) · x̃'x̃) where the edge is valid and sse > 0, else NaN");
  for (const q of pairs) {
    emit(4, `(local.set $t${q} (f64x2.div (local.get $a${q}) (f64x2.sqrt (f64x2.mul (f64x2.div (local.get $sse${q}) (local.get $dof)) (local.get $norm)))))`);
    emit(
      4,
      `(local.set $t${q} (v128.bitselect (local.get $t${q}) (v128.const f64x2 nan nan) (v128.and (local.get $mask${q}) (f64x2.gt (local.get $sse${q}) (v128.const f64x2 0 0)))))`,
    );
  }
  emit(4, ";; a whole tile stores two edges at a time; the last, partial tile edge by edge");
  emit(4, `(if (i32.eq (local.get $count) (i32.const ${P}))`);
  emit(5, "(then");
  for (const q of pairs) emit(6, `(v128.store offset=${q * 16} (local.get $o) (local.get $t${q}))`);
  emit(5, ")");
  emit(5, "(else");
  for (const q of pairs) {
    for (const lane of [0, 1]) {
      const p = 2 * q + lane;
      emit(6, `(if (i32.gt_u (local.get $count) (i32.const ${p})) (then (f64.store offset=${p * 8} (local.get $o) (f64x2.extract_lane ${lane} (local.get $t${q})))))`);
    }
  }
  emit(5, ")");
  emit(4, ")");
  emit(4, `(local.set $row (i32.add (local.get $row) (i32.mul (local.get $vectors) (i32.const ${P * 8}))))`);
  emit(4, "(local.set $o (i32.add (local.get $o) (i32.shl (local.get $outStride) (i32.const 3))))");
  emit(4, "(local.set $b (i32.add (local.get $b) (i32.const 1)))");
  emit(4, "(br $relabelings)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  // ---- a block of edges: tiles of P edges, products then statistics ----
  emitExportedFunction(emit, 1, "statisticsBlock");
  emit(2, "(local $i i32) (local $count i32)");
  emit(2, "(block $done");
  emit(3, "(loop $tiles");
  emit(4, "(br_if $done (i32.ge_u (local.get $i) (local.get $width)))");
  emit(
    4,
    "(call $tileProducts (local.get $panel) (local.get $rowTiles) (local.get $S) (i32.add (local.get $res) (i32.shl (i32.mul (local.get $i) (local.get $S)) (i32.const 3))) (local.get $prod))",
  );
  emit(4, `(local.set $count (select (i32.const ${P}) (i32.sub (local.get $width) (local.get $i)) (i32.le_u (i32.add (local.get $i) (i32.const ${P})) (local.get $width))))`);
  emit(
    4,
    "(call $tileStatistics (local.get $prod) (local.get $count) (local.get $batch) (local.get $vectors) (i32.add (local.get $ss) (i32.shl (local.get $i) (i32.const 3))) (i32.add (local.get $mask) (i32.shl (local.get $i) (i32.const 3))) (local.get $effectNorm2) (local.get $df) (i32.add (local.get $out) (i32.shl (local.get $i) (i32.const 3))) (local.get $outStride))",
  );
  emit(4, `(local.set $i (i32.add (local.get $i) (i32.const ${P})))`);
  emit(4, "(br $tiles)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  // ---- the two-level path (src/permute/kernels/groupSums.ts): block transpose and group sums ----
  emit(1, ";; dst[s·W + i] = src[i·S + s] for edges i < W (W even) and subjects s < S: 2 × 2 transposes");
  emitExportedFunction(emit, 1, "transposeBlock");
  emit(2, "(local $i i32) (local $a i32) (local $b i32) (local $d i32) (local $aEnd i32) (local $rowBytes i32) (local $x v128) (local $y v128)");
  emit(2, "(local.set $rowBytes (i32.shl (local.get $W) (i32.const 3)))");
  emit(2, "(block $edgesDone");
  emit(3, "(loop $edges");
  emit(4, "(br_if $edgesDone (i32.ge_u (local.get $i) (local.get $W)))");
  emit(4, "(local.set $a (i32.add (local.get $src) (i32.shl (i32.mul (local.get $i) (local.get $S)) (i32.const 3))))");
  emit(4, "(local.set $b (i32.add (local.get $a) (i32.shl (local.get $S) (i32.const 3))))");
  emit(4, "(local.set $d (i32.add (local.get $dst) (i32.shl (local.get $i) (i32.const 3))))");
  emit(4, ";; aEnd: the end of the subject pairs of edge i");
  emit(4, "(local.set $aEnd (i32.add (local.get $a) (i32.shl (i32.and (local.get $S) (i32.const -2)) (i32.const 3))))");
  emit(4, "(block $pairsDone");
  emit(5, "(loop $pairs");
  emit(6, "(br_if $pairsDone (i32.ge_u (local.get $a) (local.get $aEnd)))");
  emit(6, "(local.set $x (v128.load (local.get $a)))");
  emit(6, "(local.set $y (v128.load (local.get $b)))");
  emit(6, "(v128.store (local.get $d) (i8x16.shuffle 0 1 2 3 4 5 6 7 16 17 18 19 20 21 22 23 (local.get $x) (local.get $y)))");
  emit(6, "(v128.store (i32.add (local.get $d) (local.get $rowBytes)) (i8x16.shuffle 8 9 10 11 12 13 14 15 24 25 26 27 28 29 30 31 (local.get $x) (local.get $y)))");
  emit(6, "(local.set $a (i32.add (local.get $a) (i32.const 16)))");
  emit(6, "(local.set $b (i32.add (local.get $b) (i32.const 16)))");
  emit(6, "(local.set $d (i32.add (local.get $d) (i32.shl (local.get $rowBytes) (i32.const 1))))");
  emit(6, "(br $pairs)");
  emit(5, ")");
  emit(4, ")");
  emit(4, "(if (i32.and (local.get $S) (i32.const 1))");
  emit(5, "(then (f64.store (local.get $d) (f64.load (local.get $a))) (f64.store offset=8 (local.get $d) (f64.load (local.get $b)))))");
  emit(4, "(local.set $i (i32.add (local.get $i) (i32.const 2)))");
  emit(4, "(br $edges)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  const G = groupPairs;
  const GE = 2 * G;
  emit(1, `;; t for a block of edges from group sums over each relabeling's group (offsets[b·groupSize + m] = s·W·8): ${GE} edges per tile`);
  emitExportedFunction(emit, 1, "groupStatisticsBlock");
  emit(2, "(local $i i32) (local $count i32) (local $b i32) (local $m i32) (local $mEnd i32) (local $col i32) (local $o i32) (local $row i32) (local $rowBytes i32) (local $at i32)");
  emit(2, "(local $d v128) (local $other2 v128) (local $norm v128) (local $dof v128) (local $a v128) (local $sse v128) (local $t v128)");
  for (const p of range(G)) emit(2, `(local $acc${p} v128)`);
  emit(2, "(local.set $rowBytes (i32.shl (local.get $W) (i32.const 3)))");
  emit(2, "(local.set $d (f64x2.splat (local.get $difference)))");
  emit(2, "(local.set $other2 (f64x2.splat (local.get $other)))");
  emit(2, "(local.set $norm (f64x2.splat (local.get $effectNorm2)))");
  emit(2, "(local.set $dof (f64x2.splat (local.get $df)))");
  emit(2, "(block $tilesDone");
  emit(3, "(loop $tiles");
  emit(4, "(br_if $tilesDone (i32.ge_u (local.get $i) (local.get $width)))");
  emit(4, `(local.set $count (select (i32.const ${GE}) (i32.sub (local.get $width) (local.get $i)) (i32.le_u (i32.add (local.get $i) (i32.const ${GE})) (local.get $width))))`);
  emit(4, "(local.set $col (i32.add (local.get $blockT) (i32.shl (local.get $i) (i32.const 3))))");
  emit(4, "(local.set $at (i32.shl (local.get $i) (i32.const 3)))");
  emit(4, "(local.set $o (i32.add (local.get $out) (local.get $at)))");
  emit(4, "(local.set $m (local.get $offsets))");
  emit(4, "(local.set $b (i32.const 0))");
  emit(4, "(block $batchDone");
  emit(5, "(loop $relabelings");
  emit(6, "(br_if $batchDone (i32.ge_u (local.get $b) (local.get $batch)))");
  for (const p of range(G)) emit(6, `(local.set $acc${p} (v128.const f64x2 0 0))`);
  emit(6, "(local.set $mEnd (i32.add (local.get $m) (i32.shl (local.get $groupSize) (i32.const 2))))");
  emit(6, ";; the group's subjects in ascending order (as byte offsets s·W·8 of their rows): acc += R[s] (additions only)");
  emit(6, "(block $membersDone");
  emit(7, "(br_if $membersDone (i32.ge_u (local.get $m) (local.get $mEnd)))");
  emit(7, "(loop $members");
  emit(8, "(local.set $row (i32.add (local.get $col) (i32.load (local.get $m))))");
  for (const p of range(G)) emit(8, `(local.set $acc${p} (f64x2.add (local.get $acc${p}) (v128.load offset=${p * 16} (local.get $row))))`);
  emit(8, "(local.set $m (i32.add (local.get $m) (i32.const 4)))");
  emit(8, "(br_if $members (i32.lt_u (local.get $m) (local.get $mEnd)))");
  emit(7, ")");
  emit(6, ")");
  emit(6, ";; a = difference · sum + other · ΣR; then t as in tileStatistics with one vector");
  for (const p of range(G)) {
    emit(6, `(local.set $a (f64x2.add (f64x2.mul (local.get $d) (local.get $acc${p})) (f64x2.mul (local.get $other2) (v128.load offset=${p * 16} (i32.add (local.get $rowSum) (local.get $at))))))`);
    emit(6, `(local.set $sse (f64x2.sub (v128.load offset=${p * 16} (i32.add (local.get $ss) (local.get $at))) (f64x2.div (f64x2.mul (local.get $a) (local.get $a)) (local.get $norm))))`);
    emit(6, "(local.set $t (f64x2.div (local.get $a) (f64x2.sqrt (f64x2.mul (f64x2.div (local.get $sse) (local.get $dof)) (local.get $norm)))))");
    emit(
      6,
      `(local.set $t (v128.bitselect (local.get $t) (v128.const f64x2 nan nan) (v128.and (v128.load offset=${p * 16} (i32.add (local.get $mask) (local.get $at))) (f64x2.gt (local.get $sse) (v128.const f64x2 0 0)))))`,
    );
    emit(6, `(if (i32.ge_u (local.get $count) (i32.const ${2 * p + 2}))`);
    emit(7, `(then (v128.store offset=${p * 16} (local.get $o) (local.get $t)))`);
    emit(7, `(else (if (i32.eq (local.get $count) (i32.const ${2 * p + 1})) (then (f64.store offset=${p * 16} (local.get $o) (f64x2.extract_lane 0 (local.get $t)))))))`);
  }
  emit(6, "(local.set $o (i32.add (local.get $o) (i32.shl (local.get $outStride) (i32.const 3))))");
  emit(6, "(local.set $b (i32.add (local.get $b) (i32.const 1)))");
  emit(6, "(br $relabelings)");
  emit(5, ")");
  emit(4, ")");
  emit(4, `(local.set $i (i32.add (local.get $i) (i32.const ${GE})))`);
  emit(4, "(br $tiles)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  // ---- products only (for tests): products[j·P + p] for one tile of edges ----
  emitExportedFunction(emit, 1, "tileProducts");
  emit(2, "(call $tileProducts (local.get $panel) (local.get $rowTiles) (local.get $S) (local.get $res) (local.get $prod))");
  emit(1, ")");
  lines.push(...screenKernelFields({ rowQuads, groupQuads }));
  lines.push(...quantizedScreenFields({ rowQuads }));
  emit(0, ")");
  return lines.join("\n") + "\n";
}
