import { acrossContrastsSentence } from "./acrossContrastsText.js";
import { cohortVariables } from "./cohortVariables.js";
import { effectSizesMethods } from "./effectSizesMethods.js";
import { coverageMethods } from "./coverageMethods.js";
import { subnetworkValuesMethods } from "./subnetworkValuesMethods.js";
import { escapeHtml } from "./escapeHtml.js";
import type { LoadedResults } from "./loadResults.js";
import { contrastRows } from "./loadResults.js";
import { count, plain, significant } from "./printNumbers.js";
import { overridesSentence } from "./overridesText.js";
import { exclusionDenominator, selectionSentence } from "./selectionMethods.js";
import { repeatedDesignText, repeatedOpening } from "./repeatedMethods.js";
import type { Segment } from "./methodsSegment.js";

export type { Segment };

/**
 * The methods paragraph: every choice in force, read from summary.json, in
 * sentences a user can paste into a manuscript and edit, with the references
 * they rely on. Text from the user's files (formula, column names, contrast
 * names and expressions, levels) is kept apart as `user` segments, so each
 * writer can escape it for its format; it is shown as plain words (no code
 * formatting), so the text pastes into a manuscript as it reads.
 */
export interface MethodsText {
  paragraphs: Segment[][];
  references: string[];
}

// Full references (authors, year, title, journal, volume, pages), written from memory of these
// well-known papers and books; the in-text citations name the same authors and years.
// Exported for the other methods writers (plexus strength) that rely on the same methods.
export const REFERENCES = {
  benjaminiHochberg:
    "Benjamini Y, Hochberg Y (1995). Controlling the false discovery rate: a practical and powerful approach to multiple testing. Journal of the Royal Statistical Society, Series B 57:289–300.",
  benjaminiYekutieli: "Benjamini Y, Yekutieli D (2001). The control of the false discovery rate in multiple testing under dependency. The Annals of Statistics 29:1165–1188.",
  clopperPearson: "Clopper CJ, Pearson ES (1934). The use of confidence or fiducial limits illustrated in the case of the binomial. Biometrika 26:404–413.",
  fisherExact: "Fisher RA (1935). The logic of inductive inference. Journal of the Royal Statistical Society 98:39–82.",
  fisherZ: "Fisher RA (1915). Frequency distribution of the values of the correlation coefficient in samples from an indefinitely large population. Biometrika 10:507–521.",
  freedmanLane: "Freedman D, Lane D (1983). A nonstochastic interpretation of reported significance levels. Journal of Business & Economic Statistics 1:292–298.",
  pearson:
    "Pearson K (1900). On the criterion that a given system of deviations from the probable in the case of a correlated system of variables is such that it can be reasonably supposed to have arisen from random sampling. Philosophical Magazine, Series 5, 50:157–175.",
  phipsonSmyth:
    "Phipson B, Smyth GK (2010). Permutation P-values should never be zero: calculating exact P-values when permutations are randomly drawn. Statistical Applications in Genetics and Molecular Biology 9: article 39.",
  welch1947: "Welch BL (1947). The generalization of ‘Student’s’ problem when several different population variances are involved. Biometrika 34:28–35.",
  welch1951: "Welch BL (1951). On the comparison of several mean values: an alternative approach. Biometrika 38:330–336.",
  westfallYoung: "Westfall PH, Young SS (1993). Resampling-Based Multiple Testing: Examples and Methods for p-Value Adjustment. New York: Wiley.",
  winkler: "Winkler AM, Ridgway GR, Webster MA, Smith SM, Nichols TE (2014). Permutation inference for the general linear model. NeuroImage 92:381–397.",
  winkler2015: "Winkler AM, Webster MA, Vidaurre D, Nichols TE, Smith SM (2015). Multi-level block permutation. NeuroImage 123:253–268.",
  zalesky: "Zalesky A, Fornito A, Bullmore ET (2010). Network-based statistic: identifying differences in brain networks. NeuroImage 53:1197–1207.",
  smithNichols:
    "Smith SM, Nichols TE (2009). Threshold-free cluster enhancement: addressing problems of smoothing, threshold dependence and localisation in cluster inference. NeuroImage 44:83–98.",
  // From memory: the author list beyond the first three is not repeated here.
  baggio: "Baggio HC, Abos A, Segura B, et al. (2018). Statistical inference in brain graphs using threshold-free network-based statistics. Human Brain Mapping 39:2289–2302.",
} as const;

