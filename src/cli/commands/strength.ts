import type { Command } from "commander";
import { InputError } from "../../errors.js";
import { runExtract } from "../../strength/runExtract.js";
import { runStrength } from "../../strength/runStrength.js";
import { MEASURE_KINDS, OPTION, type EdgeSelection, type MeasureKind } from "../../strength/strengthOptions.js";
import type { OutputSink } from "../outputSink.js";
import { silentProgress } from "../../common/progress.js";
import { stderrProgress } from "../progress.js";
import { parseOverrides, parseThreads, PERMUTATIONS_FLAG, SEED_FLAG } from "../options.js";
import { terminalLog } from "../terminalLog.js";

/** The flags as commander hands them over: text, or booleans for switches. */
interface SelectionFlags {
  system?: string;
  between?: string;
  pairs?: string;
  from?: string;
  component?: string;
}

interface StrengthFlags extends SelectionFlags {
  out: string;
  measure?: string;
  positiveOnly: boolean;
  mean: boolean;
  threads?: string;
  force: boolean;
  quiet: boolean;
  permutations?: string;
  seed?: string;
}

interface ExtractFlags extends SelectionFlags {
  out: string;
  force: boolean;
  quiet: boolean;
}

function names(text: string, key: string): string[] {
  const list = text.split(",").map((s) => s.trim());
  if (list.some((s) => s === "")) throw new InputError(`expected names separated by commas, found '${text}'`, { key });
  return list;
}

function parseSelection(flags: SelectionFlags): EdgeSelection {
  const selection: EdgeSelection = {};
  if (flags.system !== undefined) selection.systems = names(flags.system, OPTION.system);
  if (flags.between !== undefined) {
    const pair = names(flags.between, OPTION.between);
    if (pair.length !== 2) {
      throw new InputError(`expected two systems separated by a comma (e.g. amber,jade), found '${flags.between}'`, { key: OPTION.between });
    }
    selection.between = [pair[0], pair[1]];
  }
  if (flags.pairs !== undefined) {
    if (flags.pairs.trim() === "") throw new InputError("expected the path of an edge list", { key: OPTION.pairs });
    selection.pairs = flags.pairs;
  }
  if (flags.from !== undefined) {
    if (flags.from.trim() === "") throw new InputError("expected a contrast folder of a results folder", { key: OPTION.from });
    selection.from = flags.from;
  }
  if (flags.component !== undefined) {
    selection.components = flags.component.split(",").map((text) => {
      const id = /^\s*\d+\s*$/.test(text) ? Number(text) : NaN;
      if (!Number.isSafeInteger(id) || id < 1) {
        throw new InputError(`expected component ids (whole numbers from 1, separated by commas), found '${flags.component}'`, {
          key: OPTION.component,
        });
      }
      return id;
    });
  }
  return selection;
}

function parseMeasure(text: string | undefined): MeasureKind | undefined {
  if (text === undefined) return undefined;
  if (!(MEASURE_KINDS as readonly string[]).includes(text)) {
    throw new InputError(`expected one of ${MEASURE_KINDS.join(", ")}, found '${text}'`, { key: OPTION.measure });
  }
  return text as MeasureKind;
}

/** `plexus strength DESIGN --out DIR` and `plexus extract DESIGN --from … --out FILE`. */
export function registerStrength(program: Command, sink: OutputSink, argv: () => string[]): void {
  const log = terminalLog(sink);
  program
    .command("strength")
    .description("regress nodal, global or subnetwork strength on the design, with FWER and FDR across regions")
    .argument("<design>", "design file (YAML)")
    .requiredOption("-o, --out <dir>", "results folder (must not exist or be empty, unless --force)")
    .option("--measure <kind>", "nodal (each region's strength), global (mean of all edges) or subnetwork (mean of an edge set); default nodal, or subnetwork when an edge set is chosen")
    .option("--positive-only", "count negative edge weights as 0", false)
    .option("--mean", "nodal strength as the mean over the N − 1 possible neighbours instead of the sum", false)
    .option("--system <names>", "subnetwork: the edges within each of these systems (regions table `system` column), comma-separated")
    .option("--between <a,b>", "subnetwork: the edges between two systems")
    .option("--pairs <file>", "subnetwork: the edges listed in a TSV with columns region_a and region_b")
    .option("--from <dir>", "subnetwork: the significant components of an earlier results folder's contrast (RESULTS_DIR/<contrast>)")
    .option("--component <ids>", "with --from: these component ids instead of every component with p_fwe ≤ alpha")
    .option("-t, --threads <n>", "worker threads for the permutations (default: all cores)")
    .option(...PERMUTATIONS_FLAG)
    .option(...SEED_FLAG)
    .option("-f, --force", "replace an existing results folder", false)
    .option("-q, --quiet", "print nothing but warnings and errors", false)
    .action(async (designFile: string, flags: StrengthFlags) => {
      const overrides = parseOverrides(flags);
      await runStrength(
        {
          designFile,
          out: flags.out,
          measure: parseMeasure(flags.measure),
          positiveOnly: flags.positiveOnly,
          mean: flags.mean,
          selection: parseSelection(flags),
          threads: flags.threads === undefined ? undefined : parseThreads(flags.threads),
          force: flags.force,
          quiet: flags.quiet,
          commandLine: ["plexus", ...argv()],
          ...(overrides ? { overrides } : {}),
        },
        log,
        flags.quiet ? silentProgress : stderrProgress(sink),
      );
    });

  program
    .command("extract")
    .description("write each subject's mean connectivity of significant subnetworks (or chosen edges) with the participants table's columns, as TSV")
    .argument("<design>", "design file (YAML)")
    .requiredOption("-o, --out <file>", "the TSV to write (refused if it exists, unless --force)")
    .option("--from <dir>", "a contrast folder of an earlier results folder (RESULTS_DIR/<contrast>): its components with p_fwe ≤ alpha")
    .option("--component <ids>", "with --from: these component ids instead")
    .option("--pairs <file>", "the edges listed in a TSV with columns region_a and region_b")
    .option("--system <names>", "the edges within each of these systems, comma-separated")
    .option("--between <a,b>", "the edges between two systems")
    .option("-f, --force", "replace an existing file", false)
    .option("-q, --quiet", "print nothing but warnings and errors", false)
    .action((designFile: string, flags: ExtractFlags) => {
      runExtract({ designFile, out: flags.out, selection: parseSelection(flags), force: flags.force, quiet: flags.quiet }, log);
    });
}
