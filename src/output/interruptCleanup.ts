/**
 * Clean-up on Ctrl-C (SIGINT) and SIGTERM: while an output is being written,
 * its temporary folder and its lock are registered here; on either signal
 * every registered action runs (each may return a line to print), then the
 * process exits with 128 + the signal's number (130, 143). The handlers are
 * installed only while something is registered, so the default behaviour
 * returns as soon as nothing needs cleaning.
 */
type Action = () => string | void;

const actions = new Set<Action>();
const SIGNALS = { SIGINT: 130, SIGTERM: 143 } as const;
type Handled = keyof typeof SIGNALS;

function onSignal(signal: Handled): void {
  const notes: string[] = [];
  for (const action of [...actions].reverse()) {
    try {
      const note = action();
      if (note) notes.push(note);
    } catch {
      // keep cleaning: one failed removal must not stop the others
    }
  }
  actions.clear();
  process.stderr.write(`plexus: interrupted by ${signal}${notes.length > 0 ? `; ${notes.join("; ")}` : ""}\n`);
  process.exit(SIGNALS[signal]);
}

const listeners = { SIGINT: () => onSignal("SIGINT"), SIGTERM: () => onSignal("SIGTERM") };

/** Registers a clean-up action for SIGINT and SIGTERM; returns the function that unregisters it. */
export function onInterrupt(action: Action): () => void {
  if (actions.size === 0) for (const signal of Object.keys(listeners) as Handled[]) process.on(signal, listeners[signal]);
  actions.add(action);
  return () => {
    if (!actions.delete(action)) return;
    if (actions.size === 0) for (const signal of Object.keys(listeners) as Handled[]) process.off(signal, listeners[signal]);
  };
}
