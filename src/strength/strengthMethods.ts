import { coverageMethods, type CoverageSummary } from "../output/report/coverageMethods.js";
import { edgeRulesSummary } from "../output/edgeRulesSummary.js";
import { REFERENCES, type MethodsText } from "../output/report/methodsText.js";
import type { Segment } from "../output/report/methodsSegment.js";
import { overridesSentence } from "../output/report/overridesText.js";
import { plain, pValue, significant } from "../output/report/printNumbers.js";
import { contrastDirection } from "../output/report/contrastDirection.js";
import { exclusionDenominator, selectionSentence } from "../output/report/selectionMethods.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import { residualDf } from "../model/designMatrix.js";
import { VERSION } from "../version.js";
import type { SampleOverlap } from "./sampleOverlap.js";
import type { StrengthAnalysis } from "./strengthAnalysis.js";
import type { SubnetworkSource } from "./subnetworksFromResults.js";
import { capitalised, counted, designView, listed, measureNouns, numberWord } from "./strengthWords.js";

/**
 * methods.md of `plexus strength`: what was measured (nodal, global or
 * subnetwork strength, as the command chose), the model and its covariates
 * in words, the contrasts, how p-values were obtained and corrected across
 * the measures, how several contrasts were handled, exclusions, with full
 * references. The run's sentence helpers and reference list are reused where
 * the same method applies (selection, coverage rules, relabelings); text from
 * the user's files stays apart as `user` segments, shown as plain words.
 */

// Full references written from memory of these well-known papers (authors, year, title, journal, volume, pages).
export const STRENGTH_REFERENCES = {
  rubinovSporns: "Rubinov M, Sporns O (2010). Complex network measures of brain connectivity: uses and interpretations. NeuroImage 52:1059–1069.",
  kriegeskorte: "Kriegeskorte N, Simmons WK, Bellgowan PSF, Baker CI (2009). Circular analysis in systems neuroscience: the dangers of double dipping. Nature Neuroscience 12:535–540.",
} as const;

const TAIL_WORDS = { upper: "one-sided (positive t)", lower: "one-sided (negative t)", both: "two-sided" } as const;

export interface StrengthSource {
  subnetworks: SubnetworkSource;
  overlap: SampleOverlap;
}

