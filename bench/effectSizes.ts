// Cost of the per-edge noncentral t intervals behind Cohen's d's confidence interval
// (src/edges/effectSizes.ts noncentralIntervals), for the 79,800 edges of 400 regions.
// Run: npx tsc -p bench/tsconfig.json && node bench/.build/bench/effectSizes.js
// Not part of `npm run bench`'s scenarios: a one-off measurement of this step alone.
import { noncentralIntervals } from "../src/edges/effectSizes.js";
import { noncentralityInterval } from "../src/statistics/noncentralT.js";

const EDGES = 79_800;
for (const df of [26, 196, 2000]) {
  // t values like an analysis's: mostly null, a planted tail up to |t| = 12 (a fixed, seedless pattern).
  const t = new Float64Array(EDGES);
  for (let e = 0; e < EDGES; e++) {
    const u = ((e * 2654435761) % 2 ** 32) / 2 ** 32;
    t[e] = e % 100 === 0 ? 12 * (u - 0.5) * 2 : 3.5 * (u - 0.5) * 2;
  }
  noncentralIntervals(t.subarray(0, 1000), df, 0.95); // warm-up
  const start = process.hrtime.bigint();
  const [low, high] = noncentralIntervals(t, df, 0.95);
  const ms = Number(process.hrtime.bigint() - start) / 1e6;
  let bad = 0;
  for (let e = 0; e < EDGES; e++) if (!(low[e] < high[e])) bad++;
  // Every 97th edge solved alone (no continuation): the largest difference.
  let worst = 0;
  for (let e = 0; e < EDGES; e += 97) {
    const [l, h] = noncentralityInterval(t[e], df, 0.95);
    worst = Math.max(worst, Math.abs(l - low[e]), Math.abs(h - high[e]));
  }
  console.log(
    `df ${df}: ${EDGES} edges in ${ms.toFixed(0)} ms (${((1000 * ms) / EDGES).toFixed(1)} µs an edge), ${bad} without an interval; ` +
      `largest difference from edges solved alone ${worst.toExponential(1)}`,
  );
}