type ReferenceKey = keyof typeof REFERENCES;

const TAIL_WORDS: Record<string, string> = {
  upper: "one-sided (positive t)",
  lower: "one-sided (negative t)",
  both: "two-sided",
};

export function methodsText(results: LoadedResults): MethodsText {
  const { summary } = results;
  const { design, options, subjects } = summary;
  const { inference } = options;
  const cited = new Set<ReferenceKey>();
  const cite = (key: ReferenceKey, text: string) => {
    cited.add(key);
    return text;
  };
  const list = <T>(items: T[], render: (item: T) => Segment[]): Segment[] =>
    items.flatMap((item, k) => [...(k === 0 ? [] : [k === items.length - 1 ? (items.length > 2 ? ", and " : " and ") : ", "]), ...render(item)]);

  // 1. Participants, data and model.
  const model: Segment[] = [];
  const excluded = subjects.excluded.length;
  model.push(...selectionSentence(subjects));
  if (summary.repeated) model.push(...repeatedOpening(summary, list));
  else model.push(`Connectivity matrices of ${plural(subjects.used, "participant")} were analysed`);
  if (excluded > 0 && !summary.repeated) {
    const reasons = new Map<string, number>();
    for (const x of subjects.excluded) reasons.set(x.reason, (reasons.get(x.reason) ?? 0) + 1);
    model.push(` (${excluded} of the ${exclusionDenominator(subjects)} ${excluded === 1 ? "was" : "were"} excluded: `);
    model.push(...list([...reasons], ([reason, count]) => (reasons.size === 1 ? [{ user: reason }] : [{ user: reason }, ` (${count})`])));
    model.push(")");
  }
  model.push(` with plexus ${summary.tool.version}. Each matrix described ${plural(summary.regions, "region")} and ${plural(summary.edges, "edge")}`);
  if (options.symmetrize) model.push("; each edge was the mean of its two entries in the matrix");
  model.push(".");
  if (options.transform === "fisher-z") {
    model.push(` Correlations were Fisher z-transformed (z = atanh r; ${cite("fisherZ", "Fisher 1915")}) before analysis.`);
  }
  const coverage = coverageMethods(summary);
  model.push(...coverage.segments);
  if (summary.repeated) model.push(...repeatedDesignText(summary, cite, list));
  const personEffects = summary.repeated?.design === "repeated measures" && summary.repeated.exchange !== "whole people";
  const paired = summary.repeated?.design === "paired differences";
  const oneSample = !summary.repeated && design.intercept && design.columns.length === 1;
  if (oneSample) {
    model.push(" At every edge, a one-sample model (an intercept alone, the mean over participants) was fitted by ordinary least squares");
  } else {
    model.push(" At every edge, the general linear model ", { user: design.model });
    model.push(
      personEffects
        ? " (with one indicator column per participant in place of an intercept; any column constant over a participant's scans is absorbed by them and was not fitted)"
        : paired
          ? " (its within-person term as the intercept of the change model)"
          : design.intercept
            ? " (with an intercept)"
            : " (without an intercept)",
    );
    model.push(paired ? " was fitted to the differences by ordinary least squares" : " was fitted by ordinary least squares");
  }
  const factors = Object.entries(design.levels ?? {});
  if (factors.length > 0) {
    const reference = factors.length === 1 ? "reference level" : "reference levels";
    model.push(design.coding.startsWith("treatment") ? `, with categorical variables in treatment coding (${reference}: ` : `, with categorical variables coded as ${design.coding} (${reference}: `);
    model.push(...list(factors, ([name, levels]) => [{ user: levels[0] ?? "" }, " for ", { user: name }]));
    model.push(")");
  }
  const centred = Object.entries(design.centered ?? {});
  if (centred.length > 0) {
    model.push(factors.length > 0 ? " and " : ", with ");
    model.push("numeric variables centred at their mean (");
    model.push(...list(centred, ([name, centre]) => [{ user: name }, ` at ${significant(centre, 4)}`]));
    model.push(")");
  }
  model.push(`. The design matrix had ${plural(design.rank, "column")} (`);
  model.push(...list(design.columns, (column) => [{ user: column }]));
  model.push(`), leaving ${summary.df} residual ${summary.df === 1 ? "degree" : "degrees"} of freedom.`);

  // 2. Contrasts.
  const contrasts: Segment[] = [];
  contrasts.push(summary.contrasts.length === 1 ? "One contrast was tested" : `${capitalised(numberWord(summary.contrasts.length))} contrasts were tested`);
  const fContrasts = summary.contrasts.filter((c) => c.statistic === "F");
  const tContrasts = summary.contrasts.filter((c) => c.statistic !== "F");
  contrasts.push(
    fContrasts.length === 0 ? " with a t-statistic at every edge: " : tContrasts.length === 0 ? " with an F-statistic at every edge: " : " at every edge, with a t- or an F-statistic: ",
  );
  const mixed = fContrasts.length > 0 && tContrasts.length > 0;
  const matrix = (rows: number[][]) => `[${rows.map((row) => row.map((v) => plain(v)).join(", ")).join("; ")}]`;
  contrasts.push(
    ...list(summary.contrasts, (c) =>
      c.statistic === "F"
        ? [{ user: c.name }, mixed ? " (F, " : " (", { user: c.expression }, `, C = ${matrix(contrastRows(c))}, ${c.df1 ?? c.rows?.length ?? 1} and ${plain(c.df)} ${c.df === 1 ? "degree" : "degrees"} of freedom)`]
        : [{ user: c.name }, mixed ? " (t, " : " (", { user: c.expression }, `, c = [${contrastRows(c)[0].map((v) => plain(v)).join(", ")}])`],
    ),
  );
  contrasts.push(".");
  if (tContrasts.length > 0) {
    contrasts.push(` Uncorrected p-values of t were ${TAIL_WORDS[inference.tail] ?? inference.tail}${fContrasts.length > 0 ? "; those of F come from its upper tail" : ""}.`);
  } else {
    contrasts.push(" Uncorrected p-values come from the upper tail of F.");
  }
  const effectSizes = effectSizesMethods(summary);
  contrasts.push(...effectSizes.segments);
  const dataFigures = subnetworkValuesMethods(summary);
  contrasts.push(...dataFigures.segments);
  const degenerate = summary.contrasts.filter((c) => c.edges_without_statistic > 0);
  if (degenerate.length > 0) {
    const most = Math.max(...degenerate.map((c) => c.edges_without_statistic));
    contrasts.push(` ${most} edge${most > 1 ? "s" : ""} had zero residual variance (for example, absent in every participant) and no statistic; ${most > 1 ? "they were" : "it was"} left out of the inference.`);
  }

  // 3. Inference.
  const inferenceText: Segment[] = [];
  const permuted = summary.contrasts.filter((c) => c.mode === "exact" || c.mode === "monte-carlo");
  if (permuted.length > 0) {
    // F contrasts have no direction (tail is upper for them); a mixed family names both statistics.
    const permutedF = permuted.filter((c) => c.statistic === "F").length;
    const stat = permutedF === 0 ? "t" : permutedF === permuted.length ? "F" : "statistic (t or F)";
    const rule =
      inference.tail === "both"
        ? `whose |${stat}| exceeded ${plain(inference.threshold)} (positive and negative edges separately)`
        : inference.tail === "lower"
          ? `whose ${stat} fell below −${plain(inference.threshold)}`
          : `whose ${stat} exceeded ${plain(inference.threshold)}`;
    const enhancedOnly = inference.method === "threshold-free" && inference.enhancement !== undefined;
    if (enhancedOnly) {
      const e = inference.enhancement!;
      inferenceText.push(
        `Family-wise error was controlled edge by edge with threshold-free enhancement (${cite("smithNichols", "Smith & Nichols 2009")}) applied to network components (${cite("baggio", "Baggio et al. 2018")}): each edge's statistic was replaced by the sum, over thresholds h = ${plain(e.step)}, ${plain(2 * e.step)}, … up to its statistic, of the extent of its component at h raised to ${plain(e.extent_exponent)}, times h raised to ${plain(e.height_exponent)}, times ${plain(e.step)}, and each edge's enhanced value was compared with the distribution, over relabelings of the data, of the largest enhanced value (${cite("westfallYoung", "Westfall & Young 1993")}); significant edges are reported with the components they form.`,
      );
    } else {
      inferenceText.push(
        `Family-wise error was controlled for connected subnetworks (${cite("zalesky", "Zalesky, Fornito & Bullmore 2010")}): edges ${rule} were kept, the connected components they formed were found, and the size of each was measured by its `,
      );
      inferenceText.push(
        inference.size === "mass"
          ? `mass, the sum over its edges of the amount by which ${stat === "t" ? "|t|" : stat} exceeded the threshold.`
          : "extent, the number of its edges.",
      );
      inferenceText.push(" Each observed component was compared with the distribution, over relabelings of the data, of the largest component's size.");
    }
    const schemes = [...new Set(permuted.map((c) => c.scheme ?? "permute"))];
    for (const scheme of schemes) {
      const which = schemes.length > 1 ? permuted.filter((c) => (c.scheme ?? "permute") === scheme) : [];
      const prefix: Segment[] = which.length > 0 ? [" For ", ...list(which, (c) => [{ user: c.name }]), ","] : [];
      if (scheme === "sign-flip") {
        inferenceText.push(
          ...prefix,
          ` ${prefix.length > 0 ? "r" : "R"}elabelings flipped the signs of the residuals of the model without the effect of interest at random (sign-flipping, which assumes symmetric rather than exchangeable errors; ${cite("winkler", "Winkler et al. 2014")}).`,
        );
      } else {
        inferenceText.push(
          ...prefix,
          ` ${prefix.length > 0 ? "r" : "R"}elabelings permuted the residuals of the model without the effect of interest, added back its fitted values and refitted the full model (${cite("freedmanLane", "Freedman & Lane 1983")}; ${cite("winkler", "Winkler et al. 2014")}).`,
        );
      }
    }
    // With repeated scans the blocks are the people, described with the design (repeatedMethods.ts).
    const blocks = permuted.find((c) => c.exchangeability_blocks)?.exchangeability_blocks;
    if (blocks && !summary.repeated) {
      inferenceText.push(" Relabelings respected exchangeability blocks given by ", { user: blocks.column }, ` (${plural(blocks.count, "block")}; `);
      inferenceText.push(blocks.permutation === "whole" ? "whole blocks were exchanged as units" : "participants were exchanged only within their block");
      inferenceText.push(`; ${cite("winkler", "Winkler et al. 2014")}).`);
    }
    const exact = permuted.filter((c) => c.mode === "exact");
    const monteCarlo = permuted.filter((c) => c.mode === "monte-carlo");
    if (monteCarlo.length > 0) {
      const counts = [...new Set(monteCarlo.map((c) => c.permutations))];
      const seeds = [...new Set(monteCarlo.map((c) => c.seed))];
      inferenceText.push(
        ` Relabelings were drawn at random (Monte Carlo; K = ${counts.map((k) => plain(k ?? NaN)).join(" or ")}, seed ${seeds.map((s) => plain(s ?? NaN)).join(", ")})` +
          `${exact.length > 0 ? ` for ${monteCarlo.length} contrast${monteCarlo.length > 1 ? "s" : ""}` : ""}, and ${enhancedOnly ? "an edge's" : "a component's"} family-wise error-corrected p-value was p_FWE = (1 + b)/(1 + K), where b of the K relabelings had ${enhancedOnly ? "a largest enhanced value" : "a largest component"} at least as large (${cite("phipsonSmyth", "Phipson & Smyth 2010")})${enhancedOnly ? "." : `; 95% Clopper–Pearson intervals give its Monte Carlo uncertainty (${cite("clopperPearson", "Clopper & Pearson 1934")}).`}`,
      );
    }
    if (exact.length > 0) {
      const counts = [...new Set(exact.map((c) => c.permutations))];
      inferenceText.push(
        ` For ${exact.length === permuted.length ? "every contrast" : `${exact.length} contrast${exact.length > 1 ? "s" : ""}`}, all ${counts.map((k) => plain(k ?? NaN)).join(" or ")} distinct relabelings were enumerated (an exact test), and p_FWE = b/M, where b of the M relabelings, the observed labelling among them, had ${enhancedOnly ? "a largest enhanced value" : "a largest component"} at least as large.`,
      );
    }
    if (inference.command_line_overrides) inferenceText.push(` ${overridesSentence(inference.command_line_overrides)}`);
    inferenceText.push(` ${enhancedOnly ? "Edges" : "Subnetworks"} with p_FWE ≤ ${plain(inference.alpha)} are reported as significant`);
    const critical = permuted.filter((c) => c.critical_size !== null && c.critical_size !== undefined && Number.isFinite(c.critical_size));
    if (critical.length > 0 && !enhancedOnly) {
      const mass = inference.size === "mass";
      const value = (c: (typeof critical)[number]) => (mass ? `a mass above ${count(c.critical_size!)}` : `more than ${count(c.critical_size!)} ${c.critical_size === 1 ? "edge" : "edges"}`);
      inferenceText.push("; at this level a subnetwork needed ");
      if (new Set(critical.map((c) => c.critical_size)).size === 1) {
        inferenceText.push(value(critical[0]));
      } else {
        inferenceText.push(...list(critical, (c) => [`${value(c)} for `, { user: c.name }]));
      }
    }
    inferenceText.push(".");
    const sweep = inference.thresholds ?? [];
    if (sweep.length > 1) {
      inferenceText.push(
        ` To show how the result depends on the primary threshold, the same relabelings were also thresholded at ${sweep
          .slice(1)
          .map((t) => plain(t))
          .join(", ")} (a threshold sweep); the components found at each threshold are tabulated separately.`,
      );
    }
    if (inference.method === "max-t") {
      inferenceText.push(
        ` Edge-level family-wise error was controlled by the maximum statistic over edges (${cite("westfallYoung", "Westfall & Young 1993")}): an edge's p_FWE compares its ${inference.tail === "both" ? "|t|" : "t"} with the largest one in each relabeling.`,
      );
    }
  }
  const fdrName =
    inference.fdr === "by"
      ? `the Benjamini–Yekutieli procedure, valid under any dependence between edges (${cite("benjaminiYekutieli", "Benjamini & Yekutieli 2001")})`
      : `the Benjamini–Hochberg procedure (${cite("benjaminiHochberg", "Benjamini & Hochberg 1995")})`;
  if (permuted.length === 0) {
    inferenceText.push(`The false discovery rate over edges was controlled by ${fdrName}; edges with q ≤ ${plain(inference.alpha)} are reported.`);
  } else {
    inferenceText.push(` Edge-wise q-values controlling the false discovery rate by ${fdrName} are also reported.`);
  }
  const acrossContrasts = acrossContrastsSentence(summary);
  inferenceText.push(...acrossContrasts.segments);

  // 4. The cohort table's tests.
  const paragraphs: Segment[][] = [model, contrasts, inferenceText];
  const cohort = cohortVariables(results);
  if (cohort.group) {
    const groups = cohort.group.levels.filter((_, g) => cohort.group!.codes.some((c) => c === g)).length;
    if (groups >= 2) {
      const numeric =
        groups === 2 ? `Welch's t-test (${cite("welch1947", "Welch 1947")})` : `Welch's one-way analysis of variance (${cite("welch1951", "Welch 1951")})`;
      paragraphs.push([
        "Participant characteristics were compared between the levels of ",
        { user: cohort.group.column },
        ` with ${numeric} for numeric variables and Pearson's chi-square test without continuity correction (${cite("pearson", "Pearson 1900")}) for categorical ones, or Fisher's exact test (${cite("fisherExact", "Fisher 1935")}) for a 2 × 2 table with an expected count below 5.`,
      ]);
    }
  }

  const references = [...new Set([...[...cited].map((key) => REFERENCES[key]), ...effectSizes.references, ...dataFigures.references, ...acrossContrasts.references, ...coverage.references])].sort();
  return { paragraphs, references };
}

