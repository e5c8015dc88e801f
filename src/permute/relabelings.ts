import seedrandom from "seedrandom";
import { multinomialCount, rankArrangement, unrankArrangement } from "./multisetPermutations.js";

/**
 * Relabelings of the subjects under the null hypothesis (Winkler, Ridgway,
 * Webster, Smith & Nichols 2014, NeuroImage 92:381, §2.3–2.6):
 * - "permute": exchangeable errors; the design rows are shuffled, within
 *   exchangeability blocks, or whole blocks as units;
 * - "sign-flip": independent and symmetric errors; each subject (or block)
 *   keeps its row but its residual's sign may flip.
 * Relabeling k (1-based) is a function of (seed, k) alone, so threads and
 * shards cannot change it. When the number of distinct relabelings is at
 * most the requested count, all are enumerated (identity first) instead.
 */
export type SchemeKind = "permute" | "sign-flip";

/** Everything needed to rebuild relabeling k anywhere (plain data, sent to workers). */
export interface RelabelingPlan {
  kind: SchemeKind;
  subjects: number;
  /** Code of each subject's design row; identical rows share a code. */
  rowTypes: number[];
  /** Block code of each subject (all 0 without blocks). */
  blocks: number[];
  wholeBlocks: boolean;
  seed: number;
  exact: boolean;
  /** M distinct relabelings (exact) or K random ones (Monte Carlo). */
  count: number;
  /** Number of distinct relabelings (Infinity when beyond 2^53). */
  distinct: number;
}

/** Subjects of each block, in ascending order. */
function blockMembers(blocks: number[]): number[][] {
  const out: number[][] = [];
  blocks.forEach((b, s) => (out[b] ??= []).push(s));
  return out.filter((m) => m !== undefined);
}

function blockKeys(members: number[][], rowTypes: number[]): string[] {
  return members.map((m) => m.map((s) => rowTypes[s]).join(","));
}

function codesOf(keys: string[]): { codes: number[]; typeCount: number } {
  const seen = new Map<string, number>();
  const codes = keys.map((key) => {
    if (!seen.has(key)) seen.set(key, seen.size);
    return seen.get(key)!;
  });
  return { codes, typeCount: seen.size };
}

/** Counts the distinct relabelings of a scheme. */
export function countDistinct(kind: SchemeKind, rowTypes: number[], blocks: number[], wholeBlocks: boolean): number {
  const members = blockMembers(blocks);
  if (kind === "sign-flip") return 2 ** (wholeBlocks ? members.length : rowTypes.length);
  if (wholeBlocks) {
    const { codes, typeCount } = codesOf(blockKeys(members, rowTypes));
    return multinomialCount(tally(codes, typeCount));
  }
  let total = 1;
  for (const m of members) {
    const { codes, typeCount } = codesOf(m.map((s) => String(rowTypes[s])));
    total *= multinomialCount(tally(codes, typeCount));
    if (total > Number.MAX_SAFE_INTEGER) return Infinity;
  }
  return total;
}

function tally(codes: number[], typeCount: number): number[] {
  const counts = new Array<number>(typeCount).fill(0);
  for (const c of codes) counts[c]++;
  return counts;
}

export function planRelabelings(options: {
  kind: SchemeKind;
  rowTypes: number[];
  blocks?: number[];
  wholeBlocks: boolean;
  seed: number;
  requested: number;
}): RelabelingPlan {
  const subjects = options.rowTypes.length;
  const blocks = options.blocks ?? new Array<number>(subjects).fill(0);
  const distinct = countDistinct(options.kind, options.rowTypes, blocks, options.wholeBlocks);
  const exact = distinct <= options.requested;
  return {
    kind: options.kind,
    subjects,
    rowTypes: [...options.rowTypes],
    blocks: [...blocks],
    wholeBlocks: options.wholeBlocks,
    seed: options.seed,
    exact,
    count: exact ? distinct : options.requested,
    distinct,
  };
}

/** Builds relabelings of a plan; reuses its scratch space. */
export class Relabeler {
  private readonly members: number[][];
  private readonly memberTypes: { codes: number[]; typeCount: number }[];
  private readonly blockTypes: { codes: number[]; typeCount: number };
  private readonly blockCounts: number[];
  private readonly identityRank: number;

  constructor(readonly plan: RelabelingPlan) {
    this.members = blockMembers(plan.blocks);
    this.memberTypes = this.members.map((m) => codesOf(m.map((s) => String(plan.rowTypes[s]))));
    this.blockTypes = codesOf(blockKeys(this.members, plan.rowTypes));
    if (plan.kind === "permute" && plan.wholeBlocks) {
      this.blockCounts = [multinomialCount(tally(this.blockTypes.codes, this.blockTypes.typeCount))];
    } else {
      this.blockCounts = this.memberTypes.map((t) => multinomialCount(tally(t.codes, t.typeCount)));
    }
    this.identityRank = plan.exact && plan.kind === "permute" ? this.rankOfIdentity() : 0;
  }

