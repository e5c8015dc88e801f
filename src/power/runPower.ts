import path from "node:path";
import seedrandom from "seedrandom";
import { InputError } from "../errors.js";
import { VERSION } from "../version.js";
import type { Progress } from "../common/progress.js";
import { silentProgress } from "../common/progress.js";
import { readRegions, type Region } from "../io/regions.js";
import { runOnWorkers, workerScript, availableThreads } from "../parallel/workerPool.js";
import type { GuardedInputs } from "../output/inputOverlap.js";
import { ResultsFolder } from "../output/resultsFolder.js";
import { formatTsv } from "../output/tsvWriter.js";
import { fitAll } from "../run/analyzeContrasts.js";
import { prepareAnalysis } from "../run/prepareAnalysis.js";
import { refuseRepeated } from "../run/repeatedScans.js";
import { plantedEdges } from "./powerCohort.js";
import { analysePowerCohort, POWER_METHODS, sampleSizeFor, sampleSizeSentence, sampleSizeWithInterval, summarizePower, type CohortDetections, type PowerEstimate, type PowerPlan } from "./powerStudy.js";
import { powerCurveSvg } from "./powerCurve.js";
import { PRINT_WIDTHS, widthSuffix } from "../output/report/figures/printSize.js";
import { rasterise } from "../output/report/figures/rasterise.js";

export interface PowerOptions {
  out: string;
  force?: boolean;
  /** Number of regions (independent normal edges), unless a regions file or a pilot design is given. */
  regions?: number;
  regionsFile?: string;
  /** A design file whose cohort serves as the pilot: its residuals are resampled. */
  pilotDesign?: string;
  perGroup: number[];
  effectSize: number;
  effectRegions: number;
  threshold: number;
  size: "extent" | "mass";
  alpha: number;
  cohorts: number;
  permutations: number;
  seed: number;
  threads?: number;
  target?: number;
  commandLine?: string[];
}

/** Builds the plan: regions, the planted subnetwork and (with a pilot) unit-variance residual vectors. */
export function planPower(
  options: PowerOptions,
  beforeMatrices?: (inputs: GuardedInputs) => void,
): { plan: PowerPlan; regions: Region[] | null; pilotNote: string | null } {
  let regions: Region[] | null = null;
  let regionCount = options.regions ?? 0;
  let pilot: PowerPlan["pilot"] = null;
  let pilotNote: string | null = null;
  if (options.pilotDesign) {
    const prepared = prepareAnalysis(options.pilotDesign, {
      beforeMatrices: (design, inputs) => {
        refuseRepeated(design, "plexus power (--pilot)");
        beforeMatrices?.(inputs);
      },
    });
    const { matrix, connectomes } = prepared;
    if (prepared.edgeRules && prepared.edgeRules.kept.length < prepared.edgeRules.allPairs.edgeCount) {
      throw new InputError(
        `the pilot design's edge rules leave out ${prepared.edgeRules.allPairs.edgeCount - prepared.edgeRules.kept.length} edges; power planning simulates every edge of the network`,
        { file: options.pilotDesign, key: "edges" },
        "use a pilot design without `edges:` (or whose rules keep every edge)",
      );
    }
    const S = matrix.rows;
    const E = connectomes.edgeCount;
    const fit = fitAll(prepared);
    // Residual vectors of the pilot's own model, each edge scaled to unit variance.
    const residuals = new Float64Array(new SharedArrayBuffer(S * E * 8));
    const q = fit.qr.q;
    const p = matrix.cols;
    const qty = new Float64Array(p);
    for (let e = 0; e < E; e++) {
      const at = e * S;
      for (let k = 0; k < p; k++) {
        let sum = 0;
        for (let t = 0; t < S; t++) sum += q[t * p + k] * connectomes.data[at + t];
        qty[k] = sum;
      }
      const scale = Math.sqrt(fit.sse[e] / S);
      for (let s = 0; s < S; s++) {
        let fitted = 0;
        for (let k = 0; k < p; k++) fitted += q[s * p + k] * qty[k];
        residuals[at + s] = scale > 0 ? (connectomes.data[at + s] - fitted) / scale : 0;
      }
    }
    pilot = { subjects: S, residuals };
    regions = prepared.regions;
    regionCount = connectomes.regionCount;
    pilotNote = `pilot: ${S} subjects of ${options.pilotDesign} (model ${prepared.design.model}); residual vectors resampled with replacement`;
  } else if (options.regionsFile) {
    regions = readRegions(options.regionsFile);
    regionCount = regions.length;
  }
  if (!(regionCount >= 2)) throw new InputError("give --regions N (at least 2), --regions-file or --pilot", { key: "--regions" });
  if (!(options.effectRegions >= 2 && options.effectRegions <= regionCount)) {
    throw new InputError(`--effect-regions must be from 2 to the number of regions (${regionCount})`, { key: "--effect-regions" });
  }
  const coordinates =
    regions && regions.every((r) => r.x !== undefined) ? regions.map((r) => ({ x: r.x!, y: r.y!, z: r.z! })) : null;
  const seedRegion = Math.floor(seedrandom(`plexus-power-subnetwork/${options.seed}`)() * regionCount);
  const planted = [...plantedEdges(regionCount, options.effectRegions, coordinates, seedRegion)].sort((a, b) => a - b);
  return {
    plan: {
      regionCount,
      planted,
      effectSize: options.effectSize,
      threshold: options.threshold,
      size: options.size,
      alpha: options.alpha,
      permutations: options.permutations,
      seed: options.seed,
      pilot,
    },
    regions,
    pilotNote,
  };
}

