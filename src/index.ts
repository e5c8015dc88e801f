/**
 * plexus as a library: the public API. Everything else under src/ is internal.
 * The data's path: read inputs → build the model → edge statistics →
 * permutation engine → inference → outputs.
 */
export { InputError, isInputError, type InputLocation } from "./errors.js";
export { VERSION } from "./version.js";

// 1. Inputs
export { readDesign, parseDesign, type DesignSpec, type ContrastSpec } from "./io/designFile.js";
export type { InferenceSpec, Tail } from "./common/inferenceOptions.js";
export { readParticipants, parseParticipants, DEFAULT_MISSING_VALUES, type ParticipantsTable } from "./io/participants.js";
export { parseMatrixText } from "./io/matrixText.js";
export { parseNpy, encodeNpy, type NpyArray } from "./io/npy.js";
export { readRegions, parseRegions, defaultRegions, type Region } from "./io/regions.js";
export { loadConnectomes, type ConnectomeSource, type LoadedConnectomes } from "./io/connectomes.js";

// 2. The model
export { parseFormula, formatFormula, type Formula } from "./model/formula.js";
export { codeVariable, type Variable } from "./model/variables.js";
export { buildDesignMatrix, type DesignMatrix, type DesignColumn } from "./model/designMatrix.js";
export { parseContrast, type Contrast } from "./model/contrast.js";
export { thinQr } from "./model/qr.js";
export { rankReport } from "./model/rank.js";

// 3. Edge statistics
export { edgePairs, edgeIndexOf, edgeCountFor, type EdgePairs } from "./edges/edgeIndex.js";
export { fitEdges, unscaledCovariance, contrastVarianceFactor, type EdgeFit } from "./edges/fitEdges.js";
export { contrastStatistics, type EdgeStatistics } from "./edges/contrastStatistics.js";
export { tailPValues } from "./edges/tailPValues.js";
export { studentTUpperTail, studentTCdf, studentTQuantile, studentTDensity } from "./statistics/studentT.js";

// 4. Permutation engine
export { partitionEffect, reducedResiduals, type EffectPartition } from "./permute/effectPartition.js";
export { permutedStatistics, type KernelData } from "./permute/permutedStatistics.js";
export { planRelabelings, Relabeler, designRowTypes, type RelabelingPlan } from "./permute/relabelings.js";
export { computeNullRange } from "./permute/nullRange.js";
export type { NullChunk, NullContext } from "./permute/nullRangeTypes.js";
export { runNullEngine } from "./permute/nullEngine.js";

// 5. Inference
export { adjustFdr } from "./inference/fdr.js";
export { labelComponents, largestComponent, type ComponentSummary } from "./network/components.js";
export { observedComponents } from "./network/components.js";
export { familywiseP, criticalValue, clopperPearson } from "./inference/familywiseP.js";

// 6. Running and outputs
export { prepareAnalysis } from "./run/prepareAnalysis.js";
export type { PreparedAnalysis } from "./output/preparedAnalysis.js";
export { runAnalysis, type RunOptions, type RunResult } from "./run/runAnalysis.js";
export { mergeShards } from "./run/mergeShards.js";
export { runPower, type PowerOptions } from "./power/runPower.js";
export { analysePowerCohort, type PowerPlan } from "./power/powerStudy.js";
export { contrastFStatistics } from "./edges/fStatistics.js";
export { fisherFUpperTail } from "./statistics/fisherF.js";
export { noncentralTCdf, noncentralityInterval } from "./statistics/noncentralT.js";
export { simulateCohort, type SimulationOptions, type SimulatedCohort } from "./simulate/simulateCohort.js";
export { writeCohort } from "./simulate/writeCohort.js";

// Network strength
export { nodalStrength, globalStrength, edgeSetMean } from "./strength/measures.js";
export { runStrength } from "./strength/runStrength.js";
export { type StrengthOptions } from "./strength/strengthOptions.js";
export { runExtract, type ExtractOptions } from "./strength/runExtract.js";
