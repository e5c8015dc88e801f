import { MAX_INTERVAL_STATISTIC } from "../edges/effectSizes.js";
import type { ObservedContrast } from "./contrastResults.js";
import type { EdgeColumns, ExtraEdgeColumn } from "./edgeColumns.js";

/** The effect-size columns of a t contrast's edges.tsv, in order, after partial_r and standard_error. */
export const EFFECT_SIZE_COLUMNS = ["ci_low", "ci_high", "cohens_d", "cohens_d_ci_low", "cohens_d_ci_high"] as const;

/** The column of a level's mean on the correlation scale, e.g. r_patient. */
export function levelMeanColumn(level: string): string {
  return `r_${level}`;
}

/**
 * The extra edge columns of a t contrast's effect sizes: the estimate's
 * interval, Cohen's d and its interval (empty cells when the contrast does not
 * compare two levels of a factor), then r_<first> and r_<second> when the
 * levels' means were back-transformed (Fisher z edges). None for F contrasts.
 */
export function effectSizeColumns(observed: ObservedContrast): ExtraEdgeColumn[] {
  const effects = observed.effects;
  if (!effects) return [];
  const empty = new Float64Array(effects.ciLow.length).fill(NaN);
  const d = effects.cohensD;
  const columns: ExtraEdgeColumn[] = [
    { name: "ci_low", values: effects.ciLow },
    { name: "ci_high", values: effects.ciHigh },
    { name: "cohens_d", values: d ? d.d : empty },
    { name: "cohens_d_ci_low", values: d ? d.low : empty },
    { name: "cohens_d_ci_high", values: d ? d.high : empty },
  ];
  if (effects.means && effects.comparison) {
    columns.push(
      { name: levelMeanColumn(effects.comparison.first), values: effects.means.first },
      { name: levelMeanColumn(effects.comparison.second), values: effects.means.second },
    );
  }
  return columns;
}

/** summary.json's `effect_sizes` block: what was computed for each t contrast, and how. */
export function effectSizesSummary(contrasts: ObservedContrast[]): Record<string, unknown> | null {
  const withEffects = contrasts.filter((c) => c.effects);
  if (withEffects.length === 0) return null;
  const level = withEffects[0].effects!.level;
  return {
    confidence_level: level,
    estimate_interval: "two-sided, whatever inference.tail: estimate ± t quantile (1 + level)/2 with the residual degrees of freedom × standard error",
    cohens_d: {
      applies_to: "t contrasts comparing two levels of one factor that enters the model as a main effect only",
      standardiser: "residual standard deviation of the full model (√(SSE / residual df)), so d = t × √(c'(X'X)⁻¹c)",
      interval: "the noncentrality interval of the observed t (the noncentral t distribution inverted; Steiger & Fouladi 1997; Cumming & Finch 2001) times √(c'(X'X)⁻¹c)",
      bias_correction: "none",
      interval_empty_above_abs_t: MAX_INTERVAL_STATISTIC,
    },
    level_means: {
      applies_to: "as Cohen's d, when the edges were Fisher z-transformed",
      at: "the model mean with every analysed participant set to the level (numeric covariates at their means, other factors at their observed proportions)",
      scale: "correlation: tanh of the Fisher z model mean",
    },
    contrasts: withEffects.map((observed) => {
      const effects = observed.effects!;
      return {
        name: observed.contrast.name,
        columns: effectSizeColumns(observed).map((c) => c.name),
        cohens_d: effects.cohensD && effects.comparison
          ? { factor: effects.comparison.variable, levels: [effects.comparison.first, effects.comparison.second], scale: effects.cohensD.scale }
          : null,
        level_means: effects.means && effects.comparison
          ? { columns: [levelMeanColumn(effects.comparison.first), levelMeanColumn(effects.comparison.second)], levels: [effects.comparison.first, effects.comparison.second] }
          : null,
      };
    }),
  };
}

/**
 * The effect-size columns of an edge table as the report reads them, from its
 * header (`names`, in order) and a reader of a named column: the levels' means
 * are the two r_ columns right after cohens_d_ci_high. Nothing when the table
 * has no ci_low (an F contrast, or results written before effect sizes).
 */
export function readEffectSizeColumns(names: readonly string[], named: (name: string) => Float64Array): Pick<EdgeColumns, "effects"> {
  if (!names.includes("ci_low")) return {};
  const after = names.indexOf("cohens_d_ci_high");
  const meanNames = after >= 0 ? names.slice(after + 1, after + 3) : [];
  const hasMeans = meanNames.length === 2 && meanNames.every((n) => n.startsWith("r_"));
  const levels = meanNames.map((n) => n.slice(2)) as [string, string];
  return {
    effects: {
      ciLow: named("ci_low"),
      ciHigh: named("ci_high"),
      cohensD: named("cohens_d"),
      cohensDLow: named("cohens_d_ci_low"),
      cohensDHigh: named("cohens_d_ci_high"),
      ...(hasMeans ? { means: { levels, first: named(meanNames[0]), second: named(meanNames[1]) } } : {}),
    },
  };
}
