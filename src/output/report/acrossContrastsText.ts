import type { ResultsSummary } from "./loadResults.js";
import { plain } from "./printNumbers.js";

export const WINKLER_2016 =
  "Winkler AM, Webster MA, Brooks JC, Tracey I, Smith SM, Nichols TE (2016). Non-parametric combination and related permutation tests for neuroimaging. Human Brain Mapping 37:1486–1511.";

const NUMBER_WORDS = ["zero", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten"];

/**
 * The methods paragraph's sentence on several contrasts: with
 * `inference.across_contrasts`, how the p-values were corrected across them
 * (the joint null of the maxima; Winkler et al. 2016); without it and with two
 * or more contrasts, that each was tested at alpha with no correction across
 * them. Nothing for a single contrast.
 */
export function acrossContrastsSentence(summary: ResultsSummary): { segments: string[]; references: string[] } {
  const k = summary.contrasts.length;
  const alpha = plain(summary.options.inference.alpha);
  const family = summary.across_contrasts;
  const words = NUMBER_WORDS[k] ?? String(k);
  if (family && k >= 2) {
    const { method } = summary.options.inference;
    const largest =
      method === "threshold-free"
        ? "the largest enhanced value"
        : method === "max-t"
          ? `the largest component ${summary.options.inference.size} and the largest edge statistic`
          : `the largest component ${summary.options.inference.size}`;
    const all = k === 2 ? "both contrasts" : `all ${words} contrasts`;
    return {
      segments: [
        ` The p-values are family-wise corrected across the ${words} contrasts and the network at once: every contrast was tested on the same relabelings of the participants (Freedman–Lane per contrast where rows were permuted), ${largest} of each relabeling ${method === "max-t" ? "were" : "was"} taken over ${all} as well as over the edges (the joint distribution of the maxima; Winkler et al. 2016), and every contrast's observed values were compared with that one distribution, so that the chance of any false positive in any of the contrasts is at most α = ${alpha}.`,
        " The q-values control the false discovery rate within each contrast only.",
      ],
      references: [WINKLER_2016],
    };
  }
  if (k >= 2) {
    return {
      segments: [` Each of the ${words} contrasts was tested at α = ${alpha} on its own, without correction across contrasts.`],
      references: [],
    };
  }
  return { segments: [], references: [] };
}

/** The report's summary row on several contrasts, or null for a single contrast without the option. */
export function acrossContrastsRow(summary: ResultsSummary): [string, string] | null {
  const k = summary.contrasts.length;
  const alpha = plain(summary.options.inference.alpha);
  if (summary.across_contrasts) {
    return ["Across contrasts", `p_FWE corrected across the ${k} contrasts and the network (joint null of the maxima, ${summary.across_contrasts.null_file})`];
  }
  if (k >= 2) return ["Across contrasts", `no correction: each of the ${k} contrasts tested at α = ${alpha} on its own`];
  return null;
}

/** Added to a null figure's caption when the figure shows the family null. */
export function familyNullCaption(summary: ResultsSummary): string {
  return summary.across_contrasts ? ` The distribution is that of the largest over all ${summary.contrasts.length} contrasts (error control across contrasts).` : "";
}

/** The subnetwork table's note on several contrasts, or null for a single contrast. */
export function acrossContrastsTableNote(summary: ResultsSummary): string | null {
  const k = summary.contrasts.length;
  if (summary.across_contrasts) {
    return `p_FWE is corrected across the ${k} contrasts as well as the network: it is taken against the permutation distribution of the largest size over all ${k} contrasts.`;
  }
  if (k >= 2) return `p_FWE is corrected over the network within each contrast, not across the ${k} contrasts.`;
  return null;
}
