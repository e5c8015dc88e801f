import { printable } from "../io/printable.js";
import type { OutputSink } from "./outputSink.js";

/** Notes and warnings of a command on stderr, with the user's text made printable (control characters as \xHH). */
export function terminalLog(sink: OutputSink): { info(text: string): void; warn(text: string): void } {
  return {
    info: (text: string) => sink.err(`${printable(text)}\n`),
    warn: (text: string) => sink.err(`plexus: warning: ${printable(text)}\n`),
  };
}
