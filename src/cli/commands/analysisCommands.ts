import type { Command } from "commander";
import { residualDf } from "../../model/designMatrix.js";
import { formatFormula } from "../../model/formula.js";
import { prepareAnalysis } from "../../run/prepareAnalysis.js";
import { runAnalysis } from "../../run/runAnalysis.js";
import { mergeShards } from "../../run/mergeShards.js";
import { printable } from "../../io/printable.js";
import { describeReading } from "../../io/arrays/describeReading.js";
import { silentProgress } from "../../common/progress.js";
import { stderrProgress } from "../progress.js";
import type { OutputSink } from "../outputSink.js";
import { MEMORY_FLAG, parseMemory, parseOverrides, parseShard, parseThreads, PERMUTATIONS_FLAG, SEED_FLAG } from "../options.js";
import { resourceLines } from "../resourceLines.js";
import { givenMemory } from "../../run/memoryPlan.js";
import { defaultThreads } from "../../permute/nullEngine.js";
import { inferencePlanLines } from "../inferencePlan.js";
import { terminalLog } from "../terminalLog.js";
import { inferenceLine } from "../../output/summaryParts.js";
import type { PreparedAnalysis } from "../../output/preparedAnalysis.js";
import { selectionText } from "../../io/selectParticipants.js";
import { edgeRulesLine } from "../../output/edgeRulesSummary.js";
import { repeatedCheckLine } from "../../output/repeatedSummary.js";

/** `plexus check DESIGN` and `plexus run DESIGN --out DIR`. */
export function registerAnalysisCommands(program: Command, sink: OutputSink, argv: () => string[]): void {
  const log = terminalLog(sink);
  program
    .command("check")
    .description("validate a design file and every input it names, and print the model that would be fitted")
    .argument("<design>", "design file (YAML)")
    .option(...PERMUTATIONS_FLAG)
    .option(...SEED_FLAG)
    .option("-t, --threads <n>", "plan for this many worker threads (default: all cores)")
    .option("--shard <k/n>", "plan for one of n shards of the permutations (a cluster task)")
    .option(...MEMORY_FLAG)
    .action((designFile: string, flags: CheckFlags) => {
      const overrides = parseOverrides(flags);
      const threads = flags.threads === undefined ? defaultThreads() : parseThreads(flags.threads);
      const shard = flags.shard === undefined ? undefined : parseShard(flags.shard);
      const limit = flags.memory === undefined ? undefined : givenMemory(parseMemory(flags.memory));
      const started = performance.now();
      const prepared = prepareAnalysis(designFile, { ...(overrides ? { overrides } : {}), memory: { threads, ...(limit ? { limit } : {}) } });
      const readSeconds = (performance.now() - started) / 1000;
      const { matrix, connectomes, design } = prepared;
      const lines = [
        `design      ${designFile}`,
        `subjects    ${prepared.kept.length} used of ${prepared.participants.ids.length}${prepared.excluded.length ? ` (${prepared.excluded.length} left out${prepared.repeated ? "" : " for missing values"})` : ""}`,
        ...selectionLines(prepared),
        ...(prepared.repeated ? [repeatedCheckLine(prepared)!] : []),
        `connectomes ${connectomes.regionCount} regions, ${prepared.edgeRules?.allPairs.edgeCount ?? connectomes.edgeCount} edges${design.transform === "fisher-z" ? ", Fisher z-transformed" : ""}`,
        ...[edgeRulesLine(design.transform, design.scale, prepared.edgeRules, prepared.regions)].filter((line) => line !== null).map((line) => `edges       ${line}`),
        `read        ${describeReading(connectomes.reading)}`,
        `model       ${formatFormula(prepared.formula)}`,
        `columns     ${matrix.columns.map((c) => c.name).join(", ")}`,
        `df          ${residualDf(matrix)}`,
        ...prepared.contrasts.map(
          (c) => `contrast    ${c.name}: ${c.expression}  ->  ${formatContrastRows(c.kind === "F" ? c.rows : [c.vector], c.kind)}`,
        ),
        `inference   ${inferenceLine(design.inference)}`,
        ...inferencePlanLines(prepared),
        ...resourceLines(prepared, { threads, shard, limit, readSeconds }),
      ];
      for (const warning of prepared.warnings) log.warn(warning);
      sink.out(`${printable(lines.join("\n"))}\nok: the design and its inputs are valid\n`);
    });

  program
    .command("run")
    .description("fit the model at every edge, run the inference and write the results folder")
    .argument("<design>", "design file (YAML)")
    .requiredOption("-o, --out <dir>", "results folder (must not exist or be empty, unless --force)")
    .option("-f, --force", "replace an existing results folder (and start over from any checkpoint)", false)
    .option("-q, --quiet", "print nothing but warnings and errors", false)
    .option("-t, --threads <n>", "worker threads for the permutations (default: all cores)")
    .option("--shard <k/n>", "compute only the k-th of n equal shares of the permutations; combine with `plexus merge`")
    .option("--resume", "continue an interrupted run from its checkpoint", false)
    .option(...PERMUTATIONS_FLAG)
    .option(...SEED_FLAG)
    .option(...MEMORY_FLAG)
    .action(async (designFile: string, flags: RunFlags) => {
      const overrides = parseOverrides(flags);
      const memoryGigabytes = flags.memory === undefined ? undefined : parseMemory(flags.memory);
      await runAnalysis(
        {
          designFile,
          out: flags.out,
          force: flags.force,
          quiet: flags.quiet,
          threads: flags.threads === undefined ? undefined : parseThreads(flags.threads),
          shard: flags.shard === undefined ? undefined : parseShard(flags.shard),
          resume: flags.resume,
          ...(memoryGigabytes !== undefined ? { memoryGigabytes } : {}),
          commandLine: ["plexus", ...argv()],
          ...(overrides ? { overrides } : {}),
        },
        log,
        flags.quiet ? silentProgress : stderrProgress(sink),
      );
    });

  program
    .command("merge")
    .description("combine shard folders written by `plexus run --shard k/n` into one results folder")
    .argument("<shards...>", "the shard folders, in any order")
    .requiredOption("-o, --out <dir>", "results folder (must not exist or be empty, unless --force)")
    .option("-f, --force", "replace an existing results folder", false)
    .option("-q, --quiet", "print nothing but warnings and errors", false)
    .action(async (shards: string[], flags: { out: string; force: boolean; quiet: boolean }) => {
      await mergeShards(shards, { out: flags.out, force: flags.force, quiet: flags.quiet, commandLine: ["plexus", ...argv()] }, log);
    });
}