const NUMBER_WORDS = ["zero", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten"];

/** Small whole numbers as words (style guides spell them out), others as digits. */
function numberWord(value: number): string {
  return NUMBER_WORDS[value] ?? String(value);
}

function capitalised(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/** "1 column", "4 columns": a count with its noun in the right number (regular plurals only). */
export function plural(value: number, noun: string, pluralNoun = `${noun}s`): string {
  return `${value} ${value === 1 ? noun : pluralNoun}`;
}

/**
 * User text inside a Markdown paragraph, shown as plain words: only what
 * Markdown would otherwise act on is backslash-escaped (backslash, backtick,
 * asterisk, angle brackets, ampersand, and an underscore at a word's edge; an
 * underscore inside a word, as in recall_score, is text to CommonMark), so
 * the rendered and the raw text read alike.
 */
export function plainMarkdown(text: string): string {
  return text
    .replace(/[\r\n]+/g, " ")
    .replace(/[\\`*<>&]/g, (c) => `\\${c}`)
    .replace(/_/g, (c, at: number, whole: string) => (/[\p{L}\p{N}]/u.test(whole[at - 1] ?? "") && /[\p{L}\p{N}]/u.test(whole[at + 1] ?? "") ? c : `\\${c}`));
}

/** Segments as one Markdown paragraph (plexus's own wording has no markup; user text is escaped). */
export function segmentsMarkdown(segments: Segment[]): string {
  return segments.map((s) => (typeof s === "string" ? s : plainMarkdown(s.user))).join("");
}

/** Segments as HTML text, everything escaped, user text as plain words like the rest. */
export function segmentsHtml(segments: Segment[]): string {
  return segments.map((s) => escapeHtml(typeof s === "string" ? s : s.user)).join("");
}

/** methods.md: a heading, the paragraphs and the references. */
export function methodsMarkdown(methods: MethodsText): string {
  const render = segmentsMarkdown;
  return [
    "## Statistical analysis",
    "",
    ...methods.paragraphs.flatMap((p) => [render(p), ""]),
    "### References",
    "",
    ...methods.references.map((r) => `- ${r}`),
    "",
  ].join("\n");
}

/** The paragraphs and references as HTML (everything escaped; user text as plain words). */
export function methodsHtml(methods: MethodsText): string {
  const render = segmentsHtml;
  return [
    ...methods.paragraphs.map((p) => `<p>${render(p)}</p>`),
    `<h3>References</h3>`,
    `<ul class="references">`,
    ...methods.references.map((r) => `<li>${escapeHtml(r)}</li>`),
    `</ul>`,
  ].join("\n");
}
