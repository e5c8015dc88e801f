import { InputError, type InputLocation } from "../errors.js";
import type { InferenceSpec } from "../common/inferenceOptions.js";

/**
 * The most levels threshold-free enhancement may sum over (the largest
 * statistic ÷ `inference.enhancement.step`). Each level costs one pass over
 * the edges above it in every relabeling, so this bounds the work a step can cause.
 */
export const ENHANCEMENT_LEVELS_LIMIT = 10_000;

/**
 * Checks, in preparation (the statistics are computed there for this), that the enhancement step gives at most ENHANCEMENT_LEVELS_LIMIT
 * levels up to the largest observed statistic; an InputError at the step's key otherwise.
 */
export function checkEnhancementLevels(statistic: ArrayLike<number>, inference: InferenceSpec, where: InputLocation): void {
  if (inference.method !== "threshold-free") return;
  let largest = 0;
  for (let e = 0; e < statistic.length; e++) {
    const size = Math.abs(statistic[e]);
    if (Number.isFinite(size) && size > largest) largest = size;
  }
  const step = inference.enhancement.step;
  const levels = largest / step;
  if (levels > ENHANCEMENT_LEVELS_LIMIT) {
    throw new InputError(
      `with step ${step}, the largest statistic (${largest.toPrecision(4)}) gives ${levels.toPrecision(3)} enhancement levels, more than the limit of ${ENHANCEMENT_LEVELS_LIMIT.toLocaleString("en-US")}`,
      where,
      `use a step of at least ${smallestStep(largest)} (0.1 is usual)`,
    );
  }
}

/** The smallest step of two significant digits that keeps the levels within the limit (as the user would type it). */
export function smallestStep(largest: number): string {
  const unit = 10 ** (Math.floor(Math.log10(largest / ENHANCEMENT_LEVELS_LIMIT)) - 1);
  let digits = Math.ceil(largest / ENHANCEMENT_LEVELS_LIMIT / unit);
  while (largest / Number((digits * unit).toPrecision(2)) > ENHANCEMENT_LEVELS_LIMIT) digits++;
  return String(Number((digits * unit).toPrecision(2)));
}