export function strengthMethods(prepared: PreparedAnalysis, analysis: StrengthAnalysis, source?: StrengthSource): MethodsText {
  const { design, matrix } = prepared;
  const { inference } = design;
  const { choice } = analysis;
  const nouns = measureNouns(analysis);
  const M = analysis.names.length;
  const references = new Set<string>();
  const cite = (reference: string, text: string) => {
    references.add(reference);
    return text;
  };
  const view = designView(prepared);
  const { subjects } = view;

  // 1. Participants, data and the measure.
  const data: Segment[] = [...selectionSentence(subjects), `Connectivity matrices of ${plural(subjects.used, "participant")} were analysed`];
  const excluded = prepared.excluded.length;
  if (excluded > 0) {
    const reasons = new Map<string, number>();
    for (const x of prepared.excluded) reasons.set(x.reason, (reasons.get(x.reason) ?? 0) + 1);
    data.push(` (${excluded} of the ${exclusionDenominator(subjects)} ${excluded === 1 ? "was" : "were"} excluded for missing values: `);
    data.push(...listed([...reasons], ([reason, n]) => (reasons.size === 1 ? [{ user: reason }] : [{ user: reason }, ` (${n})`])));
    data.push(")");
  }
  const edges = prepared.edgeRules?.allPairs.edgeCount ?? prepared.connectomes.edgeCount;
  data.push(` with plexus ${VERSION}. Each matrix described ${plural(prepared.connectomes.regionCount, "region")} and ${plural(edges, "edge")}`);
  if (design.symmetrize) data.push("; each edge was the mean of its two entries in the matrix");
  data.push(".");
  if (design.transform === "fisher-z") data.push(` Correlations were Fisher z-transformed (z = atanh r; ${cite(REFERENCES.fisherZ, "Fisher 1915")}) before analysis.`);
  const coverage = coverageMethods({
    options: { transform: design.transform, scale: design.scale, inference: { method: inference.method } },
    edge_rules: prepared.edgeRules ? (edgeRulesSummary(prepared.edgeRules, prepared.regions) as CoverageSummary["edge_rules"]) : undefined,
  });
  data.push(...coverage.segments);
  coverage.references.forEach((r) => references.add(r));
  const kept = prepared.edgeRules ? "kept " : "";
  const weights = `${kept}edge weights`;
  const positive = choice.positiveOnly ? ", with negative weights counted as zero" : "";
  if (choice.measure === "nodal") {
    data.push(
      choice.mean
        ? ` For each participant, the strength of each region was computed as the mean of its ${weights} over its ${prepared.connectomes.regionCount - 1} possible neighbours${positive} (weighted degree divided by the number of other regions; ${cite(STRENGTH_REFERENCES.rubinovSporns, "Rubinov & Sporns 2010")}).`
        : ` For each participant, the strength of each region was computed as the sum of its ${weights}${positive} (weighted degree; ${cite(STRENGTH_REFERENCES.rubinovSporns, "Rubinov & Sporns 2010")}).`,
    );
  } else if (choice.measure === "global") {
    data.push(` For each participant, global strength was computed as the mean of all ${analysis.edgeCounts[0]} ${weights}${positive}.`);
  } else {
    data.push(` For each participant, the strength of ${M === 1 ? "a subnetwork" : `${numberWord(M)} subnetworks`} was computed as the mean of the ${weights} over ${M === 1 ? "its" : "each one's"} edges${positive}: `);
    data.push(...listed(analysis.names.map((_, m) => m), (m) => setText(analysis, m, source)));
    data.push(".");
    if (source) data.push(...sourceSentence(source, cite));
  }

  // 2. The model and its covariates.
  const model: Segment[] = [];
  const target = choice.measure === "nodal" ? "each region's strength" : choice.measure === "global" ? "global strength" : M === 1 ? "the subnetwork's strength" : "each subnetwork's strength";
  const oneSample = prepared.formula.intercept && matrix.columns.length === 1;
  if (oneSample) {
    model.push(`A one-sample model (an intercept alone, the mean over participants) was fitted to ${target} by ordinary least squares`);
  } else {
    model.push("The general linear model ", { user: design.model }, prepared.formula.intercept ? " (with an intercept)" : " (without an intercept)");
    model.push(` was fitted to ${target} by ordinary least squares`);
  }
  const factors = Object.entries(view.design.levels);
  if (factors.length > 0) {
    model.push(`, with categorical variables in treatment coding (${factors.length === 1 ? "reference level" : "reference levels"}: `);
    model.push(...listed(factors, ([name, levels]) => [{ user: levels[0] ?? "" }, " for ", { user: name }]));
    model.push(")");
  }
  const centred = Object.entries(view.design.centered);
  if (centred.length > 0) {
    model.push(factors.length > 0 ? " and " : ", with ", "numeric variables centred at their mean (");
    model.push(...listed(centred, ([name, centre]) => [{ user: name }, ` at ${significant(centre, 4)}`]));
    model.push(")");
  }
  const df = residualDf(matrix);
  model.push(`. The design matrix had ${plural(matrix.cols, "column")} (`);
  model.push(...listed(matrix.columns, (column) => [{ user: column.name }]));
  model.push(`), leaving ${df} residual ${df === 1 ? "degree" : "degrees"} of freedom.`);
  model.push(...covariatesSentence(prepared));

  // 3. Contrasts and inference.
  const inferenceText: Segment[] = [];
  const K = analysis.contrasts.length;
  const per = choice.measure === "nodal" ? "for each region" : choice.measure === "global" ? "for global strength" : M === 1 ? "for the subnetwork" : "for each subnetwork";
  inferenceText.push(K === 1 ? `One contrast was tested with a t-statistic ${per}: ` : `${capitalised(numberWord(K))} contrasts were tested with a t-statistic ${per}: `);
  inferenceText.push(
    ...listed(analysis.contrasts, (c) => [{ user: c.contrast.name }, " (", { user: String(c.contrast.expression) }, `, c = [${Array.from(c.contrast.vector, (v) => plain(v)).join(", ")}])`]),
  );
  inferenceText.push(`. Uncorrected p-values were ${TAIL_WORDS[inference.tail]}, from the t distribution with ${df} degrees of freedom.`);
  const permuted = analysis.contrasts.map((c) => c.familywise).filter((f) => f !== undefined);
  const family = counted(M, nouns);
  if (permuted.length > 0) {
    const scaled = inference.tail === "both" ? "|t|" : inference.tail === "lower" ? "−t" : "t";
    if (M > 1) {
      inferenceText.push(
        ` Family-wise error across the ${family} was controlled by the maximum statistic (${cite(REFERENCES.westfallYoung, "Westfall & Young 1993")}): each ${nouns.one}'s ${scaled} was compared with the distribution, over relabelings of the data, of the largest ${scaled} among the ${family} in each relabeling.`,
      );
    } else {
      inferenceText.push(` A permutation p-value was also obtained by comparing the observed ${scaled} with its distribution over relabelings of the data (a single measure, so no correction across measures was needed; it is given as p_FWE in the tables).`);
    }
    const setup = permuted[0].setup;
    if (setup.scheme === "sign-flip") {
      inferenceText.push(
        ` Relabelings flipped the signs of the residuals of the model without the effect of interest at random (sign-flipping, which assumes symmetric rather than exchangeable errors; ${cite(REFERENCES.winkler, "Winkler et al. 2014")}).`,
      );
    } else {
      inferenceText.push(
        ` Relabelings permuted the residuals of the model without the effect of interest, added back its fitted values and refitted the full model (${cite(REFERENCES.freedmanLane, "Freedman & Lane 1983")}; ${cite(REFERENCES.winkler, "Winkler et al. 2014")}).`,
      );
    }
    if (prepared.blocks) {
      inferenceText.push(" Relabelings respected exchangeability blocks given by ", { user: prepared.blocks.column }, ` (${plural(prepared.blocks.labels.length, "block")}; `);
      inferenceText.push(inference.blockPermutation === "whole" ? "whole blocks were exchanged as units" : "participants were exchanged only within their block");
      inferenceText.push(`; ${cite(REFERENCES.winkler, "Winkler et al. 2014")}).`);
    }
    const exact = permuted.filter((f) => f.exact);
    const monteCarlo = permuted.filter((f) => !f.exact);
    const larger = M > 1 ? "a largest statistic" : "a statistic";
    if (monteCarlo.length > 0) {
      const counts = [...new Set(monteCarlo.map((f) => f.count))];
      inferenceText.push(
        ` Relabelings were drawn at random (Monte Carlo; K = ${counts.map((k) => plain(k)).join(" or ")}, seed ${plain(inference.seed)})` +
          `${exact.length > 0 ? ` for ${plural(monteCarlo.length, "contrast")}` : ""}, and p_FWE = (1 + b)/(1 + K), where b of the K relabelings had ${larger} at least as large (${cite(REFERENCES.phipsonSmyth, "Phipson & Smyth 2010")}).`,
      );
    }
    if (exact.length > 0) {
      const counts = [...new Set(exact.map((f) => f.count))];
      inferenceText.push(
        ` For ${exact.length === permuted.length ? (K === 1 ? "the contrast" : "every contrast") : plural(exact.length, "contrast")}, all ${counts.map((k) => plain(k)).join(" or ")} distinct relabelings were enumerated (an exact test), and p_FWE = b/M, where b of the M relabelings, the observed labelling among them, had ${larger} at least as large.`,
      );
    }
    const overrides = overridesSentence(prepared.overrides);
    if (overrides) inferenceText.push(` ${overrides}`);
    inferenceText.push(` ${capitalised(nouns.many)} with p_FWE ≤ ${plain(inference.alpha)} are reported as significant.`);
  }
  if (choice.measure === "nodal") {
    const fdrName =
      inference.fdr === "by"
        ? `the Benjamini–Yekutieli procedure, valid under any dependence (${cite(REFERENCES.benjaminiYekutieli, "Benjamini & Yekutieli 2001")})`
        : `the Benjamini–Hochberg procedure (${cite(REFERENCES.benjaminiHochberg, "Benjamini & Hochberg 1995")})`;
    inferenceText.push(
      permuted.length > 0
        ? ` Adjusted p-values controlling the false discovery rate across the ${family} (q-values) by ${fdrName} are also reported.`
        : ` No relabelings were drawn (the design's method is fdr): the false discovery rate across the ${family} was controlled by ${fdrName}, and regions with q ≤ ${plain(inference.alpha)} are reported as significant.`,
    );
  } else if (permuted.length === 0) {
    inferenceText.push(
      M > 1
        ? ` No relabelings were drawn (the design's method is fdr), so the p-values are not corrected across the ${family}; measures with p ≤ ${plain(inference.alpha)} are reported.`
        : ` No relabelings were drawn (the design's method is fdr); a p ≤ ${plain(inference.alpha)} is reported as significant.`,
    );
  }
  if (K > 1) inferenceText.push(` Each of the ${numberWord(K)} contrasts was tested at α = ${plain(inference.alpha)} on its own, without correction across contrasts.`);
  const degenerate = Math.max(0, ...analysis.contrasts.map((c) => c.statistics.degenerate));
  if (degenerate > 0) {
    inferenceText.push(
      ` ${capitalised(counted(degenerate, nouns))} had zero residual variance (for example, a region without edges in every participant) and no statistic; ${degenerate > 1 ? "they were" : "it was"} left out of the inference.`,
    );
  }

  return { paragraphs: [data, model, inferenceText], references: [...references].sort() };
}

