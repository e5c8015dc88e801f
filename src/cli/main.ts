import { Command, CommanderError } from "commander";
import { isInputError } from "../errors.js";
import { printable } from "../io/printable.js";
import { VERSION } from "../version.js";
import { registerCommands } from "./commands/index.js";
import { processSink, type OutputSink } from "./outputSink.js";

/** Runs the CLI and returns the exit code: 0 ok, 2 user error (message only), 1 bug (with stack). */
export async function main(argv: string[], sink: OutputSink = processSink): Promise<number> {
  const program = new Command();
  program
    .name("plexus")
    .description("Group statistics on brain networks: edge-wise GLM, permutation FWER for subnetworks, FDR.")
    .version(VERSION, "-V, --version")
    .exitOverride()
    .configureOutput({ writeOut: sink.out, writeErr: sink.err });
  registerCommands(program, sink, argv);
  try {
    await program.parseAsync(argv, { from: "user" });
    return 0;
  } catch (error) {
    if (error instanceof CommanderError) {
      if (error.exitCode === 0) return 0;
      return 2;
    }
    if (isInputError(error)) {
      sink.err(`plexus: error: ${printable(error.format())}\n`);
      return 2;
    }
    const stack = error instanceof Error ? (error.stack ?? error.message) : String(error);
    sink.err(`plexus: internal error (please report it):\n${stack}\n`);
    return 1;
  }
}
