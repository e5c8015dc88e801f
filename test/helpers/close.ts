// Tolerance comparison for numerical tests: |actual - expected| <= abs + rel * |expected|.
// Every call states its tolerance; a failure throws an Error that prints the label, the
// inputs, expected, actual, difference and tolerance (and the index, for arrays), so a
// red test says by how much it missed without a rerun.

/** Machine epsilon of binary64, 2^-52: write tolerances as k * EPS. */
export const EPS = Number.EPSILON;

/** At least one of `rel` and `abs` must be given; the other defaults to 0. */
export type Tolerance = { rel: number; abs?: number } | { rel?: number; abs: number };

export type CloseOptions = Tolerance & {
  /** What is being compared, e.g. "Longley b1 vs NIST certified value". */
  label?: string;
  /** The inputs that produced `actual`; printed as JSON on failure. */
  inputs?: unknown;
};

const MAX_INPUTS_CHARS = 2000;

/** True when `actual` is within `abs + rel * |expected|` of `expected`; NaN matches only NaN, an infinity only itself. */
export function isClose(actual: number, expected: number, rel: number, abs: number): boolean {
  if (Number.isNaN(actual) || Number.isNaN(expected)) {
    return Number.isNaN(actual) && Number.isNaN(expected);
  }
  if (actual === expected) return true; // covers equal infinities
  if (!Number.isFinite(actual) || !Number.isFinite(expected)) return false; // an infinity only matches itself
  return Math.abs(actual - expected) <= abs + rel * Math.abs(expected);
}

/** Throws unless `actual` is within the stated tolerance of `expected`. */
export function expectClose(actual: number, expected: number, options: CloseOptions): void {
  const { rel, abs } = readTolerance(options);
  if (isClose(actual, expected, rel, abs)) return;
  throw new Error(
    [
      `expectClose failed${options.label ? `: ${options.label}` : ""}`,
      ...describeMiss(actual, expected, rel, abs),
      ...describeInputs(options.inputs),
    ].join("\n"),
  );
}

/** Throws unless both arrays have the same length and every element is within tolerance. */
export function expectAllClose(
  actual: ArrayLike<number>,
  expected: ArrayLike<number>,
  options: CloseOptions,
): void {
  const { rel, abs } = readTolerance(options);
  const title = `expectAllClose failed${options.label ? `: ${options.label}` : ""}`;
  if (actual.length !== expected.length) {
    throw new Error(
      [
        title,
        `  length:     expected ${expected.length}, actual ${actual.length}`,
        ...describeInputs(options.inputs),
      ].join("\n"),
    );
  }
  let first = -1;
  let worst = -1;
  let worstExcess = -Infinity;
  let failing = 0;
  for (let i = 0; i < expected.length; i++) {
    if (isClose(actual[i], expected[i], rel, abs)) continue;
    failing++;
    if (first < 0) first = i;
    const over = Math.abs(actual[i] - expected[i]) - (abs + rel * Math.abs(expected[i]));
    const excess = Number.isNaN(over) ? Infinity : over; // a NaN or infinite miss counts as worst
    if (worst < 0 || excess > worstExcess) {
      worst = i;
      worstExcess = excess;
    }
  }
  if (failing === 0) return;
  const lines = [
    title,
    `  index:      [${first}] (first of ${failing} failing element(s) out of ${expected.length})`,
    ...describeMiss(actual[first], expected[first], rel, abs),
  ];
  if (worst !== first) {
    lines.push(
      `  worst:      [${worst}]`,
      ...describeMiss(actual[worst], expected[worst], rel, abs).map((line) => `  ${line}`),
    );
  }
  lines.push(...describeInputs(options.inputs));
  throw new Error(lines.join("\n"));
}

function readTolerance(options: CloseOptions): { rel: number; abs: number } {
  const rel = options.rel ?? 0;
  const abs = options.abs ?? 0;
  if (options.rel === undefined && options.abs === undefined) {
    throw new Error("close.ts: state a tolerance (rel and/or abs)");
  }
  if (!(rel >= 0) || !(abs >= 0)) {
    throw new Error(`close.ts: tolerances must be non-negative numbers (rel=${rel}, abs=${abs})`);
  }
  return { rel, abs };
}

function describeMiss(actual: number, expected: number, rel: number, abs: number): string[] {
  const difference = Math.abs(actual - expected);
  const relative = expected === 0 ? NaN : difference / Math.abs(expected);
  const allowed = abs + rel * Math.abs(expected);
  return [
    `  expected:   ${formatNumber(expected)}`,
    `  actual:     ${formatNumber(actual)}`,
    `  difference: ${formatNumber(difference)} (relative ${formatNumber(relative)})`,
    `  tolerance:  ${formatNumber(allowed)} = abs ${formatNumber(abs)} + rel ${formatNumber(rel)} * |expected|`,
  ];
}

function describeInputs(inputs: unknown): string[] {
  if (inputs === undefined) return [];
  let text = toJson(inputs);
  if (text.length > MAX_INPUTS_CHARS) {
    text = `${text.slice(0, MAX_INPUTS_CHARS)}... (${text.length} characters in all)`;
  }
  return [`  inputs:     ${text}`];
}

/** Shortest text that reads back as the same double (with the sign of zero kept). */
function formatNumber(x: number): string {
  return Object.is(x, -0) ? "-0" : String(x);
}

/** JSON that keeps typed arrays as arrays and shows NaN, ±Infinity and bigint as text. */
function toJson(value: unknown): string {
  try {
    const text = JSON.stringify(value, (_key, v: unknown) => {
      if (typeof v === "number" && !Number.isFinite(v)) return String(v);
      if (typeof v === "bigint") return `${v}n`;
      if (ArrayBuffer.isView(v) && !(v instanceof DataView)) {
        return Array.from(v as unknown as ArrayLike<number | bigint>, (e) =>
          typeof e === "bigint" ? `${e}n` : Number.isFinite(e) ? e : String(e),
        );
      }
      return v;
    });
    return text ?? String(value);
  } catch (error) {
    return `(not printable as JSON: ${(error as Error).message})`;
  }
}
