import { hubRegions } from "./hubRegions.js";
import type { ComponentRow, ContrastResults, ContrastSummary, LoadedResults, ResultsSummary } from "./loadResults.js";
import { contrastRows } from "./loadResults.js";
import { plural, segmentsHtml, segmentsMarkdown, type Segment } from "./methodsText.js";
import { count, plain, pValue, significant } from "./printNumbers.js";
import { significantEdges } from "./significantEdges.js";

/**
 * results.md: a draft results paragraph per contrast, every number read from
 * the results folder (components.tsv, edges.tsv, summary.json), the direction
 * said in the words of the contrast ("connectivity was greater in the patient
 * group than in the control group", "connectivity increased with age"), the
 * regions with most edges in each finding (and their systems when the regions
 * table has them), in cautious wording ("in this sample", no causal claim).
 * Text from the user's files is kept as `user` segments, as in the methods.
 */
export interface ResultsText {
  paragraphs: Segment[][];
  /** The closing note on how to read the findings. */
  caution: string;
}

/** How many of the most connected regions are named (more when tied with the last). */
const NAMED_REGIONS = 3;
const NAMED_REGIONS_WITH_TIES = 5;

/** The two clauses a contrast's sign gives: what a positive and a negative statistic mean, in words. */
export interface ContrastDirection {
  positive: Segment[];
  negative: Segment[];
}

const NUMBER_WORDS = ["no", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten"];

/** An edge count in a sentence: "no edge", "1 edge", "14 edges". */
function edgeCount(value: number): string {
  return value === 0 ? "no edge" : plural(value, "edge");
}

function counted(value: number, noun: string): string {
  return `${NUMBER_WORDS[value] ?? String(value)} ${value === 1 ? noun : `${noun}s`}`;
}

function capitalised(segments: Segment[]): Segment[] {
  const [first, ...rest] = segments;
  return typeof first === "string" ? [first.charAt(0).toUpperCase() + first.slice(1), ...rest] : segments;
}

const LEVEL_COLUMN = /^(.+)\[([^\]]+)\]$/;

/**
 * The direction of a t contrast in words, from the design's columns and the
 * contrast vector: two levels of a factor (treatment coding: one level's
 * column against the reference, or one level's column minus another's), a
 * numeric covariate, the intercept of a one-sample model or of a change model
 * (paired differences). Null for an F contrast; a contrast of another form is
 * described by its sign ("the contrast … was positive").
 */
export function contrastDirection(
  summary: { design: Pick<ResultsSummary["design"], "columns" | "levels" | "coding">; repeated?: ResultsSummary["repeated"] },
  contrast: Pick<ContrastSummary, "statistic" | "vector" | "rows" | "expression">,
  /** What the contrast compares, in words: "connectivity" (edges), "strength" (plexus strength). */
  measured = "connectivity",
): ContrastDirection | null {
  if (contrast.statistic === "F") return null;
  const vector = contrastRows(contrast)[0];
  const { columns, levels } = summary.design;
  const used = vector.map((v, j) => j).filter((j) => vector[j] !== 0);
  const repeated = summary.repeated;
  const paired = repeated?.design === "paired differences";
  const quantity = paired && repeated ? `the change in ${measured} from ${repeated.levels[0]} to ${repeated.levels[1]}` : measured;
  const fallback: ContrastDirection = {
    positive: ["the contrast ", { user: contrast.expression }, " was positive"],
    negative: ["the contrast ", { user: contrast.expression }, " was negative"],
  };
  const interacting = (variable: string) => columns.some((c) => c.includes(":") && c.includes(`${variable}[`));
  const levelOf = (j: number): { variable: string; level: string } | null => {
    const match = LEVEL_COLUMN.exec(columns[j] ?? "");
    if (!match || !(match[1] in levels) || match[1].includes(":") || interacting(match[1])) return null;
    return { variable: match[1], level: match[2] };
  };
  const comparison = (variable: string, high: string, low: string): Segment[] =>
    repeated && variable === repeated.within
      ? ["connectivity was greater at ", { user: high }, " than at ", { user: low }]
      : [`${quantity} was greater in the `, { user: high }, " group than in the ", { user: low }, " group"];
  const twoWay = (variable: string, first: string, second: string): ContrastDirection => ({
    positive: comparison(variable, first, second),
    negative: comparison(variable, second, first),
  });

  if (used.length === 1) {
    const j = used[0];
    const sign = Math.sign(vector[j]);
    const column = columns[j] ?? "";
    const orient = (d: ContrastDirection): ContrastDirection => (sign > 0 ? d : { positive: d.negative, negative: d.positive });
    if (paired && repeated && j === 0 && column.includes(" - ")) {
      return orient(twoWay(repeated.within, repeated.levels[1], repeated.levels[0]));
    }
    if (column === "intercept") {
      return orient({ positive: [`${quantity} was greater than zero`], negative: [`${quantity} was below zero`] });
    }
    const level = levelOf(j);
    if (level) {
      const reference = levels[level.variable][0];
      if (!summary.design.coding.startsWith("treatment") || reference === level.level) return fallback;
      return orient(twoWay(level.variable, level.level, reference));
    }
    if (!column.includes(":") && !LEVEL_COLUMN.test(column) && !column.startsWith("person[")) {
      return orient({ positive: [`${quantity} increased with `, { user: column }], negative: [`${quantity} decreased with `, { user: column }] });
    }
    return fallback;
  }
  if (used.length === 2) {
    const [a, b] = used;
    const levelA = levelOf(a);
    const levelB = levelOf(b);
    if (levelA && levelB && levelA.variable === levelB.variable && vector[a] === -vector[b]) {
      const [first, second] = vector[a] > 0 ? [levelA.level, levelB.level] : [levelB.level, levelA.level];
      return twoWay(levelA.variable, first, second);
    }
  }
  return fallback;
}

