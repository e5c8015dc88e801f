import type { Command } from "commander";
import { InputError } from "../../errors.js";
import type { SimulationRun } from "../../simulate/runSimulation.js";
import { runSimulation } from "../../simulate/runSimulation.js";
import type { OutputSink } from "../outputSink.js";

/** The flags as commander hands them over: text, or booleans for switches. */
interface SimulateFlags {
  out?: string;
  seed?: string;
  regions?: string;
  patients?: string;
  controls?: string;
  kind?: string;
  effectRegions?: string;
  effectSize?: string;
  effect: boolean;
  covariates: boolean;
  format?: string;
  force?: boolean;
}

/** Defaults, applied after parsing so that help shows them as plain values. */
const DEFAULTS = {
  regions: "60",
  patients: "30",
  controls: "30",
  kind: "correlation",
  effectRegions: "6",
  effectSize: 1.2,
  format: "tsv",
} as const;

function wholeNumber(text: string, key: string, minimum: number): number {
  const value = /^\s*\d+\s*$/.test(text) ? Number(text) : Number.NaN;
  if (!Number.isSafeInteger(value) || value < minimum) {
    throw new InputError(`expected a whole number of at least ${minimum}, found '${text}'`, { key });
  }
  return value;
}

function choice<T extends string>(text: string, key: string, allowed: readonly T[]): T {
  if (!(allowed as readonly string[]).includes(text)) {
    throw new InputError(`expected one of ${allowed.join(", ")}, found '${text}'`, { key });
  }
  return text as T;
}

/** Checks the flags and applies defaults; every mistake names the flag. */
export function resolveSimulateFlags(flags: SimulateFlags): SimulationRun {
  if (flags.out === undefined || flags.out.trim() === "") {
    throw new InputError("an output folder is required", { key: "--out" });
  }
  if (flags.seed === undefined) {
    throw new InputError("a seed is required, so the cohort can be made again", { key: "--seed" });
  }
  const seed = wholeNumber(flags.seed, "--seed", 0);
  const regions = wholeNumber(flags.regions ?? DEFAULTS.regions, "--regions", 2);
  const patients = wholeNumber(flags.patients ?? DEFAULTS.patients, "--patients", 0);
  const controls = wholeNumber(flags.controls ?? DEFAULTS.controls, "--controls", 0);
  if (patients + controls === 0) {
    throw new InputError("the cohort needs at least one participant", { key: "--patients" });
  }
  const kind = choice(flags.kind ?? DEFAULTS.kind, "--kind", ["correlation", "counts"] as const);
  const format = choice(flags.format ?? DEFAULTS.format, "--format", ["tsv", "npy"] as const);

  let effect: SimulationRun["simulation"]["effect"] = null;
  if (flags.effect) {
    const effectRegions = wholeNumber(flags.effectRegions ?? DEFAULTS.effectRegions, "--effect-regions", 2);
    if (effectRegions > regions) {
      throw new InputError(`the effect cannot span ${effectRegions} regions when there are ${regions}`, {
        key: "--effect-regions",
      });
    }
    let size: number = DEFAULTS.effectSize;
    if (flags.effectSize !== undefined) {
      size = /^\s*[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?\s*$/.test(flags.effectSize) ? Number(flags.effectSize) : Number.NaN;
      if (!Number.isFinite(size) || size === 0) {
        throw new InputError(`expected a non-zero number (Cohen's d), found '${flags.effectSize}'`, {
          key: "--effect-size",
        });
      }
    }
    effect = { regions: effectRegions, size };
  } else if (flags.effectSize !== undefined) {
    throw new InputError("give either --effect-size or --no-effect, not both", { key: "--effect-size" });
  }

  return {
    out: flags.out,
    seed,
    simulation: { regions, patients, controls, kind, effect, covariates: flags.covariates },
    format,
    force: flags.force === true,
  };
}

export function registerSimulate(program: Command, sink: OutputSink): void {
  program
    .command("simulate")
    .description("Write an invented cohort of connectivity matrices, optionally with a planted group effect.")
    .option("--out <dir>", "folder to write the cohort into (required)")
    .option("--seed <n>", "seed of the random generator; the same seed writes identical files (required)")
    .option("--regions <n>", `number of regions (default ${DEFAULTS.regions})`)
    .option("--patients <n>", `number of patients (default ${DEFAULTS.patients})`)
    .option("--controls <n>", `number of controls (default ${DEFAULTS.controls})`)
    .option("--kind <kind>", `correlation (model scale Fisher z) or counts (model scale log1p) (default ${DEFAULTS.kind})`)
    .option("--effect-regions <n>", `regions in the planted subnetwork, every edge among them (default ${DEFAULTS.effectRegions})`)
    .option("--effect-size <d>", `Cohen's d of patients minus controls on the planted edges (default ${DEFAULTS.effectSize})`)
    .option("--no-effect", "plant no group effect")
    .option("--no-covariates", "write only participant_id and group, with no age or site effects")
    .option("--format <format>", `tsv (one file per participant) or npy (one S×N×N array) (default ${DEFAULTS.format})`)
    .option("--force", "replace the cohort files in a non-empty output folder")
    .action((flags: SimulateFlags) => {
      const run = resolveSimulateFlags(flags);
      const cohort = runSimulation(run);
      const { simulation } = run;
      const effect = simulation.effect
        ? `planted ${cohort.plantedEdges.length} edges among ${simulation.effect.regions} regions (d = ${simulation.effect.size})`
        : "no planted effect";
      sink.out(
        `plexus simulate: wrote ${cohort.matrices.length} participants (${simulation.patients} patients, ${simulation.controls} controls), ` +
          `${simulation.regions} regions, ${simulation.kind} matrices as ${run.format}, ${effect}, seed ${run.seed} to ${run.out}\n`,
      );
    });
}
