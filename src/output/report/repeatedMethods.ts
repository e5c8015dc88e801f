import type { ResultsSummary } from "./loadResults.js";
import type { Segment } from "./methodsSegment.js";

type Cite = (key: "winkler" | "winkler2015", text: string) => string;
type List = <T>(items: T[], render: (item: T) => Segment[]) => Segment[];

/**
 * The methods' sentences for a design with several scans per person
 * (summary.json `repeated`): the opening names scans and people ("38 scans
 * from 19 participants"), and a paragraph names the design (paired
 * differences or repeated measures) and the relabelings it allows.
 */
export function repeatedOpening(summary: ResultsSummary, list: List): Segment[] {
  const r = summary.repeated!;
  const out: Segment[] = [`Connectivity matrices of ${r.scans} scans from ${r.people} participants were analysed`];
  const excluded = summary.subjects.excluded;
  if (excluded.length > 0) {
    const reasons = new Map<string, number>();
    for (const x of excluded) reasons.set(x.reason, (reasons.get(x.reason) ?? 0) + 1);
    const { selection, in_table: inTable, not_selected: notSelected = 0 } = summary.subjects;
    const denominator = selection ? `${inTable - notSelected} selected scans` : `${inTable} scans listed`;
    out.push(` (${excluded.length} of the ${denominator} ${excluded.length > 1 ? "were" : "was"} excluded: `);
    out.push(...list([...reasons], ([reason, n]) => (reasons.size === 1 ? [{ user: reason }] : [{ user: reason }, ` (${n})`])));
    out.push(")");
  }
  return out;
}

export function repeatedDesignText(summary: ResultsSummary, cite: Cite, list: List): Segment[] {
  const r = summary.repeated!;
  const levels = list(r.levels, (level) => [{ user: level }]);
  const z = summary.options.transform === "fisher-z" ? " (of Fisher z values)" : "";
  if (r.design === "paired differences") {
    const [first, second] = r.levels;
    return [
      " Each participant was scanned at both levels of ",
      { user: r.within },
      " (",
      ...levels,
      "; participants identified by ",
      { user: r.participant },
      `), and the analysis used paired differences: at every edge, each participant's `,
      { user: second },
      " value minus their ",
      { user: first },
      ` value${z} was computed, and the model below was fitted to these ${r.people} differences.`,
      ` The within-person contrast became the intercept of this change model, the mean change (its between-person columns were centred at their means over participants, so the intercept is the change of an average participant), tested by flipping the sign of each participant's difference; between-person terms tested differences in change (group × time), by permuting the participants' differences (${cite("winkler", "Winkler et al. 2014")}).`,
    ];
  }
  if (r.exchange === "whole people") {
    return [
      ` Each participant was scanned at every one of the ${r.levels.length} levels of `,
      { user: r.within },
      " (",
      ...levels,
      "; participants identified by ",
      { user: r.participant },
      `), and the contrasts compared participants: the model below was fitted to the ${r.scans} scans, and relabelings exchanged whole participants as units, so that each participant's scans stayed together (one exchangeability block per participant, all of equal size; ${cite("winkler2015", "Winkler et al. 2015")}). The edge statistic is the ordinary least-squares t, whose parametric p-value ignores the correlation between a participant's scans; the permutation p-values do not rely on it.`,
    ];
  }
  return [
    ` Each participant was scanned at up to ${r.levels.length} levels of `,
    { user: r.within },
    " (",
    ...levels,
    "; participants identified by ",
    { user: r.participant },
    `), and the analysis was a repeated-measures model: the model below was fitted to the ${r.scans} scans with one indicator column per participant (participant effects), so that contrasts compared scans within participants, and relabelings permuted scans only within each participant (one exchangeability block per participant; ${cite("winkler2015", "Winkler et al. 2015")}), which assumes that a participant's scans are exchangeable (for example, equally correlated with one another). Differences between participants are absorbed by the participant effects and were not tested.`,
  ];
}

/** The report's summary rows for a repeated design: the design, people and scans, and how the relabelings were drawn. */
export function repeatedReportRows(summary: ResultsSummary, code: (text: string) => string): [string, string][] {
  const r = summary.repeated;
  if (!r) return [];
  const design =
    r.design === "paired differences"
      ? `paired differences of ${code(r.within)} (${code(r.difference ?? "")} per person); within contrasts by sign flips, between-person contrasts (difference in change) by permutation`
      : r.exchange === "whole people"
        ? `repeated measures over ${r.levels.length} levels of ${code(r.within)}, contrasts between participants; whole participants exchanged as units`
        : `repeated measures over ${r.levels.length} levels of ${code(r.within)}, participant effects; relabelings within each participant`;
  return [["Repeated scans", `${design}; ${r.people} participants (${code(r.participant)}), ${r.scans} scans`]];
}
