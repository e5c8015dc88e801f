// The screening half of the SIMD kernel (src/permute/screening.ts explains it): the
// same sums as the exact kernel, approximately and fast (the products in 16-bit
// integers, quantizedScreenWat.mjs; the group sums in single precision, f32x4 lanes),
// used only to decide which (relabeling, edge) pairs could possibly lie above the
// lowest threshold. Those pairs are listed per relabeling; the caller recomputes them
// in double precision with the reference order of operations, so nothing a screen
// computes ever reaches a result.
//
// Memory layout (byte offsets from src/permute/kernels/wasmKernel.ts):
//   prod32    paddedRows × 4 f32 approximate products of one tile of 4 edges: prod[j·4 + p]
//   ss, l1    ‖R_e‖² and the per-edge error scale (f64), mask (64-bit valid masks),
//             all with room for one tile past the last edge
//   norms     ‖v_k‖∞ of each relabeled vector (f64)
//   lists     per relabeling b: capacity i32 edge indices; counts: i32 per relabeling.
//             A count above capacity means the list overflowed (the caller recomputes).
//   sLo, sHi  the two-level path's per-edge bounds on the group sum (f32)
//   tables    the two-level path's subset sums of one tile (groupTableScreenBlock)

import { emitExportedFunction } from "./kernelExports.mjs";

/**
 * @param {{ rowQuads: number, groupQuads: number }} tile
 *   rows per products tile (4·rowQuads, quantizedScreenWat.mjs); groupQuads f32x4
 *   accumulators (4 edges each) for the group sums.
 * @returns {string[]} lines of WebAssembly text (module fields)
 */
