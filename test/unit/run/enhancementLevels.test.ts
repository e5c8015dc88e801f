// The step that `plexus` suggests when threshold-free enhancement would need too many levels must
// itself be accepted: checked here over many largest statistics (fast-check), by the limit's own
// definition (largest ÷ step ≤ 10,000), and against a worked case found by hand.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { ENHANCEMENT_LEVELS_LIMIT, smallestStep } from "../../../src/run/enhancementLevels.js";

describe("smallestStep(largest)", () => {
  it("is accepted and at most one unit in the second digit above largest / 10,000 (fast-check)", () => {
    fc.assert(
      fc.property(fc.double({ min: 1e-3, max: 1e4, noNaN: true }), (largest) => {
        const step = Number(smallestStep(largest));
        expect(largest / step).toBeLessThanOrEqual(ENHANCEMENT_LEVELS_LIMIT);
        expect(step).toBeGreaterThanOrEqual(largest / ENHANCEMENT_LEVELS_LIMIT);
        const unit = 10 ** (Math.floor(Math.log10(step)) - 1);
        expect(step - largest / ENHANCEMENT_LEVELS_LIMIT).toBeLessThanOrEqual(1.0000001 * unit);
      }),
      { seed: 12, numRuns: 2000 },
    );
  });

  it("rounds up: a largest statistic of 7.7081 gives 0.00078, not 0.00077 (worked by hand: 7.7081 / 0.00077 = 10,010.5 > 10,000)", () => {
    expect(smallestStep(7.7081)).toBe("0.00078");
  });
});
