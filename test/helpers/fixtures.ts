// Typed readers for the reference fixtures in test/fixtures/ (see the README in each folder
// for what made each file). JSON has no NaN or infinities: the R fixtures write them as the
// strings "NaN", "Infinity", "-Infinity" and R's NA as null; `toNumber` turns all of these
// back into numbers (null -> NaN). NIST certified values are kept as the printed strings.
import { readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

const FIXTURES = join(dirname(fileURLToPath(import.meta.url)), "..", "fixtures");

/** A number as stored in a fixture: a JSON number, a non-finite or printed number as text, or null for NA. */
export type FixtureNumber = number | string | null;

/** Reads a fixture number back: "Infinity" -> Infinity, "0.42E-03" -> 0.00042, null -> NaN. */
export function toNumber(value: FixtureNumber): number {
  if (value === null) return NaN;
  return typeof value === "number" ? value : Number(value);
}

export function toNumbers(values: readonly FixtureNumber[]): Float64Array {
  return Float64Array.from(values, toNumber);
}

/** Parses test/fixtures/<relativePath>. */
export function loadFixture<T>(relativePath: string): T {
  return JSON.parse(readFileSync(join(FIXTURES, relativePath), "utf8")) as T;
}

// ---- test/fixtures/nist/{norris,longley,pontius}.json (NIST StRD linear regression) ----

export interface NistCertified {
  /** b0 (intercept), b1, ..., bk: as printed by NIST, e.g. "-0.358191792925910E-01". */
  coefficients: string[];
  standard_errors: string[];
  residual_sd: string;
  r_squared: string;
  residual_df: number;
  anova: {
    regression: { df: number; sum_of_squares: string; mean_square: string; f_statistic: string };
    residual: { df: number; sum_of_squares: string; mean_square: string };
  };
}

export interface NistDataset {
  source: string;
  reference: string;
  difficulty: "lower" | "average" | "higher";
  retrieved_via: string;
  model: string;
  /** Names of the predictor columns of `x` (the intercept is not a column). */
  columns: string[];
  column_meaning?: Record<string, string>;
  n: number;
  /** n rows of predictors, without the intercept column. */
  x: number[][];
  y: number[];
  certified: NistCertified;
}

export const loadNist = (name: "norris" | "longley" | "pontius"): NistDataset =>
  loadFixture<NistDataset>(`nist/${name}.json`);

// ---- test/fixtures/r/*.json and test/fixtures/published/*.json (written by r/runner.R) ----

export interface RFixtureHeader {
  generated_by: string;
  r_version: string;
  seed: number;
  rng_kind: string[];
  number_format: string;
  description: string;
}

export interface TTailRow {
  df: number;
  t: number;
  /** pt(t, df) */
  lower: number;
  /** pt(t, df, lower.tail = FALSE) */
  upper: number;
  /** natural logs of the two tails (log.p = TRUE) */
  log_lower: number;
  log_upper: number;
}

export interface TTailsFixture extends RFixtureHeader {
  degrees_of_freedom: number[];
  t_values: number[];
  probabilities: number[];
  tails: TTailRow[];
  deep_tail: TTailRow[];
  /** q = qt(p, df) */
  quantiles: { df: number; p: number; q: number }[];
}

export interface PAdjustCase {
  name: string;
  n: number;
  /** Number of non-NA p-values: R's number of tests. */
  n_finite: number;
  p: (number | null)[];
  bh: (number | null)[];
  by: (number | null)[];
}

export interface PAdjustFixture extends RFixtureHeader {
  cases: PAdjustCase[];
}

export interface ContrastResult {
  name: string;
  c: number[];
  estimate: number;
  se: number;
  t: number;
  df: number;
  p_two_sided: number;
  p_upper: number;
  partial_r: number;
}

export interface LmFit {
  response: "y1" | "y2" | "y3";
  coefficients: number[];
  standard_errors: number[];
  residual_sd: number;
  residual_df: number;
  rss: number;
  contrasts: ContrastResult[];
}

export interface LmModel {
  formula: string;
  model_matrix: { columns: string[]; assign: number[]; term_labels: string[]; rows: number[][] };
  fits: LmFit[];
}

export interface LmContrastsFixture extends RFixtureHeader {
  levels: { group: string[]; site: string[]; sex: string[] };
  coding: string;
  data: {
    participant_id: string[];
    group: string[];
    site: string[];
    age: number[];
    sex: string[];
    y1: number[];
    y2: number[];
    y3: number[];
  };
  models: LmModel[];
}

export interface Bh1995Fixture extends RFixtureHeader {
  source: string;
  confirmed_from: string[];
  not_checked: string;
  q: number;
  rejected_at_q: number;
  p: number[];
  r_p_adjust_bh: number[];
  r_rejected_at_q: number;
}

export interface TCriticalRow {
  /** "Infinity" for the table's last row (the normal limit). */
  df: number | "Infinity";
  table: number[];
  table_printed: string[];
  r_qt: number[];
  table_minus_r: number[];
  beyond_rounding: boolean[];
}

export interface TCriticalValuesFixture extends RFixtureHeader {
  source: string;
  retrieved_via: string;
  decimals: number;
  upper_tail: number[];
  lower_tail: number[];
  rows: TCriticalRow[];
  max_abs_difference: number;
  max_abs_difference_where: { df: number | "Infinity"; upper_tail: number };
  entries_beyond_rounding: number;
}
