/** A number for JSON: itself when finite, else null (JSON has no NaN or ±Infinity). */
export function finiteOrNull(value: number): number | null {
  return Number.isFinite(value) ? value : null;
}
