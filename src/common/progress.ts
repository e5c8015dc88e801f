// How long work reports its progress. The work takes a Progress as a parameter; the command line supplies
// the terminal one (cli/progress.ts), tests and libraries the silent one.

/**
 * Progress of a long piece of work (relabelings, cohorts, measures): started
 * with a total, advanced as parts finish, finished once.
 */
export interface Progress {
  /** `unit` names what is counted (default "relabelings"). */
  start(label: string, total: number, unit?: string): void;
  /** `restored` counts work taken from a checkpoint: it moves the bar but not the rate. */
  advance(count: number, restored?: boolean): void;
  finish(): void;
}

export const silentProgress: Progress = { start() {}, advance() {}, finish() {} };

