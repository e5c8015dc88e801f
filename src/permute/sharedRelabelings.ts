import { InputError, type InputLocation } from "../errors.js";
import type { InferenceSpec } from "../common/inferenceOptions.js";
import type { Contrast } from "../model/contrast.js";
import type { RelabelingPlan, SchemeKind } from "./relabelings.js";

// Error control across contrasts (`inference.across_contrasts`) takes, for each relabeling k, the maxima
// of every contrast (Winkler et al. 2016, Hum. Brain Mapp. 37:1486, the joint null of the maxima). That
// is a valid joint null only when relabeling k is the same rearrangement of the subjects for every contrast.

/**
 * Checks, before any statistic is computed, that the contrasts can share
 * their relabelings: permutations are drawn (not method fdr), every contrast
 * is a t contrast (an F statistic is on another scale and has no maximum
 * comparable with t's), and every contrast gets the same scheme (the rest of
 * the plan — design rows, blocks, seed and count — is the design's, shared
 * by construction). An InputError at `inference.across_contrasts` otherwise;
 * a note (returned) when there is one contrast only.
 */
export function checkSharedRelabelings(options: {
  contrasts: Contrast[];
  /** Each contrast's scheme, as checkRelabelings (exchangeability.ts) chose it; read only when permutations are drawn. */
  schemes: readonly SchemeKind[];
  inference: InferenceSpec;
  where: (key: string) => InputLocation;
}): string | undefined {
  const { inference, contrasts } = options;
  if (!inference.acrossContrasts) return undefined;
  const at = options.where("inference.across_contrasts");
  if (inference.method === "fdr") {
    throw new InputError(
      "'inference.across_contrasts' takes the largest statistic of each relabeling over the contrasts, but method fdr draws no relabelings",
      at,
      "use `method: components`, `max-t` or `threshold-free`, or remove `across_contrasts`",
    );
  }
  const fContrasts = contrasts.filter((c) => c.kind === "F");
  if (fContrasts.length > 0) {
    throw new InputError(
      `'inference.across_contrasts' needs t contrasts only, whose maxima share one scale; ${fContrasts.map((c) => `'${c.name}'`).join(", ")} ${fContrasts.length > 1 ? "are F contrasts" : "is an F contrast"}`,
      at,
      "split the F contrast into t contrasts, or test it in a design of its own",
    );
  }
  const { schemes } = options;
  if (new Set(schemes).size > 1) {
    const named = (scheme: string) => contrasts.filter((_, k) => schemes[k] === scheme).map((c) => `'${c.name}'`).join(", ");
    throw new InputError(
      `'inference.across_contrasts' needs the same relabelings for every contrast, but ${named("sign-flip")} would be tested by sign flips and ${named("permute")} by permutation`,
      at,
      "set `scheme: sign-flip` for all contrasts (valid when the errors are symmetric), or test the contrasts in separate designs",
    );
  }
  if (contrasts.length < 2) return "'inference.across_contrasts' has no effect with a single contrast: its p-values are corrected over the network only";
  return undefined;
}

/** What makes relabeling k the same rearrangement of the subjects: two plans that agree here give identical relabelings. */
export function relabelingIdentity(plan: RelabelingPlan): string {
  return JSON.stringify([plan.kind, plan.subjects, plan.rowTypes, plan.blocks, plan.wholeBlocks, plan.seed, plan.exact, plan.count]);
}
