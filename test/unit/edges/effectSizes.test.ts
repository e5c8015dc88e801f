// Per-edge effect sizes (src/edges/effectSizes.ts) beyond what the R comparison
// (test/cli/effectSizes.test.ts) covers: solving the edges in order of t gives the same
// intervals as solving each alone (against R's uniroot on pt through the fixture's intervals);
// equal t's share one interval; non-finite and very large t's get none.
import { describe, expect, it } from "vitest";
import { MAX_INTERVAL_STATISTIC, noncentralIntervals } from "../../../src/edges/effectSizes.js";
import { expectClose } from "../../helpers/close.js";
import { loadFixture } from "../../helpers/fixtures.js";

const fixture = loadFixture<{ intervals: [number, number, number, number][] }>("r/effect_sizes.json");

describe("noncentralIntervals over many edges", () => {
  it("matches R's intervals (uniroot on pt) whatever the order and neighbours of the edges", () => {
    for (const df of [4, 26, 100]) {
      const rows = fixture.intervals.filter((r) => r[1] === df);
      // The fixture's t's, shuffled, each repeated and mixed with close neighbours and NaN.
      const t = Float64Array.from([...rows.map((r) => r[0]).reverse(), NaN, ...rows.map((r) => r[0] + 1e-3), ...rows.map((r) => r[0])]);
      const [low, high] = noncentralIntervals(t, df, 0.95);
      rows.forEach(([value, , l, h], k) => {
        const at = rows.length - 1 - k;
        for (const e of [at, 2 * rows.length + 1 + k]) {
          expectClose(low[e], l, { abs: 1e-9, rel: 1e-9, label: "δ_L vs R", inputs: { t: value, df } });
          expectClose(high[e], h, { abs: 1e-9, rel: 1e-9, label: "δ_U vs R", inputs: { t: value, df } });
        }
      });
      expect(low[rows.length]).toBeNaN();
      expect(high[rows.length]).toBeNaN();
    }
  });

  it("equal t's share their interval exactly; |t| above the limit gets none", () => {
    const t = Float64Array.from([2.5, -1, 2.5, MAX_INTERVAL_STATISTIC + 1, -Infinity, 2.5]);
    const [low, high] = noncentralIntervals(t, 30, 0.95);
    expect(low[2]).toBe(low[0]);
    expect(high[5]).toBe(high[0]);
    for (const e of [3, 4]) {
      expect(low[e]).toBeNaN();
      expect(high[e]).toBeNaN();
    }
    expect(low[1]).toBeLessThan(-1);
  });
});
