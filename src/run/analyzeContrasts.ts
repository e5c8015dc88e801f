import { contrastStatistics, type EdgeStatistics } from "../edges/contrastStatistics.js";
import { edgeEffectSizes } from "../edges/effectSizes.js";
import { contrastFStatistics } from "../edges/fStatistics.js";
import { fitEdges, type EdgeFit } from "../edges/fitEdges.js";
import { tailPValues } from "../edges/tailPValues.js";
import { adjustFdr } from "../inference/fdr.js";
import { primaryComponents } from "../network/components.js";
import type { Contrast } from "../model/contrast.js";
import { levelComparison } from "../model/levelComparison.js";
import type { EdgePairs } from "../edges/edgeIndex.js";
import type { InferenceSpec } from "../common/inferenceOptions.js";
import type { ObservedContrast } from "../output/contrastResults.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";


export function fitAll(prepared: PreparedAnalysis): EdgeFit {
  const { matrix, connectomes } = prepared;
  if (prepared.fit) return prepared.fit;
  return fitEdges(matrix.values, matrix.rows, matrix.cols, connectomes.data, connectomes.edgeCount);
}

/** Confidence level of the effect sizes' intervals (README: Effect sizes). */
export const EFFECT_SIZE_LEVEL = 0.95;

/**
 * A contrast's edge statistics, FDR and observed components, and (t contrasts) its effect sizes. A shard
 * writes no edge table, so it asks for none (`effectSizes: false`): the merge computes them once.
 */
export function observeContrast(prepared: PreparedAnalysis, fit: EdgeFit, contrast: Contrast, options: { effectSizes?: boolean } = {}): ObservedContrast {
  const observed = observeContrastOn(fit, contrast, prepared.pairs, prepared.design.inference);
  if (contrast.kind === "t" && options.effectSizes !== false) {
    // Effect sizes of a t contrast: the estimate's interval; Cohen's d when it compares two levels of a factor;
    // the two levels' means back on the correlation scale when the edges were Fisher z-transformed.
    const comparison = levelComparison(contrast, prepared.matrix);
    const fisher = prepared.design.transform === "fisher-z";
    const effects = edgeEffectSizes(fit, observed.statistics, {
      level: EFFECT_SIZE_LEVEL,
      contrast: contrast.vector,
      compareLevels: comparison !== undefined,
      ...(comparison && fisher ? { means: { first: comparison.firstRow, second: comparison.secondRow } } : {}),
    });
    if (effects.means) for (const column of [effects.means.first, effects.means.second]) for (let e = 0; e < column.length; e++) column[e] = Math.tanh(column[e]);
    observed.effects = { ...effects, ...(comparison ? { comparison: { variable: comparison.variable, first: comparison.first, second: comparison.second } } : {}), backTransform: effects.means ? "tanh" : null };
  }
  return observed;
}

/** Edge statistics, FDR and observed components of a contrast, from a fit and the inference options alone. */
export function observeContrastOn(fit: EdgeFit, contrast: Contrast, pairs: EdgePairs, inference: InferenceSpec): ObservedContrast {
  let statistics: EdgeStatistics;
  let pUncorrected: Float64Array;
  if (contrast.kind === "F") {
    const f = contrastFStatistics(fit, contrast.rows);
    const empty = new Float64Array(f.statistic.length).fill(NaN);
    statistics = {
      df: f.df2,
      statistic: f.statistic,
      estimate: empty,
      standardError: empty,
      pUncorrected: f.pUncorrected,
      partialR: f.partialEtaSquared,
      degenerate: f.degenerate,
    };
    pUncorrected = f.pUncorrected;
  } else {
    statistics = contrastStatistics(fit, contrast.vector);
    pUncorrected = tailPValues(statistics.statistic, statistics.df, inference.tail);
  }
  const qFdr = adjustFdr(pUncorrected, inference.fdr);
  const tail = contrast.kind === "F" ? "upper" : inference.tail;
  const { labels, components } = primaryComponents(statistics.statistic, pairs, inference, tail);
  return { contrast, statistics, pUncorrected, qFdr, labels, components };
}
