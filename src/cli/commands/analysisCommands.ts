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
import { parseShard, parseThreads } from "../options.js";
import { terminalLog } from "../terminalLog.js";
import { inferenceLine } from "../../output/summaryParts.js";
import { repeatedCheckLine } from "../../output/repeatedSummary.js";

/** `plexus check DESIGN` and `plexus run DESIGN --out DIR`. */
export function registerAnalysisCommands(program: Command, sink: OutputSink, argv: () => string[]): void {
  const log = terminalLog(sink);
  program
    .command("check")
    .description("validate a design file and every input it names, and print the model that would be fitted")
    .argument("<design>", "design file (YAML)")
    .action((designFile: string) => {
      const prepared = prepareAnalysis(designFile);
      const { matrix, connectomes, design } = prepared;
      const lines = [
        `design      ${designFile}`,
        `subjects    ${prepared.kept.length} used of ${prepared.participants.ids.length}${prepared.excluded.length ? ` (${prepared.excluded.length} left out${prepared.repeated ? "" : " for missing values"})` : ""}`,
        ...(prepared.repeated ? [repeatedCheckLine(prepared)!] : []),
        `connectomes ${connectomes.regionCount} regions, ${connectomes.edgeCount} edges${design.transform === "fisher-z" ? ", Fisher z-transformed" : ""}`,
        `read        ${describeReading(connectomes.reading)}`,
        `model       ${formatFormula(prepared.formula)}`,
        `columns     ${matrix.columns.map((c) => c.name).join(", ")}`,
        `df          ${residualDf(matrix)}`,
        ...prepared.contrasts.map(
          (c) => `contrast    ${c.name}: ${c.expression}  ->  ${formatContrastRows(c.kind === "F" ? c.rows : [c.vector], c.kind)}`,
        ),
        `inference   ${inferenceLine(design.inference)}`,
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
    .action(async (designFile: string, flags: RunFlags) => {
      await runAnalysis(
        {
          designFile,
          out: flags.out,
          force: flags.force,
          quiet: flags.quiet,
          threads: flags.threads === undefined ? undefined : parseThreads(flags.threads),
          shard: flags.shard === undefined ? undefined : parseShard(flags.shard),
          resume: flags.resume,
          commandLine: ["plexus", ...argv()],
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
    .action((shards: string[], flags: { out: string; force: boolean; quiet: boolean }) => {
      mergeShards(shards, { out: flags.out, force: flags.force, quiet: flags.quiet, commandLine: ["plexus", ...argv()] }, log);
    });
}

/** A t contrast as `[a, b, …]`; an F contrast as its rows, `[[a, b, …], [c, d, …]]`, every row shown. */
export function formatContrastRows(rows: readonly Float64Array[], kind: "t" | "F"): string {
  const row = (values: Float64Array) => `[${[...values].join(", ")}]`;
  return kind === "F" ? `[${rows.map(row).join(", ")}]` : row(rows[0]);
}

interface RunFlags {
  out: string;
  force: boolean;
  quiet: boolean;
  threads?: string;
  shard?: string;
  resume: boolean;
}
