import { edgeRulesSummary } from "../output/edgeRulesSummary.js";
import { inferenceSummary, inputsSummary, overridesSummary, subjectsSummary } from "../output/summaryParts.js";
import { relabelingSummary, smallestPossibleP } from "../output/relabelingSummary.js";
import path from "node:path";
import type { InputRecord } from "../output/provenance.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import { residualDf } from "../model/designMatrix.js";
import { VERSION } from "../version.js";
import { finiteOrNull } from "../common/finiteOrNull.js";
import type { SampleOverlap } from "./sampleOverlap.js";
import type { StrengthAnalysis } from "./strengthAnalysis.js";
import type { SubnetworkSource } from "./subnetworksFromResults.js";

/** summary.json of `plexus strength`: inputs with their SHA-256, the measure and its options, and per contrast how p_fwe was drawn. */
export function strengthSummary(
  prepared: PreparedAnalysis,
  analysis: StrengthAnalysis,
  inputs: InputRecord[],
  commandLine: string[] | null,
  source: { subnetworks: SubnetworkSource; overlap: SampleOverlap } | undefined,
  warnings: string[],
): Record<string, unknown> {
  const { design, matrix } = prepared;
  const { inference } = design;
  const { choice } = analysis;
  return {
    tool: { name: "plexus", version: VERSION },
    command: commandLine,
    analysis: "strength",
    inputs: inputsSummary(inputs, design.file),
    subjects: subjectsSummary(prepared),
    regions: prepared.connectomes.regionCount,
    edges: prepared.edgeRules?.allPairs.edgeCount ?? prepared.connectomes.edgeCount,
    // The measures sum the kept edges only when the design has coverage rules.
    ...(prepared.edgeRules ? { edge_rules: edgeRulesSummary(prepared.edgeRules, prepared.regions) } : {}),
    measure: {
      kind: choice.measure,
      positive_only: choice.positiveOnly,
      mean: choice.mean,
      count: analysis.names.length,
      measures: choice.measure === "nodal" ? undefined : analysis.names.map((name, m) => ({ name, edges: analysis.edgeCounts[m], description: analysis.descriptions[m] })),
      description: choice.measure === "nodal" ? analysis.descriptions[0] : undefined,
    },
    subnetwork_source: source
      ? {
          results: path.relative(path.dirname(path.resolve(design.file)), source.subnetworks.resultsDir) || ".",
          contrast: source.subnetworks.contrast,
          alpha: source.subnetworks.alpha,
          components: source.subnetworks.chosen.map((c) => ({ component: c.id, extent: c.extent, p_fwe: finiteOrNull(c.pFwe) })),
          shared_connectome_files: source.overlap.sharedFiles,
          shared_participants: source.overlap.sharedParticipants,
        }
      : null,
    design: {
      model: design.model,
      columns: matrix.columns.map((c) => c.name),
      rank: matrix.cols,
    },
    df: residualDf(matrix),
    contrasts: analysis.contrasts.map((result) => {
      const fw = result.familywise;
      const plan = fw?.setup.context.plan;
      return {
        name: result.contrast.name,
        expression: result.contrast.expression,
        vector: [...result.contrast.vector],
        df: result.statistics.df,
        measures_without_statistic: result.statistics.degenerate,
        significant_fwe: fw ? Array.from(fw.pFwe).filter((p) => p <= inference.alpha).length : null,
        significant_fdr: Array.from(result.qFdr).filter((q) => q <= inference.alpha).length,
        ...(fw && plan
          ? {
              ...relabelingSummary(fw.setup, prepared.blocks, inference.blockPermutation),
              critical_statistic: finiteOrNull(fw.criticalStatistic),
              smallest_possible_p: smallestPossibleP(fw.setup),
            }
          : { mode: null }),
      };
    }),
    options: {
      transform: design.transform,
      scale: design.scale,
      symmetrize: design.symmetrize,
      inference: { ...inferenceSummary(inference, { components: false }), command_line_overrides: overridesSummary(prepared.overrides) },
    },
    warnings,
  };
}
