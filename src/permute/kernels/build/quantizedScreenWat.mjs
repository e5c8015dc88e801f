// The products screen in 16-bit integers (src/permute/screening.ts, quantizedScales, gives the
// bound that makes it exact): residuals and relabeled weights are rounded to integers on a
// per-edge and per-vector step, and i32x4.dot_i16x8_s multiplies and adds two subjects of
// four rows in one instruction, where f32x4 needs a multiply and an add for one subject.
// Integer sums are exact; every 128 subject pairs they are converted to f32 and added up,
// then multiplied by the two steps, so the screen (screenKernelWat.mjs $screenTile) reads
// the same products it reads from the single-precision path, within a larger bound.
//
// Memory layout (byte offsets from src/permute/kernels/wasmKernel.ts):
//   panel16   weights by tiles of 4·rowQuads rows, pairs of subjects: the i16 pair
//             (s = 2j, 2j + 1) of row r of row tile t at ((t·S2 + j)·RT + r)·4, S2 = ⌈S/2⌉
//   res16     a block of edges interleaved by tiles of 4 edges: the i16 pair j of edge 4t + p
//             at ((t·S2 + j)·4 + p)·4
//   scratch   per tile of 4 edges, rowTiles × rowQuads × 4 f32x4 (rows in lanes): the sums
//   rowScale  the weight step of each row (f32); edgeScale the residual step of each edge (f32)
//   prod      paddedRows × 4 f32: prod[j·4 + p], as $screenTile reads it

import { emitExportedFunction } from "./kernelExports.mjs";

/** Subject pairs per integer sum: 256 products of at most 2047 × 4095 stay below 2^31. */
export const PAIRS_PER_CHUNK = 128;
const P = 4;

/**
 * @param {{ rowQuads: number }} tile rowQuads × 4 i32x4 accumulators (4 rows each, 4 edges)
 * @returns {string[]} lines of WebAssembly text (module fields)
 */
