// The resolved inference options: what every layer from the permutation engine up needs to know about
// the test, with every default applied. The design reader (io/designFile.ts) makes them; nothing here reads files.

export type InferenceMethod = "components" | "fdr" | "max-t" | "threshold-free";
export type SizeMeasure = "extent" | "mass";
export type Tail = "upper" | "lower" | "both";
export type FdrVariant = "bh" | "by";
export type Scheme = "auto" | "permute" | "sign-flip";
export type BlockPermutation = "within" | "whole";

/** Threshold-free enhancement parameters (see src/network/thresholdFree.ts). */
export interface EnhancementSpec {
  extentExponent: number;
  heightExponent: number;
  step: number;
}

export interface InferenceSpec {
  method: InferenceMethod;
  /**
   * The primary thresholds, the primary one first: one entry, or every
   * threshold of a sweep (`threshold: [2.5, 3, 3.5]`), resolved once when the design is read.
   */
  thresholds: readonly number[];
  enhancement: EnhancementSpec;
  size: SizeMeasure;
  permutations: number;
  seed: number;
  alpha: number;
  blocks?: string;
  blockPermutation: BlockPermutation;
  tail: Tail;
  fdr: FdrVariant;
  scheme: Scheme;
  /**
   * `inference.across_contrasts`: p_FWE from the maxima over every t contrast
   * as well as over the network (one family null for all contrasts).
   */
  acrossContrasts: boolean;
}

