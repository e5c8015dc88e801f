import type { Command } from "commander";
import type { OutputSink } from "../outputSink.js";
import { registerAnalysisCommands } from "./analysisCommands.js";
import { registerReport } from "./report.js";
import { registerSimulate } from "./simulate.js";
import { registerPower } from "./power.js";
import { registerStrength } from "./strength.js";

/** Every subcommand registers itself here; each lives in its own file. */
export function registerCommands(program: Command, sink: OutputSink, argv: string[]): void {
  registerAnalysisCommands(program, sink, () => argv);
  registerSimulate(program, sink);
  registerPower(program, sink, () => argv);
  registerReport(program, sink);
  registerStrength(program, sink, () => argv);
}
