import type { BlockPermutation } from "../common/inferenceOptions.js";
import type { NullSetup } from "../permute/nullContext.js";

/** How a null distribution was drawn, as summary.json states it (runs and strength analyses alike). */
export function relabelingSummary(
  setup: NullSetup,
  blocks: { column: string; labels: string[] } | undefined,
  blockPermutation: BlockPermutation,
): Record<string, unknown> {
  const { plan } = setup.context;
  return {
    mode: plan.exact ? "exact" : "monte-carlo",
    permutations: plan.count,
    distinct_relabelings: Number.isFinite(plan.distinct) ? plan.distinct : null,
    scheme: setup.scheme,
    scheme_reason: setup.schemeReason,
    seed: plan.seed,
    exchangeability_blocks: blocks ? { column: blocks.column, count: blocks.labels.length, permutation: blockPermutation } : null,
  };
}

/** The smallest p-value the relabelings can give: 1/M exact, 1/(K + 1) Monte Carlo. */
export function smallestPossibleP(setup: NullSetup): number {
  const { plan } = setup.context;
  return plan.exact ? 1 / plan.count : 1 / (plan.count + 1);
}
