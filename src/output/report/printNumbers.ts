/**
 * Numbers for print (tables, figures, the methods paragraph); the TSV twins
 * keep full precision. Missing or non-finite values print as an em dash.
 * Conventions (common practice, e.g. APA style; no single source): p-values
 * to three decimals with "< 0.001" below that; statistics to two decimals;
 * effect estimates to three significant digits; a mean and SD to the decimal
 * place of the SD's second significant digit.
 */
export const MISSING = "—";

/** Fixed decimals, with "-0.00" printed as "0.00". */
export function fixed(value: number, decimals: number): string {
  if (!Number.isFinite(value)) return MISSING;
  const text = value.toFixed(decimals);
  return /^-0(\.0*)?$/.test(text) ? text.slice(1) : text;
}

/** p-value: three decimals, "< 0.001" below 0.001. */
export function pValue(p: number): string {
  if (!Number.isFinite(p)) return MISSING;
  if (p < 0.001) return "< 0.001";
  return p.toFixed(3);
}

/** `digits` significant digits; values at or above 10^digits print as whole numbers, tiny ones in e-notation. */
export function significant(value: number, digits = 3): string {
  if (!Number.isFinite(value)) return MISSING;
  if (value === 0) return "0";
  if (Math.abs(value) >= 10 ** digits) return String(Math.round(value));
  const text = value.toPrecision(digits);
  if (text.includes("e")) {
    const [mantissa, exponent] = text.split("e");
    return `${mantissa}e${Number(exponent)}`;
  }
  return text;
}

/** A whole number, or `significant` for a non-integer (e.g. a component mass). */
export function count(value: number): string {
  if (!Number.isFinite(value)) return MISSING;
  return Number.isInteger(value) ? String(value) : significant(value);
}

/** Decimals that show the second significant digit of `spread` (0 to 4). */
export function decimalsFor(spread: number): number {
  if (!(spread > 0) || !Number.isFinite(spread)) return 1;
  return Math.max(0, Math.min(4, 1 - Math.floor(Math.log10(spread))));
}

export function percent(part: number, whole: number): string {
  return whole > 0 ? `${((100 * part) / whole).toFixed(1)}%` : MISSING;
}

/** A value from a design or summary (threshold, alpha): shortest form. */
export function plain(value: number): string {
  return Number.isFinite(value) ? String(value) : MISSING;
}
