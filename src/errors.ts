/**
 * The located input error: the one kind of failure a user can cause and fix.
 * The CLI prints its message alone (no stack) and exits with code 2; anything
 * else is a bug and exits with code 1 and a stack trace.
 */
export interface InputLocation {
  /** File the problem is in, as the user named it (or resolved path). */
  file?: string;
  /** 1-based line in that file. */
  line?: number;
  /** 1-based column (or matrix column) in that file. */
  column?: number;
  /** Design-file key, e.g. `inference.threshold` or `contrasts.patient_gt_control`. */
  key?: string;
}

export class InputError extends Error {
  readonly location: InputLocation;
  /** Optional advice on what to do, printed after the message. */
  readonly hint?: string;
  /** Further problems found in the same pass, printed one per line after this one (see `inputErrors`). */
  readonly also: readonly InputError[];
  /** Problems found but not listed (beyond the cap). */
  readonly unlisted: number;

  constructor(message: string, location: InputLocation = {}, hint?: string, also: readonly InputError[] = [], unlisted = 0) {
    super(message);
    this.name = "InputError";
    this.location = location;
    this.hint = hint;
    this.also = also;
    this.unlisted = unlisted;
  }

  /** Every problem this error reports: itself first, then the others found in the same pass. */
  get problems(): readonly InputError[] {
    return [this, ...this.also];
  }

  /**
   * `file:line:column: key: message` followed by the hint, as the CLI prints it;
   * further problems follow one per line, then how many there are in all.
   */
  format(): string {
    if (this.also.length === 0 && this.unlisted === 0) return this.formatOne();
    const total = 1 + this.also.length + this.unlisted;
    const tail = this.unlisted > 0 ? `… and ${this.unlisted} more (${total} problems in all)` : `(${total} problems in all)`;
    return [this.formatOne(), ...this.also.map((problem) => problem.formatOne()), tail].join("\n");
  }

  private formatOne(): string {
    const where: string[] = [];
    const { file, line, column, key } = this.location;
    if (file !== undefined) {
      let place = file;
      if (line !== undefined) place += `:${line}`;
      if (column !== undefined) place += `:${column}`;
      where.push(place);
    }
    if (key !== undefined) where.push(`key '${key}'`);
    const head = where.length > 0 ? `${where.join(", ")}: ` : "";
    return this.hint ? `${head}${this.message}\n  ${this.hint}` : `${head}${this.message}`;
  }
}

/** At most this many problems are listed in one error; the rest are counted. */
export const LISTED_PROBLEMS = 20;

/**
 * One error reporting several problems found in one pass, in the order given:
 * the first is the error's own message and place, the next up to `cap − 1`
 * are listed after it, and any beyond are counted. Null when there are none.
 */
export function inputErrors(problems: readonly InputError[], cap = LISTED_PROBLEMS): InputError | null {
  const flat = problems.flatMap((problem) => problem.problems);
  const unlisted = problems.reduce((sum, problem) => sum + problem.unlisted, 0) + Math.max(0, flat.length - cap);
  if (flat.length === 0) return null;
  if (flat.length === 1 && unlisted === 0) return flat[0];
  const [first, ...rest] = flat;
  return new InputError(first.message, first.location, first.hint, rest.slice(0, cap - 1), unlisted);
}

export function isInputError(error: unknown): error is InputError {
  return error instanceof InputError;
}
