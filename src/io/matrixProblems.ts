import { isInputError, type InputError } from "../errors.js";
import type { EdgeMajorWriter } from "./connectomeEdges.js";

/**
 * One subject's step of a matrix loader (read, parse, check, write its edges).
 * An InputError is kept in `problems` and the writer passes over the subject,
 * so a loader meets every bad matrix in one pass, in subject order; any other
 * error is a bug and is thrown.
 */
export function loadSubject(writer: EdgeMajorWriter, problems: InputError[], step: () => void): void {
  try {
    step();
  } catch (error) {
    if (!isInputError(error)) throw error;
    problems.push(error);
    writer.skip();
  }
}
