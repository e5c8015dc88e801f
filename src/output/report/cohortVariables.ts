import { InputError } from "../../errors.js";
import type { LoadedResults } from "./loadResults.js";
import { personRows } from "./personRows.js";

/**
 * The participant characteristics the cohort table (Table 1) describes, read
 * from subjects.tsv for the participants the analysis used. This is the one
 * place that decides what Table 1 groups by and which columns it describes:
 *   - with summary.json's `cohort_table` (the design's `cohort_table`, or its
 *     defaults: the factor the first t contrast compares, else one group of
 *     everyone), its `by` and `variables`, in that order;
 *   - in a folder written before `cohort_table` existed: the first factor of
 *     the model, and every other column of subjects.tsv.
 * A column the design coded as a factor is categorical; any other column is
 * numeric when every value present among the analysed participants reads as a
 * number, categorical otherwise.
 */
export interface CohortVariables {
  /** The grouping column and its levels in the design's order; null for one group of everyone. */
  group: { column: string; levels: string[]; codes: Int32Array } | null;
  /** Rows of subjects.tsv that the analysis used, in file order. */
  used: number[];
  variables: CohortVariable[];
}

export type CohortVariable =
  | { kind: "numeric"; column: string; values: (number | null)[] }
  | { kind: "categorical"; column: string; levels: string[]; values: (string | null)[] };

const NUMBER = /^\s*[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?\s*$/;

export function cohortVariables(results: LoadedResults): CohortVariables {
  const { subjects, summary } = results;
  const people = personRows(results);
  const used = people ? people.used : subjects.rows.map((row, k) => (row.included ? k : -1)).filter((k) => k >= 0);
  const factorLevels = summary.design.levels ?? {};
  const columnValues = (c: number) => used.map((k) => subjects.rows[k].values[c]);
  const indexOf = (name: string): number => {
    const index = subjects.columns.indexOf(name);
    if (index < 0) {
      throw new InputError(`summary.json's cohort_table names '${name}', which is not a column of subjects.tsv`, { file: `${results.dir}/subjects.tsv` });
    }
    return index;
  };

  const chosen = summary.cohort_table;
  const groupIndex = chosen
    ? chosen.by === null
      ? -1
      : indexOf(chosen.by)
    : subjects.columns.findIndex((name) => !people?.skip.has(name) && Object.hasOwn(factorLevels, name));
  let group: CohortVariables["group"] = null;
  if (groupIndex >= 0) {
    const column = subjects.columns[groupIndex];
    const values = columnValues(groupIndex);
    const levels = orderedLevels(factorLevels[column], values);
    group = { column, levels, codes: Int32Array.from(values, (v) => (v === null ? -1 : levels.indexOf(v))) };
  }

  const described = chosen ? chosen.variables.map(indexOf) : subjects.columns.map((_, c) => c);
  const variables: CohortVariable[] = [];
  for (const c of described) {
    const column = subjects.columns[c];
    if (c === groupIndex || people?.skip.has(column)) continue;
    const values = columnValues(c);
    const present = values.filter((v): v is string => v !== null);
    if (!Object.hasOwn(factorLevels, column) && present.length > 0 && present.every((v) => NUMBER.test(v))) {
      variables.push({ kind: "numeric", column, values: values.map((v) => (v === null ? null : Number(v))) });
    } else {
      variables.push({ kind: "categorical", column, levels: orderedLevels(factorLevels[column], values), values });
    }
  }
  return { group, used, variables };
}

/** The design's level order when known, then any other value in order of first appearance. */
function orderedLevels(designLevels: string[] | undefined, values: (string | null)[]): string[] {
  const levels = [...(designLevels ?? [])];
  for (const v of values) if (v !== null && !levels.includes(v)) levels.push(v);
  return levels;
}
