/**
 * A fast seeded uniform source on [0, 1) for invented benchmark data: a 32-bit
 * xorshift generator (Marsaglia 2003, J. Stat. Softw. 8(14), the 13/17/5 triple).
 * Statistical quality does not matter here, only speed and repeatability; the
 * analyses themselves use seedrandom.
 */
export function uniformSource(seed: number): () => number {
  let state = (seed >>> 0) || 0x9e3779b9;
  return () => {
    state ^= state << 13;
    state >>>= 0;
    state ^= state >>> 17;
    state ^= state << 5;
    state >>>= 0;
    return state / 4294967296;
  };
}