/**
 * One subnetwork in words: its name and edge count, and how it was chosen (a
 * component of an earlier run: its direction in that contrast's words and its p_FWE there).
 */
function setText(analysis: StrengthAnalysis, m: number, source: StrengthSource | undefined): Segment[] {
  const name = analysis.names[m];
  const edges = plural(analysis.edgeCounts[m] ?? 0, "edge");
  const component = source?.subnetworks.chosen.find((c) => `component_${c.id}` === name);
  if (source && component) {
    const { results, contrast } = source.subnetworks;
    const summary = results.contrasts.find((c) => c.summary.name === contrast)?.summary;
    const direction = summary ? contrastDirection(results.summary, summary) : null;
    const p = pValue(component.pFwe);
    return [
      { user: name },
      ` (${edges}; in the earlier analysis, `,
      ...(direction ? (component.sign > 0 ? direction.positive : direction.negative) : ["a component of ", { user: contrast }]),
      `, p_FWE ${p.startsWith("<") ? p : `= ${p}`})`,
    ];
  }
  return [{ user: name }, " (", { user: analysis.choice.sets[m]?.description ?? analysis.descriptions[m] }, `, ${edges})`];
}

/** "1 column", "4 columns". */
function plural(value: number, noun: string): string {
  return `${value} ${value === 1 ? noun : `${noun}s`}`;
}

