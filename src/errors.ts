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

  constructor(message: string, location: InputLocation = {}, hint?: string) {
    super(message);
    this.name = "InputError";
    this.location = location;
    this.hint = hint;
  }

  /** `file:line:column: key: message` followed by the hint, as the CLI prints it. */
  format(): string {
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

export function isInputError(error: unknown): error is InputError {
  return error instanceof InputError;
}
