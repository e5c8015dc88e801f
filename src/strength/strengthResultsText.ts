import type { Segment } from "../output/report/methodsSegment.js";
import { fixed, plain, pValue, significant } from "../output/report/printNumbers.js";
import { contrastDirection, type ContrastDirection } from "../output/report/contrastDirection.js";
import type { ResultsText } from "../output/report/resultsText.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import type { StrengthSource } from "./strengthMethods.js";
import type { StrengthAnalysis, StrengthContrast } from "./strengthAnalysis.js";
import { printOrder } from "./strengthMarkdown.js";
import { capitalised, counted, designView, listed, measureNouns, numberWord, signed } from "./strengthWords.js";

/**
 * The draft results paragraphs of `plexus strength`, one per contrast, every
 * number taken from the analysis that nodes.tsv / measures.tsv print: the
 * regions (or measures) whose strength differs at the family-wise level (or,
 * without relabelings, at the FDR level for regions and uncorrected for other
 * measures), each with β, t(df) and its p, the direction said in the words of
 * the contrast ("strength was greater in the patient group than in the
 * control group"), or a plain sentence that none did; cautious wording.
 */

/** How many significant regions are named in a paragraph; the rest are counted (the table lists them). */
export const NAMED_REGIONS = 10;

type Criterion = { label: "p_FWE" | "q_FDR" | "p"; values: ArrayLike<number> };

/** The p-value a measure is judged by: p_FWE with relabelings, else q_FDR for regions, else the uncorrected p. */
export function criterion(analysis: StrengthAnalysis, result: StrengthContrast): Criterion {
  if (result.familywise) return { label: "p_FWE", values: result.familywise.pFwe };
  return analysis.choice.measure === "nodal" ? { label: "q_FDR", values: result.qFdr } : { label: "p", values: result.pUncorrected };
}

/** Measures that reach alpha by the criterion (a measure without a statistic never does). */
export function significantMeasures(analysis: StrengthAnalysis, result: StrengthContrast, alpha: number): number[] {
  const { values } = criterion(analysis, result);
  return printOrder(analysis, result).filter((m) => Number.isFinite(result.statistics.statistic[m]) && values[m] <= alpha);
}

function pIs(label: string, p: number): string {
  const text = pValue(p);
  return text.startsWith("<") ? `${label} ${text}` : `${label} = ${text}`;
}

