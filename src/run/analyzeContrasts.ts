import { contrastStatistics, type EdgeStatistics } from "../edges/contrastStatistics.js";
import { contrastFStatistics } from "../edges/fStatistics.js";
import { fitEdges, type EdgeFit } from "../edges/fitEdges.js";
import { tailPValues } from "../edges/tailPValues.js";
import { adjustFdr } from "../inference/fdr.js";
import { primaryComponents } from "../network/components.js";
import type { Contrast } from "../model/contrast.js";
import type { EdgePairs } from "../edges/edgeIndex.js";
import type { InferenceSpec } from "../common/inferenceOptions.js";
import type { ObservedContrast } from "../output/contrastResults.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";


export function fitAll(prepared: PreparedAnalysis): EdgeFit {
  const { matrix, connectomes } = prepared;
  if (prepared.fit) return prepared.fit;
  return fitEdges(matrix.values, matrix.rows, matrix.cols, connectomes.data, connectomes.edgeCount);
}

export function observeContrast(prepared: PreparedAnalysis, fit: EdgeFit, contrast: Contrast): ObservedContrast {
  return observeContrastOn(fit, contrast, prepared.pairs, prepared.design.inference);
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