export function quantizedScreenFields({ rowQuads }) {
  const Q = rowQuads;
  const RT = 4 * Q;
  const range = (n) => Array.from({ length: n }, (_, i) => i);
  const acc = (k, p) => `$acc_${k}_${p}`;
  const lines = [];
  const emit = (indent, text) => lines.push("  ".repeat(indent) + text);
  const lane32 = (vector, i) => [4 * i, 4 * i + 1, 4 * i + 2, 4 * i + 3].map((b) => b + 16 * vector);
  const shuffle = (bytes, x, y) => `(i8x16.shuffle ${bytes.join(" ")} ${x} ${y})`;
  const tileScratchBytes = (rowTiles) => `(i32.mul ${rowTiles} (i32.const ${Q * P * 16}))`;

  emit(1, `(global (export "quantizedPairsPerChunk") i32 (i32.const ${PAIRS_PER_CHUNK}))`);

  // ---- f64 edge-major block → i16 pairs interleaved by tiles of 4 edges: q = nearest(R · inverse step) ----
  emitExportedFunction(emit, 1, "quantizeInterleaveBlock");
  emit(2, "(local $t i32) (local $a i32) (local $j i32) (local $pairs i32) (local $stride i32)");
  for (const p of range(P)) emit(2, `(local $inv${p} v128)`);
  emit(2, "(local.set $stride (i32.shl (local.get $S) (i32.const 3)))");
  emit(2, "(local.set $pairs (i32.shr_u (local.get $S) (i32.const 1)))");
  emit(2, "(block $tilesDone");
  emit(3, "(loop $tileLoop");
  emit(4, "(br_if $tilesDone (i32.ge_u (local.get $t) (local.get $tiles)))");
  emit(4, "(local.set $a (i32.add (local.get $src) (i32.mul (local.get $t) (i32.shl (local.get $stride) (i32.const 2)))))");
  for (const p of range(P)) {
    emit(4, `(local.set $inv${p} (f64x2.splat (f64.load offset=${8 * p} (i32.add (local.get $inverse) (i32.shl (local.get $t) (i32.const 5))))))`);
  }
  emit(4, "(local.set $j (i32.const 0))");
  emit(4, "(block $pairsDone");
  emit(5, "(loop $pairLoop");
  emit(6, "(br_if $pairsDone (i32.ge_u (local.get $j) (local.get $pairs)))");
  for (const p of range(P)) {
    const address = `(i32.add (i32.add (local.get $a) (i32.mul (local.get $stride) (i32.const ${p}))) (i32.shl (local.get $j) (i32.const 4)))`;
    const integers = `(i32x4.trunc_sat_f64x2_s_zero (f64x2.nearest (f64x2.mul (v128.load ${address}) (local.get $inv${p}))))`;
    emit(6, `(i32.store offset=${4 * p} (local.get $dst) (i32x4.extract_lane 0 (i16x8.narrow_i32x4_s ${integers} (v128.const i32x4 0 0 0 0))))`);
  }
  emit(6, "(local.set $dst (i32.add (local.get $dst) (i32.const 16)))");
  emit(6, "(local.set $j (i32.add (local.get $j) (i32.const 1)))");
  emit(6, "(br $pairLoop)");
  emit(5, ")");
  emit(4, ")");
  emit(4, ";; an odd last subject pairs with a zero");
  emit(4, "(if (i32.and (local.get $S) (i32.const 1))");
  emit(5, "(then");
  for (const p of range(P)) {
    const address = `(i32.add (i32.add (local.get $a) (i32.mul (local.get $stride) (i32.const ${p}))) (i32.shl (i32.sub (local.get $S) (i32.const 1)) (i32.const 3)))`;
    emit(
      6,
      `(i32.store offset=${4 * p} (local.get $dst) (i32.and (i32.trunc_sat_f64_s (f64.nearest (f64.mul (f64.load ${address}) (f64x2.extract_lane 0 (local.get $inv${p}))))) (i32.const 65535)))`,
    );
  }
  emit(6, "(local.set $dst (i32.add (local.get $dst) (i32.const 16)))");
  emit(5, "))");
  emit(4, "(local.set $t (i32.add (local.get $t) (i32.const 1)))");
  emit(4, "(br $tileLoop)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  // ---- pairs j0 … j0+n−1 of one tile of 4 edges against every row tile, added (as f32) into the tile's scratch ----
  emit(1, "(func $chunkProducts16");
  emit(2, "(param $panel i32) (param $rowTiles i32) (param $S2 i32) (param $j0 i32) (param $n i32) (param $res i32) (param $scratch i32)");
  emit(2, "(local $t i32) (local $wp i32) (local $end i32) (local $rp i32) (local $at i32) (local $x v128)");
  for (const k of range(Q)) emit(2, `(local $w${k} v128)`);
  for (const k of range(Q)) for (const p of range(P)) emit(2, `(local ${acc(k, p)} v128)`);
  emit(2, "(block $rowsDone");
  emit(3, "(loop $rows");
  emit(4, "(br_if $rowsDone (i32.ge_u (local.get $t) (local.get $rowTiles)))");
  for (const k of range(Q)) for (const p of range(P)) emit(4, `(local.set ${acc(k, p)} (v128.const i32x4 0 0 0 0))`);
  emit(4, `(local.set $wp (i32.add (local.get $panel) (i32.mul (i32.add (i32.mul (local.get $t) (local.get $S2)) (local.get $j0)) (i32.const ${RT * 4}))))`);
  emit(4, `(local.set $end (i32.add (local.get $wp) (i32.mul (local.get $n) (i32.const ${RT * 4}))))`);
  emit(4, "(local.set $rp (i32.add (local.get $res) (i32.shl (local.get $j0) (i32.const 4))))");
  emit(4, "(block $pairsDone");
  emit(5, "(br_if $pairsDone (i32.ge_u (local.get $wp) (local.get $end)))");
  emit(5, "(loop $pairs");
  for (const k of range(Q)) emit(6, `(local.set $w${k} (v128.load offset=${k * 16} (local.get $wp)))`);
  for (const p of range(P)) {
    emit(6, `(local.set $x (v128.load32_splat offset=${4 * p} (local.get $rp)))`);
    for (const k of range(Q)) {
      emit(6, `(local.set ${acc(k, p)} (i32x4.add (local.get ${acc(k, p)}) (i32x4.dot_i16x8_s (local.get $w${k}) (local.get $x))))`);
    }
  }
  emit(6, "(local.set $rp (i32.add (local.get $rp) (i32.const 16)))");
  emit(6, `(local.set $wp (i32.add (local.get $wp) (i32.const ${RT * 4})))`);
  emit(6, "(br_if $pairs (i32.lt_u (local.get $wp) (local.get $end)))");
  emit(5, ")");
  emit(4, ")");
  emit(4, `(local.set $at (i32.add (local.get $scratch) (i32.mul (local.get $t) (i32.const ${Q * P * 16}))))`);
  for (const k of range(Q)) {
    for (const p of range(P)) {
      const offset = (k * P + p) * 16;
      emit(4, `(v128.store offset=${offset} (local.get $at) (f32x4.add (v128.load offset=${offset} (local.get $at)) (f32x4.convert_i32x4_s (local.get ${acc(k, p)}))))`);
    }
  }
  emit(4, "(local.set $t (i32.add (local.get $t) (i32.const 1)))");
  emit(4, "(br $rows)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  // ---- the sums of `tiles` tiles of 4 edges, chunk by chunk of subject pairs (the panel's chunk stays in cache across the tiles) ----
  emit(1, "(func $products16 (param $panel i32) (param $rowTiles i32) (param $S2 i32) (param $res i32) (param $tiles i32) (param $scratch i32)");
  emit(2, "(local $j0 i32) (local $n i32) (local $i i32) (local $p i32) (local $end i32) (local $tileBytes i32)");
  emit(2, `(local.set $tileBytes ${tileScratchBytes("(local.get $rowTiles)")})`);
  emit(2, "(local.set $p (local.get $scratch))");
  emit(2, "(local.set $end (i32.add (local.get $scratch) (i32.mul (local.get $tiles) (local.get $tileBytes))))");
  emit(2, "(block $zeroDone");
  emit(3, "(loop $zero");
  emit(4, "(br_if $zeroDone (i32.ge_u (local.get $p) (local.get $end)))");
  emit(4, "(v128.store (local.get $p) (v128.const i32x4 0 0 0 0))");
  emit(4, "(local.set $p (i32.add (local.get $p) (i32.const 16)))");
  emit(4, "(br $zero)");
  emit(3, ")");
  emit(2, ")");
  emit(2, "(block $chunksDone");
  emit(3, "(loop $chunks");
  emit(4, "(br_if $chunksDone (i32.ge_u (local.get $j0) (local.get $S2)))");
  emit(4, `(local.set $n (select (i32.const ${PAIRS_PER_CHUNK}) (i32.sub (local.get $S2) (local.get $j0)) (i32.le_u (i32.add (local.get $j0) (i32.const ${PAIRS_PER_CHUNK})) (local.get $S2))))`);
  emit(4, "(local.set $i (i32.const 0))");
  emit(4, "(block $tilesDone");
  emit(5, "(loop $tileLoop");
  emit(6, "(br_if $tilesDone (i32.ge_u (local.get $i) (local.get $tiles)))");
  emit(
    6,
    "(call $chunkProducts16 (local.get $panel) (local.get $rowTiles) (local.get $S2) (local.get $j0) (local.get $n) (i32.add (local.get $res) (i32.shl (i32.mul (local.get $i) (local.get $S2)) (i32.const 4))) (i32.add (local.get $scratch) (i32.mul (local.get $i) (local.get $tileBytes))))",
  );
  emit(6, "(local.set $i (i32.add (local.get $i) (i32.const 1)))");
  emit(6, "(br $tileLoop)");
  emit(5, ")");
  emit(4, ")");
  emit(4, `(local.set $j0 (i32.add (local.get $j0) (i32.const ${PAIRS_PER_CHUNK})))`);
  emit(4, "(br $chunks)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  // ---- one tile's sums × edge step × row step, transposed 4 × 4 so that prod[j·4 + p] holds row j, edge p ----
  emit(1, "(func $scaleTile (param $scratch i32) (param $rowTiles i32) (param $rowScale i32) (param $edgeScale i32) (param $prod i32)");
  emit(2, "(local $t i32) (local $at i32) (local $rowAt i32) (local $rs v128) (local $t0 v128) (local $t1 v128) (local $t2 v128) (local $t3 v128)");
  for (const p of range(P)) emit(2, `(local $e${p} v128) (local $a${p} v128)`);
  for (const p of range(P)) emit(2, `(local.set $e${p} (v128.load32_splat offset=${4 * p} (local.get $edgeScale)))`);
  emit(2, "(block $rowsDone");
  emit(3, "(loop $rows");
  emit(4, "(br_if $rowsDone (i32.ge_u (local.get $t) (local.get $rowTiles)))");
  emit(4, `(local.set $at (i32.add (local.get $scratch) (i32.mul (local.get $t) (i32.const ${Q * P * 16}))))`);
  emit(4, `(local.set $rowAt (i32.add (local.get $prod) (i32.mul (local.get $t) (i32.const ${RT * P * 4}))))`);
  for (const k of range(Q)) {
    emit(4, `(local.set $rs (v128.load offset=${16 * k} (i32.add (local.get $rowScale) (i32.mul (local.get $t) (i32.const ${RT * 4})))))`);
    for (const p of range(P)) {
      emit(4, `(local.set $a${p} (f32x4.mul (f32x4.mul (v128.load offset=${(k * P + p) * 16} (local.get $at)) (local.get $e${p})) (local.get $rs)))`);
    }
    const a = (p) => `(local.get $a${p})`;
    emit(4, `(local.set $t0 ${shuffle([...lane32(0, 0), ...lane32(1, 0), ...lane32(0, 1), ...lane32(1, 1)], a(0), a(1))})`);
    emit(4, `(local.set $t1 ${shuffle([...lane32(0, 2), ...lane32(1, 2), ...lane32(0, 3), ...lane32(1, 3)], a(0), a(1))})`);
    emit(4, `(local.set $t2 ${shuffle([...lane32(0, 0), ...lane32(1, 0), ...lane32(0, 1), ...lane32(1, 1)], a(2), a(3))})`);
    emit(4, `(local.set $t3 ${shuffle([...lane32(0, 2), ...lane32(1, 2), ...lane32(0, 3), ...lane32(1, 3)], a(2), a(3))})`);
    const low = [...lane32(0, 0), ...lane32(0, 1), ...lane32(1, 0), ...lane32(1, 1)];
    const high = [...lane32(0, 2), ...lane32(0, 3), ...lane32(1, 2), ...lane32(1, 3)];
    const rowBytes = P * 4;
    emit(4, `(v128.store offset=${(4 * k + 0) * rowBytes} (local.get $rowAt) ${shuffle(low, "(local.get $t0)", "(local.get $t2)")})`);
    emit(4, `(v128.store offset=${(4 * k + 1) * rowBytes} (local.get $rowAt) ${shuffle(high, "(local.get $t0)", "(local.get $t2)")})`);
    emit(4, `(v128.store offset=${(4 * k + 2) * rowBytes} (local.get $rowAt) ${shuffle(low, "(local.get $t1)", "(local.get $t3)")})`);
    emit(4, `(v128.store offset=${(4 * k + 3) * rowBytes} (local.get $rowAt) ${shuffle(high, "(local.get $t1)", "(local.get $t3)")})`);
  }
  emit(4, "(local.set $t (i32.add (local.get $t) (i32.const 1)))");
  emit(4, "(br $rows)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  // ---- a block of edges: the integer products of every tile, then each tile scaled and screened ----
  emitExportedFunction(emit, 1, "quantizedScreenBlock");
  emit(2, "(local $i i32) (local $tiles i32) (local $count i32) (local $up v128) (local $down v128) (local $tileBytes i32)");
  emit(2, "(local.set $up (i64x2.splat (i64.sub (i64.const 0) (i64.extend_i32_u (local.get $upper)))))");
  emit(2, "(local.set $down (i64x2.splat (i64.sub (i64.const 0) (i64.extend_i32_u (local.get $lower)))))");
  emit(2, `(local.set $tiles (i32.shr_u (i32.add (local.get $width) (i32.const ${P - 1})) (i32.const 2)))`);
  emit(2, `(local.set $tileBytes ${tileScratchBytes("(local.get $rowTiles)")})`);
  emit(2, "(call $products16 (local.get $panel) (local.get $rowTiles) (local.get $S2) (local.get $res) (local.get $tiles) (local.get $scratch))");
  emit(2, "(block $done");
  emit(3, "(loop $tileLoop");
  emit(4, "(br_if $done (i32.ge_u (local.get $i) (local.get $width)))");
  emit(
    4,
    "(call $scaleTile (i32.add (local.get $scratch) (i32.mul (i32.shr_u (local.get $i) (i32.const 2)) (local.get $tileBytes))) (local.get $rowTiles) (local.get $rowScale) (i32.add (local.get $edgeScale) (i32.shl (local.get $i) (i32.const 2))) (local.get $prod))",
  );
  emit(4, `(local.set $count (select (i32.const ${P}) (i32.sub (local.get $width) (local.get $i)) (i32.le_u (i32.add (local.get $i) (i32.const ${P})) (local.get $width))))`);
  emit(
    4,
    "(call $screenTile (local.get $prod) (local.get $count) (local.get $batch) (local.get $vectors) (i32.add (local.get $ss) (i32.shl (local.get $i) (i32.const 3))) (i32.add (local.get $l1) (i32.shl (local.get $i) (i32.const 3))) (i32.add (local.get $mask) (i32.shl (local.get $i) (i32.const 3))) (local.get $norms) (local.get $invNorm) (local.get $df) (local.get $rhs) (local.get $up) (local.get $down) (i32.add (local.get $first) (local.get $i)) (local.get $lists) (local.get $counts) (local.get $capacity))",
  );
  emit(4, `(local.set $i (i32.add (local.get $i) (i32.const ${P})))`);
  emit(4, "(br $tileLoop)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  // ---- the scaled products of one tile of 4 edges (for tests): prod[j·4 + p] ----
  emitExportedFunction(emit, 1, "quantizedTileProducts");
  emit(2, "(call $products16 (local.get $panel) (local.get $rowTiles) (local.get $S2) (local.get $res) (i32.const 1) (local.get $scratch))");
  emit(2, "(call $scaleTile (local.get $scratch) (local.get $rowTiles) (local.get $rowScale) (local.get $edgeScale) (local.get $prod))");
  emit(1, ")");
  return lines;
}