/** The regions with most edges among `edges` ("A (5 edges), B (5) and C (4)") and, with systems, the systems of all their regions. */
function involvement(results: LoadedResults, contrast: ContrastResults, edges: number[], within: "in it" | "among them"): Segment[] {
  const hubs = hubRegions(contrast.edges, edges, false);
  if (hubs.length === 0) return [];
  const cut = hubs[Math.min(NAMED_REGIONS, hubs.length) - 1].degree;
  const named = hubs.filter((h, k) => k < NAMED_REGIONS || (h.degree === cut && k < NAMED_REGIONS_WITH_TIES));
  const out: Segment[] = [named.length === 1 ? `the region with most edges ${within} was ` : `the regions with most edges ${within} were `];
  named.forEach((hub, k) => {
    if (k > 0) out.push(k === named.length - 1 ? " and " : ", ");
    out.push({ user: results.regions[hub.region].label }, k === 0 ? ` (${plural(hub.degree, "edge")})` : ` (${hub.degree})`);
  });
  if (results.regions.some((r) => r.system !== undefined)) {
    const systems = new Map<string, number>();
    for (const hub of hubs) {
      const system = results.regions[hub.region].system;
      if (system !== undefined) systems.set(system, (systems.get(system) ?? 0) + 1);
    }
    const ranked = [...systems].sort((x, y) => y[1] - x[1] || (x[0] < y[0] ? -1 : x[0] > y[0] ? 1 : 0)).slice(0, 3);
    if (ranked.length > 0) {
      const whose = within === "in it" ? "its" : "their";
      if (systems.size === 1 && ranked[0][1] === hubs.length) {
        out.push(`; ${hubs.length === 1 ? `${whose} region` : `all ${hubs.length} of ${whose} regions`} belonged to the `, { user: ranked[0][0] }, " system");
        return out;
      }
      out.push(
        systems.size <= 3
          ? `; ${whose} ${plural(hubs.length, "region")} belonged to the `
          : `; ${whose} ${plural(hubs.length, "region")} spanned ${systems.size} systems, most often the `,
      );
      ranked.forEach(([system, n], k) => {
        if (k > 0) out.push(k === ranked.length - 1 ? " and " : ", ");
        out.push({ user: system }, ` (${n})`);
      });
      out.push(ranked.length === 1 ? " system" : " systems");
    }
  }
  return out;
}

function familywise(c: { pFwe: number; pFweLow: number; pFweHigh: number }, exact: boolean): string {
  const p = pValue(c.pFwe);
  const stated = p.startsWith("<") ? `p_FWE ${p}` : `p_FWE = ${p}`;
  if (exact) return `${stated}, exact test`;
  if (!Number.isFinite(c.pFweLow) || !Number.isFinite(c.pFweHigh)) return stated;
  return `${stated}, 95% interval ${significant(c.pFweLow, 2)} to ${significant(c.pFweHigh, 2)}`;
}

