import type { ContrastInference, ContrastNull, ObservedContrast } from "./contrastResults.js";
import type { NullChunk } from "../permute/nullRangeTypes.js";
import type { PreparedAnalysis } from "./preparedAnalysis.js";
import type { InputRecord } from "./provenance.js";
import type { SubnetworkValues } from "./subnetworkValues.js";

/**
 * What a results folder is written from: the prepared analysis, each
 * contrast's observed statistics, null (when permutations were drawn) and
 * permutation results, the inputs with their SHA-256, and the command line.
 */
export interface AnalysisResults {
  prepared: PreparedAnalysis;
  contrasts: ObservedContrast[];
  nulls: (ContrastNull | undefined)[];
  inferred: ContrastInference[];
  /** With `inference.across_contrasts`: the family null (row-wise maxima over the contrasts) every p_FWE comes from. */
  familyNull?: NullChunk;
  inputs: InputRecord[];
  /** Per contrast: the data behind its significant subnetworks (subnetwork_values.tsv), when it has any. */
  subnetworkValues?: (SubnetworkValues | undefined)[];
  commandLine: string[] | null;
}