  private rankOfIdentity(): number {
    if (this.plan.wholeBlocks) return rankArrangement(this.blockTypes.codes, this.blockTypes.typeCount);
    let rank = 0;
    let radix = 1;
    this.memberTypes.forEach((types, b) => {
      rank += radix * rankArrangement(types.codes, types.typeCount);
      radix *= this.blockCounts[b];
    });
    return rank;
  }

  /** Relabeling k as a row permutation: subject s takes the design row of subject out[s]. */
  permutation(k: number, out: Int32Array): void {
    const { plan } = this;
    for (let s = 0; s < plan.subjects; s++) out[s] = s;
    if (k === 1 && plan.exact) return;
    if (plan.exact) {
      let index = k - 2;
      if (index >= this.identityRank) index++;
      this.unrank(index, out);
      return;
    }
    const random = seedrandom(`plexus-permutation/${plan.seed}/${k}`);
    for (let attempt = 0; ; attempt++) {
      this.shuffle(random, out);
      if (!this.isIdentityEquivalent(out) || attempt > 1000) return;
    }
  }

  /** Relabeling k as signs (+1 / −1 per subject). */
  signs(k: number, out: Float64Array): void {
    const { plan } = this;
    out.fill(1);
    if (k === 1 && plan.exact) return;
    const units = plan.wholeBlocks ? this.members.length : plan.subjects;
    const flipUnit = (unit: number) => {
      if (plan.wholeBlocks) for (const s of this.members[unit]) out[s] = -1;
      else out[unit] = -1;
    };
    if (plan.exact) {
      // Pattern k−1 in binary: bit u set flips unit u (k = 1 is the identity).
      let pattern = k - 1;
      for (let unit = 0; unit < units && pattern > 0; unit++) {
        if (pattern % 2 === 1) flipUnit(unit);
        pattern = Math.floor(pattern / 2);
      }
      return;
    }
    const random = seedrandom(`plexus-signflip/${plan.seed}/${k}`);
    for (let attempt = 0; ; attempt++) {
      out.fill(1);
      let flipped = false;
      for (let unit = 0; unit < units; unit++) {
        if (random() < 0.5) {
          flipUnit(unit);
          flipped = true;
        }
      }
      if (flipped || attempt > 1000) return;
    }
  }

  private isIdentityEquivalent(out: Int32Array): boolean {
    const types = this.plan.rowTypes;
    for (let s = 0; s < out.length; s++) if (types[out[s]] !== types[s]) return false;
    return true;
  }

  /** Fisher–Yates shuffle (Durstenfeld 1964, CACM 7:420) within blocks, or of whole blocks. */
  private shuffle(random: () => number, out: Int32Array): void {
    if (this.plan.wholeBlocks) {
      const order = this.members.map((_, b) => b);
      for (let i = order.length - 1; i > 0; i--) {
        const j = Math.floor(random() * (i + 1));
        [order[i], order[j]] = [order[j], order[i]];
      }
      this.members.forEach((positions, b) => {
        const source = this.members[order[b]];
        positions.forEach((s, i) => (out[s] = source[i]));
      });
      return;
    }
    for (const positions of this.members) {
      const pool = [...positions];
      for (let i = pool.length - 1; i > 0; i--) {
        const j = Math.floor(random() * (i + 1));
        [pool[i], pool[j]] = [pool[j], pool[i]];
      }
      positions.forEach((s, i) => (out[s] = pool[i]));
    }
  }

  /** Exact mode: the arrangement with lexicographic rank `index` (identity excluded by the caller). */
  private unrank(index: number, out: Int32Array): void {
    if (this.plan.wholeBlocks) {
      const sequence = new Int32Array(this.members.length);
      unrankArrangement(index, tally(this.blockTypes.codes, this.blockTypes.typeCount), sequence);
      const queues = new Map<number, number[]>();
      this.blockTypes.codes.forEach((code, b) => (queues.get(code) ?? queues.set(code, []).get(code)!).push(b));
      this.members.forEach((positions, b) => {
        const source = this.members[queues.get(sequence[b])!.shift()!];
        positions.forEach((s, i) => (out[s] = source[i]));
      });
      return;
    }
    let rest = index;
    this.members.forEach((positions, b) => {
      const count = this.blockCounts[b];
      const rank = rest % count;
      rest = Math.floor(rest / count);
      const types = this.memberTypes[b];
      const sequence = new Int32Array(positions.length);
      unrankArrangement(rank, tally(types.codes, types.typeCount), sequence);
      const queues: number[][] = Array.from({ length: types.typeCount }, () => []);
      types.codes.forEach((code, i) => queues[code].push(positions[i]));
      positions.forEach((s, i) => (out[s] = queues[sequence[i]].shift()!));
    });
  }
}

/** Codes identical design rows alike (exact equality of every column). */
export function designRowTypes(values: Float64Array, rows: number, cols: number): number[] {
  const seen = new Map<string, number>();
  const out: number[] = [];
  for (let s = 0; s < rows; s++) {
    const key = Array.from(values.subarray(s * cols, (s + 1) * cols)).join(",");
    if (!seen.has(key)) seen.set(key, seen.size);
    out.push(seen.get(key)!);
  }
  return out;
}
