import type { ContrastSummary, ResultsSummary } from "./loadResults.js";
import { contrastRows } from "./loadResults.js";
import type { Segment } from "./methodsText.js";

/** The two clauses a contrast's sign gives: what a positive and a negative statistic mean, in words. */
export interface ContrastDirection {
  positive: Segment[];
  negative: Segment[];
  /** The same in a few words for a table cell: "patient > control", "increases with age". */
  label: { positive: string; negative: string };
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
    label: { positive: "contrast > 0", negative: "contrast < 0" },
  };
  const interacting = (variable: string) => columns.some((c) => c.includes(":") && c.includes(`${variable}[`));
  const levelOf = (j: number): { variable: string; level: string } | null => {
    const match = LEVEL_COLUMN.exec(columns[j] ?? "");
    if (!match || !(match[1] in levels) || match[1].includes(":") || interacting(match[1])) return null;
    return { variable: match[1], level: match[2] };
  };
  const comparison = (variable: string, high: string, low: string): Segment[] =>
    repeated && variable === repeated.within
      ? [`${measured} was greater at `, { user: high }, " than at ", { user: low }]
      : [`${quantity} was greater in the `, { user: high }, " group than in the ", { user: low }, " group"];
  const twoWay = (variable: string, first: string, second: string): ContrastDirection => ({
    positive: comparison(variable, first, second),
    negative: comparison(variable, second, first),
    label: { positive: `${first} > ${second}`, negative: `${second} > ${first}` },
  });

  if (used.length === 1) {
    const j = used[0];
    const sign = Math.sign(vector[j]);
    const column = columns[j] ?? "";
    const orient = (d: ContrastDirection): ContrastDirection =>
      sign > 0 ? d : { positive: d.negative, negative: d.positive, label: { positive: d.label.negative, negative: d.label.positive } };
    if (paired && repeated && j === 0 && column.includes(" - ")) {
      return orient(twoWay(repeated.within, repeated.levels[1], repeated.levels[0]));
    }
    if (column === "intercept") {
      return orient({
        positive: [`${quantity} was greater than zero`],
        negative: [`${quantity} was below zero`],
        label: { positive: "above zero", negative: "below zero" },
      });
    }
    const level = levelOf(j);
    if (level) {
      const reference = levels[level.variable][0];
      if (!summary.design.coding.startsWith("treatment") || reference === level.level) return fallback;
      return orient(twoWay(level.variable, level.level, reference));
    }
    if (!column.includes(":") && !LEVEL_COLUMN.test(column) && !column.startsWith("person[")) {
      return orient({
        positive: [`${quantity} increased with `, { user: column }],
        negative: [`${quantity} decreased with `, { user: column }],
        label: { positive: `increases with ${column}`, negative: `decreases with ${column}` },
      });
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