export function resultsText(results: LoadedResults): ResultsText {
  const { summary } = results;
  const { inference } = summary.options;
  const alpha = plain(inference.alpha);
  const paragraphs: Segment[][] = results.contrasts.map((contrast) => {
    const c = contrast.summary;
    const direction = contrastDirection(summary, c);
    const clause = (sign: number): Segment[] =>
      direction ? (sign > 0 ? direction.positive : direction.negative) : ["connectivity showed an effect of ", { user: c.expression }, " (F test)"];
    const out: Segment[] = c.name === c.expression ? ["For the contrast ", { user: c.name }, ", "] : ["For the contrast ", { user: c.name }, " (", { user: c.expression }, "), "];
    const finding = significantEdges(contrast, inference.alpha);
    const fdrCount = c.significant_edges_fdr;
    if (finding.kind === "components") {
      const exact = c.mode === "exact";
      const across = c.corrected_across_contrasts ? ` (corrected across the ${NUMBER_WORDS[summary.contrasts.length] ?? summary.contrasts.length} contrasts)` : "";
      const size = (x: { extent: number; nodes: number; mass: number }) =>
        `${plural(x.extent, "edge")} among ${plural(x.nodes, "region")}${inference.size === "mass" ? `, mass ${count(x.mass)}` : ""}`;
      // Threshold-free enhancement is inferred edge by edge: components.tsv holds the components the
      // significant edges form, each with the smallest edge p_FWE among them (and mass = Σ|enhanced|).
      const enhanced = inference.method === "threshold-free";
      const sizeOf = (x: { extent: number; nodes: number; mass: number }) =>
        enhanced ? `${plural(x.extent, "edge")} among ${plural(x.nodes, "region")}` : size(x);
      const pOf = (x: ComponentRow) => (enhanced ? `smallest edge ${familywise(x, exact)}` : familywise(x, exact));
      if (finding.components.length === 0) {
        out.push(enhanced ? `no edge reached p_FWE ≤ ${alpha}${across} after threshold-free enhancement in this sample` : `no subnetwork reached p_FWE ≤ ${alpha}${across} in this sample`);
        const largest = contrast.components[0];
        if (enhanced) {
          out.push(".");
        } else if (largest) {
          out.push("; the largest component above the primary threshold, in which ", ...clause(largest.sign), `, had ${size(largest)} (${familywise(largest, exact)}).`);
        } else {
          out.push("; no edge passed the primary threshold.");
        }
      } else {
        if (enhanced) {
          out.push(`${edgeCount(finding.edges.length)} reached p_FWE ≤ ${alpha}${across} after threshold-free enhancement in this sample, forming ${counted(finding.components.length, "connected component")}.`);
        } else {
          out.push(`${counted(finding.components.length, "subnetwork")} reached p_FWE ≤ ${alpha}${across} in this sample.`);
        }
        finding.components.forEach((component, k) => {
          const edges = finding.edges.filter((e) => contrast.edges.component[e] === component.id);
          const lead: Segment[] = finding.components.length === 1 ? ["In it, "] : [`In the ${ORDINALS[k] ?? `${k + 1}th`}, `];
          out.push(" ", ...lead, ...clause(component.sign), ` (${sizeOf(component)}; ${pOf(component)})`);
          const involved = involvement(results, contrast, edges, "in it");
          out.push(...(involved.length > 0 ? ["; ", ...involved] : []), ".");
        });
      }
      if (inference.method === "max-t" && contrast.edges.pFwe) {
        let edgeLevel = 0;
        for (const p of contrast.edges.pFwe) if (p <= inference.alpha) edgeLevel += 1;
        out.push(` At the level of single edges, ${edgeCount(edgeLevel)} had p_FWE ≤ ${alpha} (maximum statistic).`);
      }
      out.push(` Edge by edge, ${edgeCount(fdrCount)} had q_FDR ≤ ${alpha} (false discovery rate).`);
    } else {
      if (fdrCount === 0) {
        out.push(`no edge had q_FDR ≤ ${alpha} (false discovery rate) in this sample.`);
      } else {
        out.push(`${plural(fdrCount, "edge")} had q_FDR ≤ ${alpha} (false discovery rate) in this sample`);
        const signs = [1, -1].map((sign) => finding.edges.filter((e) => Math.sign(contrast.edges.statistic[e]) === sign));
        const parts = [0, 1].filter((k) => signs[k].length > 0);
        if (direction) {
          out.push(": in ");
          parts.forEach((k, n) => {
            if (n > 0) out.push(", and in ");
            out.push(`${signs[k].length === fdrCount && parts.length === 1 ? (fdrCount === 1 ? "it" : "all of them") : `${signs[k].length}`}, `, ...clause(k === 0 ? 1 : -1));
          });
        }
        const involved = involvement(results, contrast, finding.edges, "among them");
        out.push(...(involved.length > 0 ? ["; ", ...involved] : []), ".");
      }
    }
    return capitalised(out);
  });
  const withComponents = results.contrasts.some((contrast) => contrast.summary.mode === "exact" || contrast.summary.mode === "monte-carlo");
  const caution = [
    "These are associations in this sample, not evidence of cause.",
    ...(withComponents && inference.method !== "threshold-free"
      ? ["A subnetwork is significant as a whole: the family-wise test does not show that any single edge or region in it differs on its own."]
      : []),
    "Check every number against the tables before use.",
  ].join(" ");
  return { paragraphs, caution };
}

const ORDINALS = ["first", "second", "third", "fourth", "fifth", "sixth", "seventh", "eighth", "ninth", "tenth"];

/** results.md: a heading, one paragraph per contrast and the closing caution. */
export function resultsMarkdown(text: ResultsText): string {
  return ["## Results (draft)", "", ...text.paragraphs.flatMap((p) => [segmentsMarkdown(p), ""]), text.caution, ""].join("\n");
}

/** The same as HTML paragraphs (everything escaped). */
export function resultsHtml(text: ResultsText): string {
  return [...text.paragraphs.map((p) => `<p>${segmentsHtml(p)}</p>`), `<p class="hint">${segmentsHtml([text.caution])}</p>`].join("\n");
}