export interface PowerResult {
  estimates: PowerEstimate[];
  sampleSize: Record<string, number | null>;
  outputFolder: string;
}

export async function runPower(
  options: PowerOptions,
  progress: Progress = silentProgress,
  warn: (text: string) => void = () => {},
): Promise<PowerResult> {
  const opened: { folder?: ResultsFolder } = {};
  const regionsFile = options.regionsFile ? [path.resolve(options.regionsFile)] : [];
  // The output is checked (inputs, lock, --force rule) before a pilot's matrices are read.
  const open = (inputs: GuardedInputs) => {
    opened.folder = ResultsFolder.open(options.out, { force: options.force ?? false, inputs: { files: [...inputs.files, ...regionsFile], folders: inputs.folders }, warn });
  };
  try {
    if (!options.pilotDesign) open({ files: [], folders: [] });
    const { plan, pilotNote } = planPower(options, open);
    const folder = opened.folder;
    if (!folder) throw new Error("the output folder was not opened before the matrices were read");
    const threads = options.threads ?? availableThreads();
    const chunk = Math.max(1, Math.min(25, Math.ceil(options.cohorts / (4 * threads))));
    const estimates: PowerEstimate[] = [];
    for (const perGroup of options.perGroup) {
      const outcomes: CohortDetections[] = new Array(options.cohorts);
      const tasks: { perGroup: number; from: number; to: number }[] = [];
      for (let from = 1; from <= options.cohorts; from += chunk) tasks.push({ perGroup, from, to: Math.min(options.cohorts + 1, from + chunk) });
      progress.start(`${perGroup} per group`, options.cohorts, "simulated cohorts");
      if (threads <= 1) {
        for (const task of tasks) {
          for (let k = task.from; k < task.to; k++) outcomes[k - 1] = analysePowerCohort(plan, perGroup, k);
          progress.advance(task.to - task.from);
          await new Promise((resolve) => setImmediate(resolve));
        }
      } else {
        await runOnWorkers<typeof tasks[number], { from: number; to: number; outcomes: CohortDetections[] }>({
          script: workerScript("power/powerWorker.js"),
          workerData: plan,
          threads,
          tasks,
          onResult: (result) => {
            result.outcomes.forEach((o, i) => (outcomes[result.from - 1 + i] = o));
            progress.advance(result.to - result.from);
          },
        });
      }
      progress.finish();
      estimates.push(...summarizePower(perGroup, outcomes));
    }
    const target = options.target ?? 0.8;
    const sampleSize = sampleSizeFor(estimates, target);
    folder.write(
      "power.tsv",
      formatTsv(
        ["per_group", "method", "cohorts", "detected", "power", "ci_low", "ci_high"],
        estimates.map((e) => [e.perGroup, e.method, e.cohorts, e.detected, e.power, e.low, e.high]),
      ),
    );
    for (const width of PRINT_WIDTHS) {
      const svg = powerCurveSvg(estimates, target, width);
      folder.write(`power${widthSuffix(width)}.svg`, svg);
      folder.write(`power${widthSuffix(width)}.png`, rasterise(svg, width));
    }
    folder.write("power.md", powerMarkdown(options, plan, estimates, sampleSize, target, pilotNote));
    folder.write(
      "summary.json",
      `${JSON.stringify(
        {
          tool: { name: "plexus", version: VERSION },
          command: options.commandLine ?? null,
          regions: plan.regionCount,
          planted_edges: plan.planted.length,
          planted_edge_indices: plan.planted,
          effect_size: plan.effectSize,
          per_group: options.perGroup,
          threshold: plan.threshold,
          size: plan.size,
          alpha: plan.alpha,
          cohorts: options.cohorts,
          permutations: plan.permutations,
          seed: plan.seed,
          pilot: options.pilotDesign ? path.resolve(options.pilotDesign) : null,
          target_power: target,
          per_group_for_target: sampleSize,
          per_group_for_target_with_interval: sampleSizeWithInterval(estimates, target),
        },
        null,
        2,
      )}\n`,
    );
    folder.commit();
    return { estimates, sampleSize, outputFolder: folder.target };
  } catch (error) {
    opened.folder?.abandon();
    throw error;
  }
}

