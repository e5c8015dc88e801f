import type { PreparedAnalysis, RepeatedDesign } from "./preparedAnalysis.js";

/**
 * summary.json's `repeated` block: the person and within columns, the design
 * ("paired differences" / "repeated measures"), people and scans analysed, the
 * scheme of the relabelings and why (the contrasts list their own scheme too).
 */
export function repeatedSummary(repeated: RepeatedDesign): Record<string, unknown> {
  const paired = repeated.design === "paired differences";
  return {
    participant: repeated.participant,
    within: repeated.within,
    levels: repeated.levels,
    design: repeated.design,
    people: repeated.people,
    scans: repeated.scans,
    ...(paired
      ? {
          difference: repeated.difference,
          centred: repeated.centred ?? {},
          scheme:
            "sign flips of each person's difference for a contrast on the within factor (the change model's intercept); Freedman–Lane permutation of the people's differences for a between-person contrast (difference in change)",
          scheme_reason:
            "each person contributes one difference; differences of different people are independent, and symmetric about zero when the mean change is zero (sign flips) or exchangeable between people when the change does not differ between them (permutation)",
        }
      : repeated.exchange === "whole people"
        ? {
            exchange: repeated.exchange,
            scheme: "whole people exchanged as units (exchangeability blocks, one per person, each with a scan at every level)",
            scheme_reason:
              "the contrasts compare people, which permuting scans within a person cannot change; people with the same set of scans are exchangeable as wholes when they do not differ, keeping each person's scans together (Winkler et al. 2015)",
          }
        : {
            exchange: repeated.exchange,
            scheme: "permutation within each person's scans (exchangeability blocks, one per person)",
            scheme_reason:
              "scans of one person are correlated, so only a person's own scans are exchanged; the person effects absorb every difference between people, so these contrasts test the within factor (Winkler et al. 2015)",
          }),
  };
}

/** `plexus check`'s line for a repeated design. */
export function repeatedCheckLine(prepared: PreparedAnalysis): string | undefined {
  const r = prepared.repeated;
  if (!r) return undefined;
  const what =
    r.design === "paired differences"
      ? `paired differences (${r.difference}) of`
      : `repeated measures (${r.levels.length} levels of ${r.within}; ${r.exchange === "whole people" ? "whole people exchanged" : "relabelings within each person"}) of`;
  return `repeated    ${what} ${r.people} participants (${r.scans} scans; person column ${r.participant}, within ${r.within})`;
}
