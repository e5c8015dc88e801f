import type { LoadedResults } from "./loadResults.js";

/**
 * With several scans per person (summary.json `repeated`), the cohort table
 * describes people, not scans: one row per person, the first included row of
 * subjects.tsv for each value of the participant column (between-person
 * columns are constant over a person's scans, so the first row holds them;
 * a column that changes between scans is described at the person's first
 * scan). The participant and within columns themselves are not described.
 * Undefined for a design with one scan per person.
 */
export function personRows(results: LoadedResults): { used: number[]; skip: Set<string> } | undefined {
  const repeated = results.summary.repeated;
  if (!repeated) return undefined;
  const { subjects } = results;
  const column = subjects.columns.indexOf(repeated.participant);
  const seen = new Set<string>();
  const used: number[] = [];
  subjects.rows.forEach((row, k) => {
    if (!row.included) return;
    const who = column >= 0 ? (row.values[column] ?? row.id) : row.id;
    if (seen.has(who)) return;
    seen.add(who);
    used.push(k);
  });
  return { used, skip: new Set([repeated.participant, repeated.within]) };
}
