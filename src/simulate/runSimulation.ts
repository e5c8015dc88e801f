import type { SimulatedCohort, SimulationOptions } from "./simulateCohort.js";
import { simulateCohort } from "./simulateCohort.js";
import { simulationRandom } from "./simulationRandom.js";
import { writeCohort } from "./writeCohort.js";

/** A fully resolved simulation request: every default applied, every value checked. */
export interface SimulationRun {
  out: string;
  seed: number;
  simulation: SimulationOptions;
  format: "tsv" | "npy";
  force: boolean;
}

/** Simulates the cohort from the seed and writes it (with planted.tsv when there is an effect). */
export function runSimulation(run: SimulationRun): SimulatedCohort {
  const cohort = simulateCohort(run.simulation, simulationRandom(run.seed));
  writeCohort(run.out, cohort, { format: run.format, plantedFile: true, force: run.force });
  return cohort;
}
