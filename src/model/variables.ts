import { InputError, type InputLocation } from "../errors.js";

/**
 * How each model variable is coded. A column is categorical when any value
 * is not a number, or when the design names it under `levels:` (for
 * numeric-coded factors such as site 1..3). Default level order: numeric when
 * every level is a number, else by code point; the first level is the
 * reference of treatment coding.
 */
export type Variable =
  | { name: string; kind: "numeric"; values: Float64Array; center: number }
  | { name: string; kind: "factor"; levels: string[]; codes: Int32Array };

export interface VariableSource {
  /** Values of the kept subjects, in subject order; no nulls remain after listwise deletion. */
  values: string[];
  /** 1-based line in the participants file of each kept subject, for errors. */
  lines: number[];
  file: string;
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export function isNumericText(text: string): boolean {
  return NUMBER.test(text.trim());
}

export function compareLevels(a: string, b: string): number {
  if (isNumericText(a) && isNumericText(b)) return Number(a) - Number(b);
  return a < b ? -1 : a > b ? 1 : 0;
}

export function codeVariable(
  name: string,
  source: VariableSource,
  options: { levels?: string[]; center: boolean; levelsKey: InputLocation; centerKey: InputLocation },
): Variable {
  const { values } = source;
  const categorical = options.levels !== undefined || values.some((v) => !isNumericText(v));
  if (!categorical) {
    const numbers = Float64Array.from(values, (v) => Number(v));
    const overflow = numbers.findIndex((v) => !Number.isFinite(v));
    if (overflow >= 0) {
      throw new InputError(
        `'${name}' has the value '${values[overflow]}', which is not a finite number`,
        { file: source.file, line: source.lines[overflow] },
        "correct the participants table",
      );
    }
    const first = numbers[0];
    if (numbers.every((v) => v === first)) {
      throw new InputError(
        `the model column '${name}' has one value (${values[0]}) in every kept subject, so it cannot be estimated`,
        { file: source.file, key: "model" },
        "remove it from the model",
      );
    }
    let center = 0;
    if (options.center) {
      let sum = 0;
      for (const v of numbers) sum += v;
      center = sum / numbers.length;
      for (let i = 0; i < numbers.length; i++) numbers[i] -= center;
    }
    return { name, kind: "numeric", values: numbers, center };
  }
  if (options.center) {
    throw new InputError(`'${name}' is categorical and cannot be centred`, options.centerKey);
  }
  let levels: string[];
  if (options.levels) {
    levels = options.levels;
    for (let i = 0; i < values.length; i++) {
      if (!levels.includes(values[i])) {
        throw new InputError(
          `'${name}' has the value '${values[i]}', which is not among the levels given in the design (${levels.join(", ")})`,
          { file: source.file, line: source.lines[i] },
          "add it to `levels:` or correct the participants table",
        );
      }
    }
  } else {
    const distinct = [...new Set(values)];
    // Numeric order only when every level is a number; otherwise code-point order (a consistent total order).
    levels = distinct.every(isNumericText)
      ? distinct.sort((a, b) => Number(a) - Number(b) || (a < b ? -1 : a > b ? 1 : 0))
      : distinct.sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  }
  const codes = Int32Array.from(values, (v) => levels.indexOf(v));
  const counts = levels.map((_, k) => codes.filter((c) => c === k).length);
  const empty = levels.filter((_, k) => counts[k] === 0);
  if (empty.length > 0) {
    throw new InputError(
      `level${empty.length > 1 ? "s" : ""} ${empty.map((l) => `'${l}'`).join(", ")} of '${name}' ha${empty.length > 1 ? "ve" : "s"} no kept subject`,
      options.levelsKey,
      "remove the level from `levels:` or check the participants table (subjects with missing values are dropped)",
    );
  }
  if (levels.length < 2) {
    throw new InputError(
      `the factor '${name}' has one level ('${levels[0]}') in every kept subject, so it cannot be estimated`,
      { file: source.file, key: "model" },
      "remove it from the model",
    );
  }
  return { name, kind: "factor", levels, codes };
}
