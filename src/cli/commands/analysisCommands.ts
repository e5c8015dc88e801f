import type { Command } from "commander";
import { formatFormula } from "../../model/formula.js";
import { prepareAnalysis } from "../../run/prepareAnalysis.js";
import { runAnalysis } from "../../run/runAnalysis.js";
import type { OutputSink } from "../main.js";

/** `plexus check DESIGN` and `plexus run DESIGN --out DIR`. */
export function registerAnalysisCommands(program: Command, sink: OutputSink, argv: () => string[]): void {
  program
    .command("check")
    .description("validate a design file and every input it names, and print the model that would be fitted")
    .argument("<design>", "design file (YAML)")
    .action((designFile: string) => {
      const prepared = prepareAnalysis(designFile);
      const { matrix, connectomes, design } = prepared;
      const lines = [
        `design      ${designFile}`,
        `subjects    ${prepared.kept.length} used of ${prepared.participants.ids.length}${prepared.excluded.length ? ` (${prepared.excluded.length} left out for missing values)` : ""}`,
        `connectomes ${connectomes.regionCount} regions, ${connectomes.edgeCount} edges${design.transform === "fisher-z" ? ", Fisher z-transformed" : ""}`,
        `model       ${formatFormula(prepared.formula)}`,
        `columns     ${matrix.columns.map((c) => c.name).join(", ")}`,
        `df          ${matrix.rows - matrix.cols}`,
        ...prepared.contrasts.map(
          (c) => `contrast    ${c.name}: ${c.expression}  ->  [${[...c.vector].join(", ")}]`,
        ),
        `inference   ${design.inference.method}, threshold ${design.inference.threshold}, size ${design.inference.size}, tail ${design.inference.tail}, alpha ${design.inference.alpha}`,
      ];
      for (const warning of prepared.warnings) sink.err(`plexus: warning: ${warning}\n`);
      sink.out(`${lines.join("\n")}\nok: the design and its inputs are valid\n`);
    });

  program
    .command("run")
    .description("fit the model at every edge, run the inference and write the results folder")
    .argument("<design>", "design file (YAML)")
    .requiredOption("-o, --out <dir>", "results folder (must not exist or be empty, unless --force)")
    .option("-f, --force", "replace an existing results folder", false)
    .option("-q, --quiet", "print nothing but errors", false)
    .action((designFile: string, flags: { out: string; force: boolean; quiet: boolean }) => {
      runAnalysis(
        { designFile, out: flags.out, force: flags.force, quiet: flags.quiet, commandLine: ["plexus", ...argv()] },
        {
          info: (text) => sink.err(`${text}\n`),
          warn: (text) => sink.err(`plexus: warning: ${text}\n`),
        },
      );
    });
}
