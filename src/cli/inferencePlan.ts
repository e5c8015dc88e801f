import type { AppliedOverrides } from "../common/inferenceOverrides.js";
import type { InferenceSpec } from "../common/inferenceOptions.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import type { ContrastRelabelings } from "../permute/exchangeability.js";

// `plexus check`'s account of the inference a run would make, contrast by contrast: the method, the
// threshold(s), the relabelings (random, or every distinct one when exact enumeration would run), the
// seed, the scheme and the exchangeability blocks. The plans are the ones preparation made with the
// run's own planning code (permute/exchangeability.ts checkRelabelings), so check and run agree.

const LABEL_WIDTH = 13;
const INDENT = "  ";

/** The lines for every contrast: `plan        <contrast>` then one indented `key  value` line per item. */
export function inferencePlanLines(prepared: PreparedAnalysis): string[] {
  const { inference } = prepared.design;
  return prepared.contrasts.flatMap((contrast, k) => {
    const statistic = contrast.kind === "F" ? "F" : "t";
    const tail = contrast.kind === "F" ? "upper" : inference.tail;
    const items: [string, string][] = [
      ["method", methodText(inference)],
      ...thresholdItems(inference, statistic, tail),
      ...relabelingItems(inference, prepared.relabelings?.[k], prepared.overrides, prepared.blocks),
    ];
    return [`plan        ${contrast.name} (${contrast.kind} contrast)`, ...items.map(([key, value]) => `${INDENT}${key.padEnd(LABEL_WIDTH)}${value}`)];
  });
}

function fdrName(inference: InferenceSpec): string {
  return inference.fdr === "by" ? "Benjamini–Yekutieli" : "Benjamini–Hochberg";
}

function methodText(inference: InferenceSpec): string {
  const alpha = `alpha ${inference.alpha}`;
  switch (inference.method) {
    case "components":
      return `components: connected subnetworks by ${inference.size}, family-wise p from the largest ${inference.size} per relabeling; ${alpha}`;
    case "max-t":
      return `max-t: each edge against the largest statistic per relabeling (components by ${inference.size} as well); ${alpha}`;
    case "threshold-free": {
      const { extentExponent, heightExponent, step } = inference.enhancement;
      return `threshold-free: enhancement with extent exponent ${extentExponent}, height exponent ${heightExponent}, step ${step}, family-wise p from the largest enhanced value per relabeling; ${alpha}`;
    }
    case "fdr":
      return `fdr: false discovery rate over edges (${fdrName(inference)}) on the t distribution's p-values; ${alpha}`;
  }
}

/** The primary threshold as a rule on the contrast's statistic, then any further thresholds of a sweep. */
function thresholdItems(inference: InferenceSpec, statistic: "t" | "F", tail: InferenceSpec["tail"]): [string, string][] {
  if (inference.method === "fdr" || inference.method === "threshold-free") return [];
  const rule = (value: number) => (tail === "both" ? `|${statistic}| > ${value}` : tail === "lower" ? `${statistic} < -${value}` : `${statistic} > ${value}`);
  const [primary, ...sweep] = inference.thresholds;
  return [
    ["threshold", `${rule(primary)}${sweep.length > 0 ? `; sweep also at ${sweep.map(rule).join(", ")}` : ""}`],
  ];
}

function relabelingItems(
  inference: InferenceSpec,
  relabelings: ContrastRelabelings | undefined,
  overrides: AppliedOverrides | undefined,
  blocks: PreparedAnalysis["blocks"],
): [string, string][] {
  if (inference.method === "fdr" || relabelings === undefined) return [["relabelings", "none (fdr draws no relabelings)"]];
  const { plan, scheme, reason } = relabelings;
  const fromCommandLine = (value: number | undefined) => (value === undefined ? "" : ` (command line; the design says ${value})`);
  const distinct = Number.isFinite(plan.distinct) ? plan.distinct.toLocaleString("en-US") : "more than 2^53";
  const count = plan.exact
    ? `all ${plan.count.toLocaleString("en-US")} distinct relabelings, enumerated exactly (no more than the ${inference.permutations.toLocaleString("en-US")} permutations asked for)${fromCommandLine(overrides?.design.permutations)}`
    : `${plan.count.toLocaleString("en-US")} drawn at random (Monte Carlo) of ${distinct} distinct${fromCommandLine(overrides?.design.permutations)}`;
  const seed = plan.exact ? `${plan.seed} (not used: exact enumeration draws nothing at random)${fromCommandLine(overrides?.design.seed)}` : `${plan.seed}${fromCommandLine(overrides?.design.seed)}`;
  const schemeText = scheme === "sign-flip" ? `sign-flip: ${reason}` : `permutation: ${reason === "requested in the design" ? "Freedman–Lane, requested in the design" : reason}`;
  const blockText = blocks
    ? `${blocks.column}: ${blocks.labels.length} blocks, ${inference.blockPermutation === "whole" ? "whole blocks exchanged as units" : "relabelings within each block"}`
    : "none (one block: every participant exchangeable)";
  return [
    ["relabelings", count],
    ["seed", seed],
    ["scheme", schemeText],
    ["blocks", blockText],
  ];
}
