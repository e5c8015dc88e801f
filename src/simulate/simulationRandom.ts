import seedrandom from "seedrandom";

/**
 * The uniform generator a simulation draws from, built from the user's seed
 * alone, so the same seed always writes byte-identical cohorts.
 */
export function simulationRandom(seed: number): () => number {
  const generator = seedrandom(`plexus-simulate/${seed}`);
  return () => generator();
}
