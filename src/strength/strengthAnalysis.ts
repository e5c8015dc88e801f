import { silentProgress, type Progress } from "../common/progress.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import { needsPermutations } from "../run/permutationInference.js";
import type { EdgeSet } from "./edgeSets.js";
import { measureFamilywise, type MeasureFamilywise } from "./measureFamilywise.js";
import { measureStatistics, type MeasureStatistics } from "./measureStatistics.js";
import { edgeSetMean, globalStrength, nodalStrength } from "./measures.js";
import type { MeasureKind } from "./strengthOptions.js";

/**
 * Network strength regressed on the design: the per-subject measures, the
 * design's contrasts fitted to each (src/strength/measureStatistics.ts), and,
 * unless the design's method is `fdr`, family-wise p-values across the
 * measures from the permutation engine (src/strength/measureFamilywise.ts).
 */
export interface StrengthChoice {
  measure: MeasureKind;
  positiveOnly: boolean;
  mean: boolean;
  /** The edge sets of a subnetwork measure (one measure each). */
  sets: EdgeSet[];
}

export interface StrengthContrast extends MeasureStatistics {
  familywise?: MeasureFamilywise;
}

export interface StrengthAnalysis {
  choice: StrengthChoice;
  /** Measure names: region labels (nodal), `global`, or the edge sets' names. */
  names: string[];
  /** Edges each measure averages over (null for nodal strength). */
  edgeCounts: (number | null)[];
  descriptions: string[];
  /** Measure-major values over the design's subjects: values[m·S + s]. */
  values: Float64Array;
  contrasts: StrengthContrast[];
}

export interface EngineOptions {
  threads: number;
  chunkSize: number;
  progress?: Progress;
}

/** The measures of every subject of the design, measure-major. */
export function strengthValues(prepared: PreparedAnalysis, choice: StrengthChoice): Pick<StrengthAnalysis, "names" | "edgeCounts" | "descriptions" | "values"> {
  const { data, subjectCount: S, edgeCount } = prepared.connectomes;
  const weights = choice.positiveOnly ? "positive edge weights (negative weights count as 0)" : "edge weights";
  if (choice.measure === "nodal") {
    const values = nodalStrength(data, S, prepared.pairs, { positiveOnly: choice.positiveOnly, mean: choice.mean });
    const what = `${choice.mean ? "mean" : "sum"} of the region's ${weights}`;
    return {
      names: prepared.regions.map((r) => r.label),
      edgeCounts: prepared.regions.map(() => null),
      descriptions: prepared.regions.map(() => what),
      values,
    };
  }
  if (choice.measure === "global") {
    return {
      names: ["global"],
      edgeCounts: [edgeCount],
      descriptions: [`mean of all ${weights}`],
      values: globalStrength(data, S, edgeCount, choice.positiveOnly),
    };
  }
  const values = new Float64Array(choice.sets.length * S);
  choice.sets.forEach((set, m) => values.set(edgeSetMean(data, S, set.edges, choice.positiveOnly), m * S));
  return {
    names: choice.sets.map((s) => s.name),
    edgeCounts: choice.sets.map((s) => s.edges.length),
    descriptions: choice.sets.map((s) => `mean of the ${weights} over ${s.description}`),
    values,
  };
}

export async function analyzeStrength(prepared: PreparedAnalysis, choice: StrengthChoice, engine: EngineOptions): Promise<StrengthAnalysis> {
  const measured = strengthValues(prepared, choice);
  const { inference } = prepared.design;
  const M = measured.names.length;
  const observed = measureStatistics(prepared.matrix, prepared.contrasts, measured.values, M, inference);
  const contrasts: StrengthContrast[] = [];
  for (const result of observed) {
    if (!needsPermutations(prepared)) {
      contrasts.push(result);
      continue;
    }
    const spec = prepared.design.contrasts.find((c) => c.name === result.contrast.name)!;
    const familywise = await measureFamilywise({
      matrix: prepared.matrix,
      contrast: result.contrast,
      values: measured.values,
      measures: M,
      observed: result.statistics.statistic,
      inference,
      blocks: prepared.blocks?.codes,
      where: { file: prepared.design.file, key: spec.key, line: spec.line },
      threads: engine.threads,
      chunkSize: engine.chunkSize,
      progress: engine.progress ?? silentProgress,
    });
    contrasts.push({ ...result, familywise });
  }
  return { choice, ...measured, contrasts };
}
