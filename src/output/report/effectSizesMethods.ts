import type { ResultsSummary } from "./loadResults.js";
import { plain } from "./printNumbers.js";
import type { Segment } from "./methodsSegment.js";

// Full references, from memory of these well-known works.
const REFERENCES = {
  cohen: "Cohen J (1988). Statistical Power Analysis for the Behavioral Sciences, 2nd edition. Hillsdale, NJ: Lawrence Erlbaum.",
  steigerFouladi:
    "Steiger JH, Fouladi RT (1997). Noncentrality interval estimation and the evaluation of statistical models. In: Harlow LL, Mulaik SA, Steiger JH (eds), What If There Were No Significance Tests? Mahwah, NJ: Lawrence Erlbaum, 221–257.",
  cummingFinch:
    "Cumming G, Finch S (2001). A primer on the understanding, use, and calculation of confidence intervals that are based on central and noncentral distributions. Educational and Psychological Measurement 61:532–574.",
} as const;

/**
 * The methods text's sentence on effect sizes (summary.json `effect_sizes`):
 * the estimate's interval for every t contrast, Cohen's d with its
 * noncentral-t interval for contrasts between two levels, and the levels'
 * means back on the correlation scale. Nothing for results without the block.
 */
export function effectSizesMethods(summary: ResultsSummary): { segments: Segment[]; references: string[] } {
  const block = summary.effect_sizes;
  if (!block || block.contrasts.length === 0) return { segments: [], references: [] };
  const percent = `${plain(100 * block.confidence_level)}%`;
  const segments: Segment[] = [
    ` For ${block.contrasts.length === 1 ? "the t contrast" : "each t contrast"}, the ${percent} confidence interval of the estimate was the estimate ± the ${plain(50 + 50 * block.confidence_level)}th percentile of the t distribution with ${plain(summary.df)} degrees of freedom times its standard error`,
  ];
  const references: string[] = [];
  const withD = block.contrasts.filter((c) => c.cohens_d);
  if (withD.length > 0) {
    segments.push("; for ");
    withD.forEach((c, k) => {
      if (k > 0) segments.push(k === withD.length - 1 ? " and " : ", ");
      segments.push({ user: c.name }, " (", { user: c.cohens_d!.levels[0] }, " vs ", { user: c.cohens_d!.levels[1] }, ")");
    });
    segments.push(
      `, which compare${withD.length === 1 ? "s" : ""} two levels of a factor, Cohen's d (Cohen 1988) was the estimate divided by the residual standard deviation of the full model, with a ${percent} interval from the noncentral t distribution (the noncentrality interval of the observed t, rescaled; Steiger & Fouladi 1997; Cumming & Finch 2001)`,
    );
    references.push(REFERENCES.cohen, REFERENCES.steigerFouladi, REFERENCES.cummingFinch);
    if (withD.some((c) => c.level_means)) {
      segments.push(", and the two levels' model means (numeric covariates at their means, other factors at their observed proportions) were back-transformed to correlations (r = tanh z)");
    }
  }
  segments.push(".");
  return { segments, references };
}