/**
 * The covariates in words: each contrast's estimate is adjusted for the
 * model's terms it does not test ("adjusted for age and sex"). Nothing when a
 * contrast tests every term or the model has one term.
 */
function covariatesSentence(prepared: PreparedAnalysis): Segment[] {
  const { matrix, formula } = prepared;
  const terms = formula.terms.map((t) => t.join(":"));
  const others = prepared.contrasts.map((contrast) => {
    const tested = new Set(matrix.columns.filter((_, j) => contrast.vector[j] !== 0).map((c) => c.term));
    return terms.filter((_, k) => !tested.has(k));
  });
  if (others.every((o) => o.length === 0)) return [];
  const named = (list: string[]) => listed(list, (term) => [{ user: term }]);
  if (prepared.contrasts.length === 1) return [" The contrast's estimate was thus adjusted for ", ...named(others[0]), "."];
  if (others.every((o) => o.join("\n") === others[0].join("\n"))) return [" Each contrast's estimate was thus adjusted for ", ...named(others[0]), "."];
  const parts: Segment[] = [" Each contrast's estimate was thus adjusted for the model's other terms ("];
  prepared.contrasts.forEach((contrast, k) => {
    if (k > 0) parts.push("; ");
    parts.push("for ", { user: contrast.name }, ": ", ...(others[k].length > 0 ? named(others[k]) : ["none"]));
  });
  parts.push(").");
  return parts;
}

/** Where the subnetworks came from, and the circularity caution when the samples overlap. */
function sourceSentence(source: StrengthSource, cite: (reference: string, text: string) => string): Segment[] {
  const { subnetworks, overlap } = source;
  const chosen = subnetworks.chosen.length;
  const out: Segment[] = [
    ` ${chosen === 1 ? "It was a connected component" : "They were connected components"} of an earlier network analysis (contrast `,
    { user: subnetworks.contrast },
    `, α = ${plain(subnetworks.alpha)}).`,
  ];
  if (overlap.sharedFiles > 0 || overlap.sharedParticipants > 0) {
    out.push(
      ` That analysis used ${overlap.sharedParticipants === overlap.usedHere ? `all ${overlap.usedHere} of these participants` : `${overlap.sharedParticipants} of these ${overlap.usedHere} participants`}${overlap.sharedFiles > 0 ? " and the same connectivity files" : ""}, so testing the subnetworks again here is circular: their effects are inflated and their p-values are not valid (${cite(STRENGTH_REFERENCES.kriegeskorte, "Kriegeskorte et al. 2009")}).`,
    );
  }
  return out;
}
