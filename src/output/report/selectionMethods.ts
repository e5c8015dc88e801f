import type { ResultsSummary } from "./loadResults.js";
import type { Segment } from "./methodsSegment.js";

/**
 * The methods' sentence on the design's `select`: "Analyses were restricted to
 * participants with group = patient (n = 30 of the 60 listed)." — nothing
 * without a selection. The participants outside it were not analysed by
 * design and are never counted as excluded.
 */
export function selectionSentence(subjects: ResultsSummary["subjects"]): Segment[] {
  const { selection } = subjects;
  if (!selection) return [];
  const selected = selectedCount(subjects);
  const segments: Segment[] = ["Analyses were restricted to participants with "];
  Object.entries(selection).forEach(([column, values], k) => {
    if (k > 0) segments.push(" and ");
    segments.push({ user: column }, " = ");
    values.forEach((value, j) => {
      if (j > 0) segments.push(" or ");
      segments.push({ user: value });
    });
  });
  segments.push(` (n = ${selected} of the ${subjects.in_table} listed). `);
  return segments;
}

/** Whom the missing-value exclusions are counted among: the selected participants, or everyone listed. */
export function exclusionDenominator(subjects: ResultsSummary["subjects"]): string {
  return subjects.selection ? `${selectedCount(subjects)} selected participants` : `${subjects.in_table} participants listed`;
}

/** Rows of the participants table inside the design's `select` (every row listed when there is none). */
export function selectedCount(subjects: ResultsSummary["subjects"]): number {
  return subjects.in_table - (subjects.not_selected ?? 0);
}
