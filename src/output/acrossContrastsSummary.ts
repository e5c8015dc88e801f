import { finiteOrNull } from "../common/finiteOrNull.js";
import { criticalValue } from "../inference/familywiseP.js";
import type { AnalysisResults } from "./analysisResults.js";
import { FAMILY_NULL_FILE } from "./nullTable.js";

/**
 * summary.json's `across_contrasts`: with `inference.across_contrasts`, the
 * contrasts of the family, the file of its null (row-wise maxima over them)
 * and the critical values at alpha that every contrast shares; null without.
 */
export function acrossContrastsSummary(results: AnalysisResults): Record<string, unknown> | null {
  const { familyNull, prepared, contrasts, nulls } = results;
  if (!familyNull) return null;
  const { inference } = prepared.design;
  const plan = nulls.find((n) => n !== undefined)?.setup.context.plan;
  const exact = plan?.exact ?? false;
  const enhanced = familyNull.extraNames.indexOf("max_enhanced");
  return {
    contrasts: contrasts.map((c) => c.contrast.name),
    null_file: FAMILY_NULL_FILE,
    mode: exact ? "exact" : "monte-carlo",
    permutations: familyNull.maxExtent.length,
    critical_size: finiteOrNull(criticalValue(inference.size === "mass" ? familyNull.maxMass : familyNull.maxExtent, inference.alpha, exact)),
    critical_size_measure: inference.size,
    critical_statistic: finiteOrNull(criticalValue(familyNull.maxStatistic, inference.alpha, exact)),
    ...(enhanced >= 0 ? { critical_enhanced: finiteOrNull(criticalValue(familyNull.extra[enhanced], inference.alpha, exact)) } : {}),
  };
}

/** A contrast's `p_fwe_null`: the file, in the results folder, of the null its p_FWE come from. */
export function familywiseNullFile(results: AnalysisResults, contrastName: string): string {
  return results.familyNull ? FAMILY_NULL_FILE : `${contrastName}/null.tsv`;
}
