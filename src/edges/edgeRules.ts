import type { EdgePairs } from "./edgeIndex.js";

// Coverage rules: which edges enter the analysis when some are missing (NaN) in
// some participants or rarely present (zero in many, as streamline counts are).
// Keeping only the edges present in a given fraction of participants is common
// practice for tractography (de Reus & van den Heuvel 2013, "Estimating false
// positives and negatives in brain networks", NeuroImage 70:402-409).

/** Why an edge is left out: 0 kept, else the first rule it fails. */
export const EDGE_KEPT = 0;
export const EDGE_MISSING = 1;
export const EDGE_RARE = 2;

export interface EdgeRuleOptions {
  /** Leave out every edge that is NaN in any participant (without it, the data hold no NaN). */
  dropMissing: boolean;
  /** Keep only edges non-zero and not missing in at least this fraction of participants, (0, 1]. */
  presentIn?: number;
}

export interface EdgeRuleCounts {
  /** Per edge (full edge order): EDGE_KEPT, EDGE_MISSING or EDGE_RARE. */
  reason: Uint8Array;
  /** Per edge: participants in which it is NaN. */
  missing: Uint32Array;
  /** Per edge: participants in which it is non-zero and not NaN. */
  present: Uint32Array;
  /** Full edge index of each kept edge, ascending. */
  kept: Uint32Array;
}

/**
 * Applies the rules to the edge-major data (data[e·S + s], E edges): an edge
 * NaN in any participant is missing (when dropping missing edges); one
 * non-zero in fewer than `presentIn` × S participants is rare. The fraction is
 * compared as present ≥ presentIn × S − 1e-9 × S, so 0.07 × 100 (which rounds
 * to 7.000000000000001) keeps an edge present in 7 of 100.
 */
export function applyEdgeRules(data: Float64Array, S: number, E: number, options: EdgeRuleOptions): EdgeRuleCounts {
  const reason = new Uint8Array(E);
  const missing = new Uint32Array(E);
  const present = new Uint32Array(E);
  const needed = options.presentIn === undefined ? 0 : options.presentIn * S - 1e-9 * S;
  let keptCount = 0;
  for (let e = 0; e < E; e++) {
    let nan = 0;
    let nonZero = 0;
    for (let s = 0, at = e * S; s < S; s++, at++) {
      const v = data[at];
      if (v !== v) nan++;
      else if (v !== 0) nonZero++;
    }
    missing[e] = nan;
    present[e] = nonZero;
    if (nan > 0 && options.dropMissing) reason[e] = EDGE_MISSING;
    else if (options.presentIn !== undefined && nonZero < needed) reason[e] = EDGE_RARE;
    else keptCount++;
  }
  const kept = new Uint32Array(keptCount);
  for (let e = 0, k = 0; e < E; e++) if (reason[e] === EDGE_KEPT) kept[k++] = e;
  return { reason, missing, present, kept };
}

/** The kept edges' values, edge-major (out[k·S + s] = data[kept[k]·S + s]), into `out` (length kept × S). */
export function compactEdges(data: Float64Array, S: number, kept: Uint32Array, out: Float64Array): Float64Array {
  for (let k = 0; k < kept.length; k++) out.set(data.subarray(kept[k] * S, kept[k] * S + S), k * S);
  return out;
}

/** The pairs of the kept edges, with their real regions (i, j). */
export function keptPairs(pairs: EdgePairs, kept: Uint32Array): EdgePairs {
  return {
    regionCount: pairs.regionCount,
    edgeCount: kept.length,
    regionA: Uint32Array.from(kept, (e) => pairs.regionA[e]),
    regionB: Uint32Array.from(kept, (e) => pairs.regionB[e]),
  };
}

/** Regions (0-based) of which no edge is kept. */
export function regionsWithoutKeptEdge(pairs: EdgePairs, kept: Uint32Array): number[] {
  const has = new Uint8Array(pairs.regionCount);
  for (const e of kept) {
    has[pairs.regionA[e]] = 1;
    has[pairs.regionB[e]] = 1;
  }
  const out: number[] = [];
  for (let r = 0; r < pairs.regionCount; r++) if (!has[r]) out.push(r);
  return out;
}

/**
 * Per-participant scaling to the total (`scale: total`): each participant's
 * edges (edge-major data, E edges) divided by their sum, so that they sum to 1.
 * Returns each participant's total before scaling (summed in edge order); a
 * participant whose total is not a positive finite number is left unscaled and
 * the caller reports it.
 */
export function scaleToTotal(data: Float64Array, S: number, E: number): Float64Array {
  const totals = new Float64Array(S);
  for (let e = 0; e < E; e++) for (let s = 0, at = e * S; s < S; s++, at++) totals[s] += data[at];
  for (let e = 0; e < E; e++) {
    for (let s = 0, at = e * S; s < S; s++, at++) {
      const total = totals[s];
      if (total > 0 && Number.isFinite(total)) data[at] /= total;
    }
  }
  return totals;
}