/** A t contrast as `[a, b, …]`; an F contrast as its rows, `[[a, b, …], [c, d, …]]`, every row shown. */
export function formatContrastRows(rows: readonly Float64Array[], kind: "t" | "F"): string {
  const row = (values: Float64Array) => `[${[...values].join(", ")}]`;
  return kind === "F" ? `[${rows.map(row).join(", ")}]` : row(rows[0]);
}

interface OverrideFlags {
  permutations?: string;
  seed?: string;
}

interface CheckFlags extends OverrideFlags {
  threads?: string;
  shard?: string;
  memory?: string;
}

interface RunFlags extends OverrideFlags {
  memory?: string;
  out: string;
  force: boolean;
  quiet: boolean;
  threads?: string;
  shard?: string;
  resume: boolean;
}

/** `plexus check`'s lines for `select` (when set) and the cohort table. */
function selectionLines(prepared: PreparedAnalysis): string[] {
  const { select } = prepared.design;
  const selected = prepared.participants.ids.length - prepared.notSelected.length;
  const { by, byFrom, variables } = prepared.cohortTable;
  const source = byFrom === "design" ? "cohort_table.by" : byFrom === "first contrast" ? "the factor compared by the first contrast between its levels" : "no factor compared";
  return [
    ...(select.length > 0 ? [`select      ${selectionText(select)}: ${selected} of ${prepared.participants.ids.length} selected, ${prepared.notSelected.length} not selected (not analysed by design)`] : []),
    `table 1     by ${by ?? "none (all analysed participants)"} (${source}); variables ${variables.length > 0 ? variables.join(", ") : "none"}`,
  ];
}