function powerMarkdown(
  options: PowerOptions,
  plan: PowerPlan,
  estimates: PowerEstimate[],
  sampleSize: Record<string, number | null>,
  target: number,
  pilotNote: string | null,
): string {
  const percent = (x: number) => `${(100 * x).toFixed(1)}%`;
  const lines = [
    "# Power planning",
    "",
    `A two-group study over ${plan.regionCount} regions, with patients higher than controls by Cohen's d = ${plan.effectSize} on every edge among ${options.effectRegions} neighbouring regions (${plan.planted.length} edges); ${pilotNote ?? "edges simulated as independent standard normal values"}. Primary threshold t > ${plan.threshold}, component size by ${plan.size}, alpha = ${plan.alpha}, ${plan.permutations} permutations per cohort, ${options.cohorts} simulated cohorts per sample size, seed ${plan.seed}. Power is the share of cohorts in which at least one planted edge is declared significant, with a 95% Clopper–Pearson interval.`,
    "",
    "| per group | " + POWER_METHODS.join(" | ") + " |",
    "| ---: | " + POWER_METHODS.map(() => "---").join(" | ") + " |",
    ...options.perGroup.map(
      (n) =>
        `| ${n} | ` +
        POWER_METHODS.map((m) => {
          const e = estimates.find((x) => x.perGroup === n && x.method === m)!;
          return `${percent(e.power)} (${percent(e.low)}–${percent(e.high)})`;
        }).join(" | ") +
        " |",
    ),
    "",
    ...POWER_METHODS.map((m) => sampleSizeSentence(m, estimates, target)),
    "",
    "The uncorrected column tests the planted edges without any correction for the other edges; it is shown for reference only.",
    "",
    "![Power by sample size](power-180mm.svg)",
    "",
    "The figure is also written for one journal column (power-85mm.svg) and as 300 dpi PNG (power-180mm.png, power-85mm.png).",
    "",
  ];
  return lines.join("\n");
}
