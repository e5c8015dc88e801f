import type { InputError } from "../errors.js";

/** Loads blocks of one job on one thread (holding its reader and buffers between blocks). */
export interface BlockLoader {
  /**
   * Reads and writes the subjects of `block`, in order, and returns the problem
   * with each bad matrix (in subject order); throws a problem that stops the
   * whole block (e.g. a stack that cannot be opened) or a bug.
   */
  load(block: number): InputError[];
  close(): void;
}