export function strengthResultsText(prepared: PreparedAnalysis, analysis: StrengthAnalysis, source?: StrengthSource): ResultsText {
  const { alpha } = prepared.design.inference;
  const nouns = measureNouns(analysis);
  const view = designView(prepared);
  const M = analysis.names.length;
  const paragraphs = analysis.contrasts.map((result, k): Segment[] => {
    const { contrast, statistics } = result;
    const expression = String(contrast.expression);
    const direction: ContrastDirection | null = contrastDirection(view, { expression, statistic: "t", vector: [...contrast.vector] }, nouns.quantity);
    const clause = (t: number): Segment[] => (direction ? (t > 0 ? direction.positive : direction.negative) : [`${nouns.quantity} showed an effect of `, { user: expression }]);
    const crit = criterion(analysis, result);
    const df = statistics.df;
    const numbers = (m: number, withBeta: boolean): string => {
      const parts = [
        ...(withBeta ? [`β = ${signed(significant(statistics.estimate[m]))}`] : []),
        `t(${df}) = ${signed(fixed(statistics.statistic[m], 2))}`,
        ...(crit.label === "p" ? [] : [pIs("p", result.pUncorrected[m])]),
        pIs(crit.label, crit.values[m]),
      ];
      return parts.join(", ");
    };
    const out: Segment[] =
      contrast.name === expression ? ["For the contrast ", { user: contrast.name }, ", "] : ["For the contrast ", { user: contrast.name }, " (", { user: expression }, "), "];
    const significantOnes = significantMeasures(analysis, result, alpha);
    const level = `${crit.label} ≤ ${plain(alpha)}`;
    const table = `Table ${k + 1}`;

    if (analysis.choice.measure === "nodal") {
      if (significantOnes.length === 0) {
        const best = printOrder(analysis, result).find((m) => Number.isFinite(statistics.statistic[m]));
        out.push(`no region's strength reached ${level} in this sample`);
        if (best !== undefined) {
          out.push("; the smallest p was that of ", { user: analysis.names[best] }, `, in which `, ...clause(statistics.statistic[best]), ` (${numbers(best, true)}).`);
        } else {
          out.push(".");
        }
      } else {
        const bySign = [1, -1].map((sign) => significantOnes.filter((m) => Math.sign(statistics.statistic[m]) === sign)).filter((list) => list.length > 0);
        if (significantOnes.length === 1) {
          const m = significantOnes[0];
          out.push(`one of the ${numberWord(M)} ${nouns.many} reached ${level} in this sample: in `, { user: analysis.names[m] }, ", ", ...clause(statistics.statistic[m]), ` (${numbers(m, true)}).`);
        } else {
          out.push(`${allOrSome(significantOnes.length, M, nouns.many)} reached ${level} in this sample.`);
          let named = 0;
          for (const list of bySign) {
            const lead =
              bySign.length > 1 ? `In ${numberWord(list.length)}, ` : list.length === 2 ? "In both, " : `In all ${numberWord(list.length)}, `;
            out.push(" ", lead, ...clause(statistics.statistic[list[0]]), ": ");
            const shown = list.slice(0, Math.max(1, NAMED_REGIONS - named));
            named += shown.length;
            out.push(...listed(shown, (m) => [{ user: analysis.names[m] }, ` (${numbers(m, true)})`]));
            const rest = list.length - shown.length;
            out.push(rest > 0 ? `; ${rest} more ${rest === 1 ? "is" : "are"} listed in ${table}.` : ".");
          }
        }
      }
      if (result.familywise) {
        const fdr = Array.from(result.qFdr).filter((q, m) => Number.isFinite(statistics.statistic[m]) && q <= alpha).length;
        out.push(` Region by region, ${fdr === 0 ? "no region" : counted(fdr, nouns)} had q_FDR ≤ ${plain(alpha)} (false discovery rate).`);
      }
      return capitalisedSegments(out);
    }

    // Global strength, or one or more subnetworks.
    const edgesOf = (m: number) => `${analysis.edgeCounts[m]} ${analysis.edgeCounts[m] === 1 ? "edge" : "edges"}`;
    const item = (m: number, withBeta: boolean): Segment[] => [{ user: analysis.names[m] }, ` (${edgesOf(m)}; ${numbers(m, withBeta)})`];
    if (M === 1) {
      const finite = Number.isFinite(statistics.statistic[0]);
      const global = analysis.choice.measure === "global";
      if (!finite) {
        out.push(global ? "global strength" : "the subnetwork's strength", " had no statistic (zero residual variance).");
      } else if (significantOnes.length === 1) {
        if (global) out.push(...clause(statistics.statistic[0]), ` in this sample (${numbers(0, true)}).`);
        else out.push("in ", { user: analysis.names[0] }, ` (${edgesOf(0)}), `, ...clause(statistics.statistic[0]), ` in this sample (${numbers(0, true)}).`);
      } else if (global) {
        out.push(`global strength did not reach ${level} in this sample (${numbers(0, true)}).`);
      } else {
        out.push("mean connectivity in ", ...item(0, true), ` did not reach ${level} in this sample.`);
      }
      return capitalisedSegments(out);
    }
    const others = analysis.names.map((_, m) => m).filter((m) => !significantOnes.includes(m) && Number.isFinite(statistics.statistic[m]));
    if (significantOnes.length === 0) {
      out.push(M === 2 ? `neither ${nouns.one} reached ${level} in this sample: ` : `none of the ${numberWord(M)} ${nouns.many} reached ${level} in this sample: `, ...listed(others, (m) => item(m, false)), ".");
      return capitalisedSegments(out);
    }
    out.push(`${allOrSome(significantOnes.length, M, nouns.many)} reached ${level} in this sample.`);
    for (const m of significantOnes) out.push(" In ", { user: analysis.names[m] }, ` (${edgesOf(m)}), `, ...clause(statistics.statistic[m]), ` (${numbers(m, true)}).`);
    if (others.length === 1) out.push(" The other, ", ...item(others[0], false), ", did not.");
    else if (others.length > 1) out.push(" The others did not: ", ...listed(others, (m) => item(m, false)), ".");
    return capitalisedSegments(out);
  });

  const caution = [
    "These are associations in this sample, not evidence of cause.",
    ...(analysis.choice.measure === "nodal" ? ["A region's strength sums all of its edges: a difference in strength does not show which of its connections differ."] : []),
    ...(source && (source.overlap.sharedFiles > 0 || source.overlap.sharedParticipants > 0)
      ? ["The subnetworks were found in data that overlap these: their effects here are inflated and their p-values are not valid (circular analysis)."]
      : []),
    "Check every number against the tables before use.",
  ].join(" ");
  return { paragraphs, caution };
}

/** "two of the 60 regions", "both subnetworks", "all three subnetworks". */
function allOrSome(count: number, total: number, many: string): string {
  if (count < total) return `${numberWord(count)} of the ${numberWord(total)} ${many}`;
  return total === 2 ? `both ${many}` : `all ${numberWord(total)} ${many}`;
}

function capitalisedSegments(segments: Segment[]): Segment[] {
  const [first, ...rest] = segments;
  return typeof first === "string" ? [capitalised(first), ...rest] : segments;
}
