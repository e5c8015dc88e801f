import { InputError } from "../errors.js";
import { jointNull } from "../inference/jointNull.js";
import type { ContrastInference, ContrastNull, ObservedContrast } from "../output/contrastResults.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import type { NullChunk } from "../permute/nullRangeTypes.js";
import { relabelingIdentity } from "../permute/sharedRelabelings.js";
import { contrastInference } from "./permutationInference.js";

/**
 * Every contrast's permutation results, from its own null or, with
 * `inference.across_contrasts`, from the family null (the row-wise maxima over
 * the contrasts, inference/jointNull.ts). Used by `run` and by the shard merge
 * alike, so both write the same bytes.
 */
export function inferContrasts(
  prepared: PreparedAnalysis,
  contrasts: ObservedContrast[],
  nulls: (ContrastNull | undefined)[],
): { inferred: ContrastInference[]; familyNull?: NullChunk } {
  const { inference, file } = prepared.design;
  const drawn = nulls.filter((n): n is ContrastNull => n !== undefined);
  if (!inference.acrossContrasts || drawn.length === 0 || drawn.length !== nulls.length) {
    return { inferred: contrasts.map((observed, i) => contrastInference(inference, observed, nulls[i], prepared.pairs)) };
  }
  // The design checks (permute/sharedRelabelings.ts) make the plans agree; this guards the joint null itself.
  const identity = relabelingIdentity(drawn[0].setup.context.plan);
  const differing = drawn.findIndex((n) => relabelingIdentity(n.setup.context.plan) !== identity);
  if (differing >= 0) {
    throw new InputError(
      `'inference.across_contrasts' needs the same relabelings for every contrast, but '${contrasts[differing].contrast.name}' draws other relabelings than '${contrasts[0].contrast.name}'`,
      { file, key: "inference.across_contrasts", line: prepared.design.lines.get("inference.across_contrasts") },
    );
  }
  const familyNull = jointNull(drawn.map((n) => n.rows));
  return {
    inferred: contrasts.map((observed, i) => contrastInference(inference, observed, { setup: nulls[i]!.setup, rows: familyNull }, prepared.pairs)),
    familyNull,
  };
}