export function screenKernelFields({ rowQuads, groupQuads }) {
  const RT = 4 * rowQuads;
  const range = (n) => Array.from({ length: n }, (_, i) => i);
  const lines = [];
  const emit = (indent, text) => lines.push("  ".repeat(indent) + text);
  const lane32 = (vector, i) => [4 * i, 4 * i + 1, 4 * i + 2, 4 * i + 3].map((b) => b + 16 * vector);
  const shuffle = (bytes, x, y) => `(i8x16.shuffle ${bytes.join(" ")} ${x} ${y})`;

  emit(1, `(global (export "screenRowsPerTile") i32 (i32.const ${RT}))`);
  emit(1, `(global (export "screenGroupEdgesPerTile") i32 (i32.const ${4 * groupQuads}))`);

  // Edge p of four at $a (edges $stride bytes apart), and one subject of each rounded to single precision at target.
  const edgeAddress = (p) => (p === 0 ? "(local.get $a)" : `(i32.add (local.get $a) (i32.mul (local.get $stride) (i32.const ${p})))`);
  const emitRoundFourEdges = (indent, target) => {
    for (const p of [0, 1, 2, 3]) emit(indent, `(f32.store offset=${4 * p} (local.get ${target}) (f32.demote_f64 (f64.load ${edgeAddress(p)})))`);
  };

  // ---- f64 edge-major block → f32 subject-major, round to nearest: dst[s·W + i] = src[i·S + s] for edges i < W
  // (W a multiple of 4), subjects s < S; 4 edges × 2 subjects at a time ----
  emitExportedFunction(emit, 1, "transposeDemoteBlock");
  emit(2, "(local $i i32) (local $a i32) (local $d i32) (local $aEnd i32) (local $stride i32) (local $rowBytes i32)");
  emit(2, "(local $x0 v128) (local $x1 v128) (local $x2 v128) (local $x3 v128) (local $lo v128) (local $hi v128)");
  emit(2, "(local.set $stride (i32.shl (local.get $S) (i32.const 3)))");
  emit(2, "(local.set $rowBytes (i32.shl (local.get $W) (i32.const 2)))");
  emit(2, "(block $edgesDone");
  emit(3, "(loop $edges");
  emit(4, "(br_if $edgesDone (i32.ge_u (local.get $i) (local.get $W)))");
  emit(4, "(local.set $a (i32.add (local.get $src) (i32.mul (local.get $i) (local.get $stride))))");
  emit(4, "(local.set $d (i32.add (local.get $dst) (i32.shl (local.get $i) (i32.const 2))))");
  emit(4, "(local.set $aEnd (i32.add (local.get $a) (i32.shl (i32.and (local.get $S) (i32.const -2)) (i32.const 3))))");
  emit(4, "(block $pairsDone");
  emit(5, "(loop $pairs");
  emit(6, "(br_if $pairsDone (i32.ge_u (local.get $a) (local.get $aEnd)))");
  emit(6, ";; x_p = edge i + p, subjects s and s + 1, in the two low lanes");
  for (const p of [0, 1, 2, 3]) {
    emit(6, `(local.set $x${p} (f32x4.demote_f64x2_zero (v128.load ${edgeAddress(p)})))`);
  }
  emit(6, ";; lo = [e0 s, e1 s, e0 s+1, e1 s+1], hi = the same for edges 2 and 3");
  emit(6, `(local.set $lo ${shuffle([...lane32(0, 0), ...lane32(1, 0), ...lane32(0, 1), ...lane32(1, 1)], "(local.get $x0)", "(local.get $x1)")})`);
  emit(6, `(local.set $hi ${shuffle([...lane32(0, 0), ...lane32(1, 0), ...lane32(0, 1), ...lane32(1, 1)], "(local.get $x2)", "(local.get $x3)")})`);
  emit(6, `(v128.store (local.get $d) ${shuffle([...lane32(0, 0), ...lane32(0, 1), ...lane32(1, 0), ...lane32(1, 1)], "(local.get $lo)", "(local.get $hi)")})`);
  emit(6, `(v128.store (i32.add (local.get $d) (local.get $rowBytes)) ${shuffle([...lane32(0, 2), ...lane32(0, 3), ...lane32(1, 2), ...lane32(1, 3)], "(local.get $lo)", "(local.get $hi)")})`);
  emit(6, "(local.set $a (i32.add (local.get $a) (i32.const 16)))");
  emit(6, "(local.set $d (i32.add (local.get $d) (i32.shl (local.get $rowBytes) (i32.const 1))))");
  emit(6, "(br $pairs)");
  emit(5, ")");
  emit(4, ")");
  emit(4, "(if (i32.and (local.get $S) (i32.const 1))");
  emit(5, "(then");
  emitRoundFourEdges(6, "$d");
  emit(5, "))");
  emit(4, "(local.set $i (i32.add (local.get $i) (i32.const 4)))");
  emit(4, "(br $edges)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  // ---- append edge (first + i) to relabeling b's list; the count runs past capacity on overflow ----
  emit(1, "(func $append (param $lists i32) (param $counts i32) (param $capacity i32) (param $b i32) (param $edge i32)");
  emit(2, "(local $at i32) (local $n i32)");
  emit(2, "(local.set $at (i32.add (local.get $counts) (i32.shl (local.get $b) (i32.const 2))))");
  emit(2, "(local.set $n (i32.load (local.get $at)))");
  emit(2, "(if (i32.lt_u (local.get $n) (local.get $capacity))");
  emit(3, "(then (i32.store (i32.add (local.get $lists) (i32.shl (i32.add (i32.mul (local.get $b) (local.get $capacity)) (local.get $n)) (i32.const 2))) (local.get $edge))))");
  emit(2, "(i32.store (local.get $at) (i32.add (local.get $n) (i32.const 1)))");
  emit(1, ")");

  // ---- screen one tile of 4 edges for every relabeling of the batch (double precision) ----
  // With a, g_k the approximate products and δ_k = ‖v_k‖∞ · l1_e their error bounds:
  //   A = |a| + δ_0,  G = Σ_{k≥1} (|g_k| + δ_k)²,  sseLow = ‖R‖² − A²/x̃'x̃ − G,
  //   possible iff A²·df ≥ h²·x̃'x̃·sseLow (the sup of t over the box of products reaches h),
  //   and the tail allows the sign (upper: a + δ_0 > 0; lower: a − δ_0 < 0), and the edge is valid.
  emit(1, "(func $screenTile");
  emit(2, "(param $prod i32) (param $count i32) (param $batch i32) (param $vectors i32)");
  emit(2, "(param $ss i32) (param $l1 i32) (param $mask i32) (param $norms i32)");
  emit(2, "(param $invNorm f64) (param $df f64) (param $rhs f64) (param $upper v128) (param $lower v128)");
  emit(2, "(param $first i32) (param $lists i32) (param $counts i32) (param $capacity i32)");
  emit(2, "(local $b i32) (local $k i32) (local $row i32) (local $g v128) (local $gd v128) (local $dfv v128) (local $rhsv v128) (local $inv v128)");
  for (const q of [0, 1]) emit(2, `(local $ss${q} v128) (local $l1${q} v128) (local $mask${q} v128) (local $d0${q} v128) (local $a${q} v128) (local $A${q} v128) (local $G${q} v128) (local $c${q} v128)`);
  emit(2, "(local.set $dfv (f64x2.splat (local.get $df)))");
  emit(2, "(local.set $rhsv (f64x2.splat (local.get $rhs)))");
  emit(2, "(local.set $inv (f64x2.splat (local.get $invNorm)))");
  for (const q of [0, 1]) {
    emit(2, `(local.set $ss${q} (v128.load offset=${q * 16} (local.get $ss)))`);
    emit(2, `(local.set $l1${q} (v128.load offset=${q * 16} (local.get $l1)))`);
    emit(2, `(local.set $mask${q} (v128.load offset=${q * 16} (local.get $mask)))`);
    emit(2, `(local.set $d0${q} (f64x2.mul (local.get $l1${q}) (f64x2.splat (f64.load (local.get $norms)))))`);
  }
  emit(2, "(local.set $row (local.get $prod))");
  emit(2, "(block $batchDone");
  emit(3, "(loop $relabelings");
  emit(4, "(br_if $batchDone (i32.ge_u (local.get $b) (local.get $batch)))");
  for (const q of [0, 1]) {
    emit(4, `(local.set $a${q} (f64x2.promote_low_f32x4 (v128.load64_zero offset=${q * 8} (local.get $row))))`);
    emit(4, `(local.set $A${q} (f64x2.add (f64x2.abs (local.get $a${q})) (local.get $d0${q})))`);
    emit(4, `(local.set $G${q} (v128.const f64x2 0 0))`);
  }
  emit(4, "(local.set $k (i32.const 1))");
  emit(4, "(block $nuisanceDone");
  emit(5, "(loop $nuisance");
  emit(6, "(br_if $nuisanceDone (i32.ge_u (local.get $k) (local.get $vectors)))");
  emit(6, "(local.set $gd (f64x2.splat (f64.load (i32.add (local.get $norms) (i32.shl (local.get $k) (i32.const 3))))))");
  for (const q of [0, 1]) {
    emit(6, `(local.set $g (f64x2.promote_low_f32x4 (v128.load64_zero offset=${q * 8} (i32.add (local.get $row) (i32.shl (local.get $k) (i32.const 4))))))`);
    emit(6, `(local.set $g (f64x2.add (f64x2.abs (local.get $g)) (f64x2.mul (local.get $gd) (local.get $l1${q}))))`);
    emit(6, `(local.set $G${q} (f64x2.add (local.get $G${q}) (f64x2.mul (local.get $g) (local.get $g))))`);
  }
  emit(6, "(local.set $k (i32.add (local.get $k) (i32.const 1)))");
  emit(6, "(br $nuisance)");
  emit(5, ")");
  emit(4, ")");
  for (const q of [0, 1]) {
    const A2 = `(f64x2.mul (local.get $A${q}) (local.get $A${q}))`;
    const sseLow = `(f64x2.sub (f64x2.sub (local.get $ss${q}) (f64x2.mul ${A2} (local.get $inv))) (local.get $G${q}))`;
    const reaches = `(f64x2.ge (f64x2.mul ${A2} (local.get $dfv)) (f64x2.mul (local.get $rhsv) ${sseLow}))`;
    const up = `(v128.and (local.get $upper) (f64x2.gt (f64x2.add (local.get $a${q}) (local.get $d0${q})) (v128.const f64x2 0 0)))`;
    const down = `(v128.and (local.get $lower) (f64x2.lt (f64x2.sub (local.get $a${q}) (local.get $d0${q})) (v128.const f64x2 0 0)))`;
    emit(4, `(local.set $c${q} (v128.and (v128.and ${reaches} (v128.or ${up} ${down})) (local.get $mask${q})))`);
  }
  emit(4, "(if (v128.any_true (v128.or (local.get $c0) (local.get $c1)))");
  emit(5, "(then");
  for (const q of [0, 1]) {
    for (const lane of [0, 1]) {
      const p = 2 * q + lane;
      emit(
        6,
        `(if (i32.and (i64.ne (i64x2.extract_lane ${lane} (local.get $c${q})) (i64.const 0)) (i32.gt_u (local.get $count) (i32.const ${p}))) (then (call $append (local.get $lists) (local.get $counts) (local.get $capacity) (local.get $b) (i32.add (local.get $first) (i32.const ${p})))))`,
      );
    }
  }
  emit(5, ")");
  emit(4, ")");
  emit(4, `(local.set $row (i32.add (local.get $row) (i32.shl (local.get $vectors) (i32.const 4))))`);
  emit(4, "(local.set $b (i32.add (local.get $b) (i32.const 1)))");
  emit(4, "(br $relabelings)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  // ---- the two-level path: single-precision group sums, screened against per-edge bounds ----
  const GQ = groupQuads;
  const GE = 4 * GQ;
  // The screen of GQ accumulators of group sums (4 edges each) at byte offset $at: lanes at or beyond the near
  // bounds (nLo/nHi, which lie within sLo/sHi) are tested against sLo/sHi; those that reach them go to the
  // relabeling's list, the others to its near list (the edges a lower threshold would add).
  // $append's body in line (a call per listed lane costs more than the rest of the listing).
  const inlineAppend = (lists, counts, capacity, edge) =>
    `(local.set $appendAt (i32.add (local.get ${counts}) (i32.shl (local.get $b) (i32.const 2)))) ` +
    `(local.set $appendN (i32.load (local.get $appendAt))) ` +
    `(if (i32.lt_u (local.get $appendN) (local.get ${capacity})) (then (i32.store (i32.add (local.get ${lists}) (i32.shl (i32.add (i32.mul (local.get $b) (local.get ${capacity})) (local.get $appendN)) (i32.const 2))) ${edge}))) ` +
    `(i32.store (local.get $appendAt) (i32.add (local.get $appendN) (i32.const 1)))`;
  const emitGroupCompare = (indent) => {
    const bound = (array, p) => `(v128.load offset=${p * 16} (i32.add (local.get ${array}) (local.get $at)))`;
    for (const p of range(GQ)) {
      emit(indent, `(local.set $c (v128.or (f32x4.ge (local.get $acc${p}) ${bound("$nHi", p)}) (f32x4.le (local.get $acc${p}) ${bound("$nLo", p)})))`);
      emit(indent, "(if (v128.any_true (local.get $c))");
      emit(indent + 1, "(then");
      emit(indent + 2, `(local.set $d (v128.or (f32x4.ge (local.get $acc${p}) ${bound("$sHi", p)}) (f32x4.le (local.get $acc${p}) ${bound("$sLo", p)})))`);
      for (const lane of range(4)) {
        const e = 4 * p + lane;
        const edge = `(i32.add (i32.add (local.get $first) (local.get $i)) (i32.const ${e}))`;
        emit(indent + 2, `(if (i32.and (i32.ne (i32x4.extract_lane ${lane} (local.get $c)) (i32.const 0)) (i32.gt_u (local.get $count) (i32.const ${e})))`);
        emit(indent + 3, `(then (if (i32x4.extract_lane ${lane} (local.get $d))`);
        emit(indent + 4, `(then ${inlineAppend("$lists", "$counts", "$capacity", edge)})`);
        emit(indent + 4, `(else ${inlineAppend("$nearLists", "$nearCounts", "$nearCapacity", edge)}))))`);
      }
      emit(indent + 1, ")");
      emit(indent, ")");
    }
  };

  // ---- the two-level path with subset tables: for each tile of GE edges, the sums of every subset of each
  // chunk of `chunkSize` consecutive subjects (2^chunkSize entries per chunk, entry m = entry m without its
  // highest bit + that subject's row); a relabeling's group sum is then one entry per chunk, added up:
  // offsets[b·chunks + c] = (c·2^chunkSize + mask of its group within chunk c)·(GE·4) into the tables ----
  const ENTRY = GE * 4;
  emitExportedFunction(emit, 1, "groupTableScreenBlock");
  emit(2, "(local $i i32) (local $count i32) (local $b i32) (local $m i32) (local $mEnd i32) (local $row i32) (local $at i32) (local $c v128) (local $d v128) (local $appendAt i32) (local $appendN i32)");
  emit(2, "(local $chunk i32) (local $s0 i32) (local $kc i32) (local $j i32) (local $stop i32) (local $entry i32) (local $source i32) (local $target i32) (local $previous i32) (local $rowBytes i32) (local $chunkBytes i32)");
  for (const p of range(GQ)) emit(2, `(local $r${p} v128)`);
  for (const p of range(GQ)) emit(2, `(local $acc${p} v128)`);
  emit(2, "(local.set $rowBytes (i32.shl (local.get $W) (i32.const 2)))");
  emit(2, `(local.set $chunkBytes (i32.mul (i32.shl (i32.const 1) (local.get $chunkSize)) (i32.const ${ENTRY})))`);
  emit(2, "(block $tilesDone");
  emit(3, "(loop $tiles");
  emit(4, "(br_if $tilesDone (i32.ge_u (local.get $i) (local.get $width)))");
  emit(4, `(local.set $count (select (i32.const ${GE}) (i32.sub (local.get $width) (local.get $i)) (i32.le_u (i32.add (local.get $i) (i32.const ${GE})) (local.get $width))))`);
  emit(4, "(local.set $at (i32.shl (local.get $i) (i32.const 2)))");
  emit(4, ";; the subset tables of this tile");
  emit(4, "(local.set $chunk (i32.const 0))");
  emit(4, "(local.set $s0 (i32.const 0))");
  emit(4, "(local.set $entry (local.get $tables))");
  emit(4, "(block $chunksDone");
  emit(5, "(loop $chunkLoop");
  emit(6, "(br_if $chunksDone (i32.ge_u (local.get $chunk) (local.get $chunks)))");
  emit(6, ";; subjects in this chunk: the last chunk may hold fewer than chunkSize");
  emit(6, "(local.set $kc (select (local.get $chunkSize) (i32.sub (local.get $S) (local.get $s0)) (i32.le_u (i32.add (local.get $s0) (local.get $chunkSize)) (local.get $S))))");
  for (const p of range(GQ)) emit(6, `(v128.store offset=${p * 16} (local.get $entry) (v128.const f32x4 0 0 0 0))`);
  emit(6, ";; doubling: entries [2^j, 2^(j+1)) are entries [0, 2^j) plus the row of subject s0 + j, held in registers");
  emit(6, ";; (each entry reads one written 2^j entries earlier, so no store waits on the one just before it)");
  emit(6, "(local.set $j (i32.const 0))");
  emit(6, "(block $bitsDone");
  emit(7, "(loop $bits");
  emit(8, "(br_if $bitsDone (i32.ge_u (local.get $j) (local.get $kc)))");
  emit(8, "(local.set $source (i32.add (i32.add (local.get $blockT) (local.get $at)) (i32.mul (i32.add (local.get $s0) (local.get $j)) (local.get $rowBytes))))");
  for (const p of range(GQ)) emit(8, `(local.set $r${p} (v128.load offset=${p * 16} (local.get $source)))`);
  emit(8, "(local.set $previous (local.get $entry))");
  emit(8, `(local.set $target (i32.add (local.get $entry) (i32.shl (i32.const ${ENTRY}) (local.get $j))))`);
  emit(8, "(local.set $stop (local.get $target))");
  emit(8, "(loop $entryLoop");
  for (const p of range(GQ)) {
    emit(9, `(v128.store offset=${p * 16} (local.get $target) (f32x4.add (v128.load offset=${p * 16} (local.get $previous)) (local.get $r${p})))`);
  }
  emit(9, `(local.set $previous (i32.add (local.get $previous) (i32.const ${ENTRY})))`);
  emit(9, `(local.set $target (i32.add (local.get $target) (i32.const ${ENTRY})))`);
  emit(9, "(br_if $entryLoop (i32.lt_u (local.get $previous) (local.get $stop)))");
  emit(8, ")");
  emit(8, "(local.set $j (i32.add (local.get $j) (i32.const 1)))");
  emit(8, "(br $bits)");
  emit(7, ")");
  emit(6, ")");
  emit(6, "(local.set $entry (i32.add (local.get $entry) (local.get $chunkBytes)))");
  emit(6, "(local.set $s0 (i32.add (local.get $s0) (local.get $chunkSize)))");
  emit(6, "(local.set $chunk (i32.add (local.get $chunk) (i32.const 1)))");
  emit(6, "(br $chunkLoop)");
  emit(5, ")");
  emit(4, ")");
  emit(4, ";; each relabeling: one table entry per chunk");
  emit(4, "(local.set $m (local.get $offsets))");
  emit(4, "(local.set $b (i32.const 0))");
  emit(4, "(block $batchDone");
  emit(5, "(loop $relabelings");
  emit(6, "(br_if $batchDone (i32.ge_u (local.get $b) (local.get $batch)))");
  for (const p of range(GQ)) emit(6, `(local.set $acc${p} (v128.const f32x4 0 0 0 0))`);
  emit(6, "(local.set $mEnd (i32.add (local.get $m) (i32.shl (local.get $chunks) (i32.const 2))))");
  emit(6, "(block $lookupsDone");
  emit(7, "(br_if $lookupsDone (i32.ge_u (local.get $m) (local.get $mEnd)))");
  emit(7, "(loop $lookups");
  emit(8, "(local.set $row (i32.add (local.get $tables) (i32.load (local.get $m))))");
  for (const p of range(GQ)) emit(8, `(local.set $acc${p} (f32x4.add (local.get $acc${p}) (v128.load offset=${p * 16} (local.get $row))))`);
  emit(8, "(local.set $m (i32.add (local.get $m) (i32.const 4)))");
  emit(8, "(br_if $lookups (i32.lt_u (local.get $m) (local.get $mEnd)))");
  emit(7, ")");
  emit(6, ")");
  emitGroupCompare(6);
  emit(6, "(local.set $b (i32.add (local.get $b) (i32.const 1)))");
  emit(6, "(br $relabelings)");
  emit(5, ")");
  emit(4, ")");
  emit(4, `(local.set $i (i32.add (local.get $i) (i32.const ${GE})))`);
  emit(4, "(br $tiles)");
  emit(3, ")");
  emit(2, ")");
  emit(1, ")");

  return lines;
}
