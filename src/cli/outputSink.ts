/** Where the CLI writes; tests pass their own to capture output without touching stdout. */
export interface OutputSink {
  out(text: string): void;
  err(text: string): void;
  /** True when stderr is a terminal (progress bars), false for plain lines. */
  errIsTerminal: boolean;
}

export const processSink: OutputSink = {
  out: (text) => process.stdout.write(text),
  err: (text) => process.stderr.write(text),
  errIsTerminal: Boolean(process.stderr.isTTY),
};
