import { finiteOrNull } from "../common/finiteOrNull.js";
import { edgeRulesSummary } from "./edgeRulesSummary.js";
import { thresholdSweepSummary } from "./thresholdSweepFiles.js";
import { residualDf } from "../model/designMatrix.js";
import { VERSION } from "../version.js";
import type { AnalysisResults } from "./analysisResults.js";
import { effectSizesSummary } from "./effectSizeColumns.js";
import { acrossContrastsSummary, familywiseNullFile } from "./acrossContrastsSummary.js";
import { relabelingSummary, smallestPossibleP } from "./relabelingSummary.js";
import { cohortTableSummary, inferenceSummary, inputsSummary, overridesSummary, readingSummary, subjectsSummary } from "./summaryParts.js";
import { repeatedSummary } from "./repeatedSummary.js";
import { subnetworkValuesSummary } from "./subnetworkValues.js";

/**
 * summary.json of a results folder: the tool and command, the inputs with
 * their SHA-256, the subjects, the design, per contrast its statistics and
 * how its null was drawn, and every option of the run.
 */
export function resultsSummary(results: AnalysisResults): Record<string, unknown> {
  const { prepared, contrasts, nulls, inferred, inputs, commandLine } = results;
  const { design, matrix, connectomes } = prepared;
  const centers: Record<string, number> = {};
  const levels: Record<string, string[]> = {};
  for (const variable of matrix.variables.values()) {
    if (variable.kind === "numeric" && design.center.includes(variable.name)) centers[variable.name] = variable.center;
    if (variable.kind === "factor") levels[variable.name] = variable.levels;
  }
  const { inference } = design;
  return {
    tool: { name: "plexus", version: VERSION },
    command: commandLine,
    inputs: inputsSummary(inputs, design.file),
    matrices_read: readingSummary(connectomes.reading),
    subjects: subjectsSummary(prepared),
    cohort_table: cohortTableSummary(prepared),
    ...(prepared.repeated ? { repeated: repeatedSummary(prepared.repeated) } : {}),
    regions: connectomes.regionCount,
    edges: prepared.edgeRules?.allPairs.edgeCount ?? connectomes.edgeCount,
    ...(prepared.edgeRules ? { edge_rules: edgeRulesSummary(prepared.edgeRules, prepared.regions) } : {}),
    design: {
      model: design.model,
      intercept: prepared.formula.intercept,
      columns: matrix.columns.map((c) => c.name),
      coding: "treatment (first level is the reference)",
      levels,
      centered: centers,
      rank: matrix.cols,
    },
    df: residualDf(matrix),
    contrasts: contrasts.map((observed, i) => {
      const contrastNull = nulls[i];
      const { fwe, free, sweep } = inferred[i];
      const plan = contrastNull?.setup.context.plan;
      return {
        name: observed.contrast.name,
        expression: observed.contrast.expression,
        statistic: observed.contrast.kind,
        // t: the contrast vector; F: every row of the contrast matrix (the same list as `rows`).
        vector: observed.contrast.kind === "F" ? observed.contrast.rows.map((r) => [...r]) : [...observed.contrast.vector],
        ...(observed.contrast.kind === "F" ? { rows: observed.contrast.rows.map((r) => [...r]), df1: observed.contrast.rows.length } : {}),
        df: observed.statistics.df,
        edges_without_statistic: observed.statistics.degenerate,
        supra_threshold_components: observed.components.length,
        significant_components: fwe ? fwe.componentP.filter((r) => r.p <= inference.alpha).length : null,
        significant_edges_fdr: observed.qFdr.filter((q) => q <= inference.alpha).length,
        ...(contrastNull && plan && fwe
          ? {
              ...relabelingSummary(contrastNull.setup, prepared.blocks, inference.blockPermutation),
              critical_size: finiteOrNull(fwe.criticalSize),
              critical_size_measure: inference.size,
              critical_statistic: finiteOrNull(fwe.criticalStatistic),
              smallest_possible_p: smallestPossibleP(contrastNull.setup),
              p_fwe_null: familywiseNullFile(results, observed.contrast.name),
              corrected_across_contrasts: results.familyNull !== undefined,
            }
          : { mode: null }),
        ...(free
          ? {
              threshold_free: {
                extent_exponent: inference.enhancement.extentExponent,
                height_exponent: inference.enhancement.heightExponent,
                step: inference.enhancement.step,
                significant_edges: free.edgeP.filter((p) => p <= inference.alpha).length,
                critical_enhanced: finiteOrNull(free.criticalEnhanced),
              },
            }
          : {}),
        ...(results.subnetworkValues?.[i] ? { subnetwork_values: subnetworkValuesSummary(observed.contrast.name, results.subnetworkValues[i]) } : {}),
        ...(sweep
          ? {
              threshold_sweep: thresholdSweepSummary(sweep, inference.alpha),
            }
          : {}),
      };
    }),
    effect_sizes: effectSizesSummary(contrasts),
    across_contrasts: acrossContrastsSummary(results),
    options: {
      transform: design.transform,
      scale: design.scale,
      symmetrize: design.symmetrize,
      asymmetry_tolerance: design.asymmetryTolerance,
      inference: {
        ...inferenceSummary(inference, { components: true }),
        across_contrasts: inference.acrossContrasts,
        command_line_overrides: overridesSummary(prepared.overrides),
      },
    },
    warnings: prepared.warnings,
  };
}
