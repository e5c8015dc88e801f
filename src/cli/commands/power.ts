import type { Command } from "commander";
import { InputError } from "../../errors.js";
import { runPower } from "../../power/runPower.js";
import type { OutputSink } from "../outputSink.js";
import { silentProgress } from "../../common/progress.js";
import { stderrProgress } from "../progress.js";
import { parseThreads } from "../options.js";

function positiveInteger(text: string, option: string, minimum = 1): number {
  const value = Number(text);
  if (!Number.isInteger(value) || value < minimum) throw new InputError(`${option} takes a whole number ≥ ${minimum}, found '${text}'`, { key: option });
  return value;
}

function finiteNumber(text: string, option: string, check: (v: number) => boolean, rule: string): number {
  const value = Number(text);
  if (!Number.isFinite(value) || !check(value)) throw new InputError(`${option} must be ${rule}, found '${text}'`, { key: option });
  return value;
}

/** `plexus power`: simulated power of each inference method for a planned two-group study. */
export function registerPower(program: Command, sink: OutputSink, argv: () => string[]): void {
  program
    .command("power")
    .description("estimate by simulation the power of components, max-t and FDR for a planned two-group study")
    .requiredOption("-o, --out <dir>", "folder for power.tsv, power.md, the figure (power-180mm.svg, power-85mm.svg and their PNGs) and summary.json")
    .option("--regions <n>", "number of regions (edges simulated as independent normal values)")
    .option("--regions-file <file>", "a regions table; its coordinates place the planted subnetwork")
    .option("--pilot <design>", "a design file whose cohort is the pilot: its residual vectors are resampled, keeping their dependence")
    .option("--per-group <list>", "participants per group to try, e.g. 15,20,30,40", "15,20,30,40")
    .option("--effect-size <d>", "Cohen's d of patients over controls on the planted edges", "0.8")
    .option("--effect-regions <k>", "regions in the planted subnetwork (every edge among them)", "6")
    .option("--threshold <t>", "primary threshold on t", "3")
    .option("--size <measure>", "component size: extent or mass", "extent")
    .option("--alpha <a>", "significance level", "0.05")
    .option("--cohorts <n>", "simulated cohorts per sample size", "200")
    .option("--permutations <k>", "permutations per simulated cohort", "500")
    .option("--seed <n>", "seed; the same seed gives the same estimates", "1")
    .option("--target <p>", "power to reach", "0.8")
    .option("-t, --threads <n>", "worker threads (default: all cores)")
    .option("-f, --force", "replace an existing output folder", false)
    .option("-q, --quiet", "print nothing but warnings and errors", false)
    .action(async (flags: Record<string, string | boolean | undefined>) => {
      const text = (name: string) => flags[name] as string | undefined;
      const perGroup = String(text("perGroup"))
        .split(",")
        .map((v) => positiveInteger(v.trim(), "--per-group", 3));
      const size = text("size");
      if (size !== "extent" && size !== "mass") throw new InputError(`--size must be extent or mass, found '${size}'`, { key: "--size" });
      const sources = [text("regions"), text("regionsFile"), text("pilot")].filter((v) => v !== undefined).length;
      if (sources !== 1) throw new InputError("give exactly one of --regions, --regions-file and --pilot", { key: "--regions" });
      const alpha = finiteNumber(String(text("alpha")), "--alpha", (v) => v > 0 && v < 1, "between 0 and 1");
      const permutations = positiveInteger(String(text("permutations")), "--permutations", 0);
      if (permutations > 0 && 1 / (permutations + 1) > alpha) {
        throw new InputError(`with ${permutations} permutations no p-value can fall below alpha = ${alpha}`, { key: "--permutations" });
      }
      const quiet = flags.quiet === true;
      const result = await runPower(
        {
          out: String(text("out")),
          force: flags.force === true,
          regions: text("regions") === undefined ? undefined : positiveInteger(String(text("regions")), "--regions", 2),
          regionsFile: text("regionsFile"),
          pilotDesign: text("pilot"),
          perGroup: [...new Set(perGroup)].sort((a, b) => a - b),
          effectSize: finiteNumber(String(text("effectSize")), "--effect-size", (v) => v !== 0, "a non-zero number"),
          effectRegions: positiveInteger(String(text("effectRegions")), "--effect-regions", 2),
          threshold: finiteNumber(String(text("threshold")), "--threshold", (v) => v > 0, "positive"),
          size,
          alpha,
          cohorts: positiveInteger(String(text("cohorts")), "--cohorts"),
          permutations,
          seed: positiveInteger(String(text("seed")), "--seed", 0),
          threads: text("threads") === undefined ? undefined : parseThreads(String(text("threads"))),
          target: finiteNumber(String(text("target")), "--target", (v) => v > 0 && v < 1, "between 0 and 1"),
          commandLine: ["plexus", ...argv()],
        },
        quiet ? silentProgress : stderrProgress(sink),
        (warning) => sink.err(`plexus: warning: ${warning}\n`),
      );
      if (!quiet) {
        for (const [method, n] of Object.entries(result.sampleSize)) {
          sink.err(`${method}: ${n === null ? "no sample size in the grid reaches the target" : `${n} per group reach the target power`}\n`);
        }
        sink.err(`power estimates written to ${result.outputFolder}\n`);
      }
    });
}
