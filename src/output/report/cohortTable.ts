import type { Cell } from "../tsvWriter.js";
import { cohortVariables, type CohortVariable, type CohortVariables } from "./cohortVariables.js";
import type { LoadedResults } from "./loadResults.js";
import { decimalsFor, fixed, MISSING, percent, pValue } from "./printNumbers.js";
import type { ReportTable, TableRow, TsvTable } from "./reportTable.js";
import { selectedCount } from "./selectionMethods.js";
import { chiSquareIndependence } from "../../statistics/chiSquareIndependence.js";
import { describe } from "../../statistics/describe.js";
import { fisherExact2x2 } from "../../statistics/fisherExact2x2.js";
import { welchAnova } from "../../statistics/welchAnova.js";
import { welchTTest } from "../../statistics/welchTTest.js";
import { selectionText as selectionWords } from "../../io/selectParticipants.js";

/**
 * The cohort table (participant characteristics by group): n; mean ± SD (and
 * optionally median [IQR]) of each numeric column; counts and % of each level
 * of a categorical one; and a test of a group difference per variable:
 *   numeric, 2 groups:   Welch's t-test (Welch 1947);
 *   numeric, > 2 groups: Welch's one-way ANOVA (Welch 1951), which like the
 *                        t-test does not assume equal variances;
 *   categorical:         Pearson's chi-square test of independence, or
 *                        Fisher's exact test for a 2 × 2 table with an
 *                        expected count below 5 (larger tables keep the
 *                        chi-square test and are flagged).
 * Only the subjects the analysis used are described; percentages are of the
 * group's subjects with a value.
 */
export interface CohortOptions {
  /** Add a median [IQR] row under each numeric variable. */
  median?: boolean;
}

export interface GroupTest {
  /** "welch-t" | "welch-anova" | "chi-square" | "fisher-exact". */
  test: string;
  statistic: number;
  df: number;
  df2: number;
  pValue: number;
  minExpected: number;
  /** Chi-square on a table larger than 2 × 2 with an expected count below 5. */
  smallExpected: boolean;
}

export interface CohortTables {
  print: ReportTable;
  /** tables/cohort.tsv (descriptives, long format) and tables/cohort_tests.tsv. */
  tsv: TsvTable[];
}

const SMALL_EXPECTED_NOTE = "* At least one expected count is below 5, so the chi-square approximation may be poor.";

export function cohortTables(results: LoadedResults, options: CohortOptions = {}): CohortTables {
  const cohort = cohortVariables(results);
  const groups = groupMembers(cohort);
  const columns: ReportTable["columns"] = [{ header: "Characteristic", align: "left" }];
  for (const g of groups) columns.push({ header: `${g.label} (n = ${g.members.length})`, align: "right" });
  const testing = groups.length >= 2;
  if (testing) columns.push({ header: "Test", align: "left" }, { header: "p", align: "right" });

  const rows: TableRow[] = [];
  const describeRows: Cell[][] = [];
  const testRows: Cell[][] = [];
  const notes: string[] = [];
  const pad = (cells: string[], test?: GroupTest): string[] =>
    testing ? [...cells, test ? testLabel(test) : "", test ? pValue(test.pValue) : ""] : cells;

  rows.push({ cells: pad(["Participants, n", ...groups.map((g) => String(g.members.length))]) });
  for (const g of groups) describeRows.push(["participants", "", g.tsvGroup, g.members.length, null, null, null, null, null, null, null]);

  let smallExpected = false;
  for (const variable of cohort.variables) {
    if (variable.kind === "numeric") {
      const samples = groups.map((g) => presentNumbers(variable, g.members));
      const descriptions = samples.map(describe);
      const decimals = decimalsFor(Math.max(...descriptions.map((d) => (Number.isFinite(d.sd) ? d.sd : 0))));
      const test = testing ? numericTest(samples) : undefined;
      const missing = groups.map((g) => g.members.length - presentNumbers(variable, g.members).length);
      const missingNote = missing.some((m) => m > 0) ? ` (missing: ${missing.join(", ")})` : "";
      rows.push({
        cells: pad(
          [`${variable.column}, mean ± SD${missingNote}`, ...descriptions.map((d) => (d.n > 0 ? `${fixed(d.mean, decimals)} ± ${fixed(d.sd, decimals)}` : MISSING))],
          test,
        ),
      });
      if (options.median) {
        rows.push({
          cells: pad([
            `${variable.column}, median [IQR]`,
            ...descriptions.map((d) => (d.n > 0 ? `${fixed(d.median, decimals)} [${fixed(d.q1, decimals)}, ${fixed(d.q3, decimals)}]` : MISSING)),
          ]),
        });
      }
      groups.forEach((g, k) => {
        const d = descriptions[k];
        describeRows.push([variable.column, "", g.tsvGroup, d.n, d.mean, d.sd, d.median, d.q1, d.q3, null, null]);
      });
      if (test) testRows.push(testRow(variable.column, test));
    } else {
      const counts = variable.levels.map((level) => groups.map((g) => g.members.filter((k) => variable.values[k] === level).length));
      const present = groups.map((_, j) => counts.reduce((s, row) => s + row[j], 0));
      const test = testing ? categoricalTest(counts) : undefined;
      if (test?.smallExpected) smallExpected = true;
      const missing = groups.map((g, j) => g.members.length - present[j]);
      const missingNote = missing.some((m) => m > 0) ? ` (missing: ${missing.join(", ")})` : "";
      rows.push({ cells: pad([`${variable.column}, n (%)${missingNote}`, ...groups.map(() => "")], test) });
      variable.levels.forEach((level, i) => {
        rows.push({ cells: pad([level, ...groups.map((_, j) => `${counts[i][j]} (${percent(counts[i][j], present[j])})`)]), indent: true });
        groups.forEach((g, j) => {
          describeRows.push([variable.column, level, g.tsvGroup, present[j], null, null, null, null, null, counts[i][j], present[j] > 0 ? (100 * counts[i][j]) / present[j] : null]);
        });
      });
      if (test) testRows.push(testRow(variable.column, test));
    }
  }

  if (testing) {
    notes.push(
      groups.length === 2
        ? "Tests: Welch's t-test for numeric variables; Pearson's chi-square test (no continuity correction) for categorical ones, or Fisher's exact test (two-sided) for a 2 × 2 table with an expected count below 5."
        : "Tests: Welch's one-way ANOVA for numeric variables; Pearson's chi-square test (no continuity correction) for categorical ones, or Fisher's exact test (two-sided) for a 2 × 2 table with an expected count below 5.",
    );
  }
  if (smallExpected) notes.push(SMALL_EXPECTED_NOTE);
  if (cohort.group) {
    const ungrouped = cohort.group.codes.filter((c) => c < 0).length;
    if (ungrouped > 0) {
      notes.push(`${ungrouped} analysed participant${ungrouped > 1 ? "s have" : " has"} no value of ${cohort.group.column} and ${ungrouped > 1 ? "are" : "is"} in no column.`);
    }
  }
  notes.push(...selectionNotes(results), ...excludedNotes(results));

  const title = cohort.group ? `Participant characteristics by ${cohort.group.column}` : "Participant characteristics";
  return {
    print: { id: "cohort", title, columns, rows, notes },
    tsv: [
      {
        name: "cohort",
        header: ["variable", "level", "group", "n", "mean", "sd", "median", "q1", "q3", "count", "percent"],
        rows: describeRows,
      },
      {
        name: "cohort_tests",
        header: ["variable", "test", "statistic", "df", "df2", "p_value", "min_expected", "groups"],
        rows: testRows.map((row) => [...row, groups.map((g) => g.tsvGroup).join(",")]),
      },
    ],
  };
}

interface GroupMembers {
  label: string;
  tsvGroup: string;
  /** Row numbers into the variables' value arrays (positions among the used subjects). */
  members: number[];
}

function groupMembers(cohort: CohortVariables): GroupMembers[] {
  const all = cohort.used.map((_, k) => k);
  if (!cohort.group) return [{ label: "All", tsvGroup: "all", members: all }];
  const { levels, codes } = cohort.group;
  return levels
    .map((level, g) => ({ label: level, tsvGroup: level, members: all.filter((k) => codes[k] === g) }))
    .filter((g) => g.members.length > 0);
}

function presentNumbers(variable: Extract<CohortVariable, { kind: "numeric" }>, members: number[]): number[] {
  const out: number[] = [];
  for (const k of members) {
    const v = variable.values[k];
    if (v !== null) out.push(v);
  }
  return out;
}

export function numericTest(samples: number[][]): GroupTest {
  if (samples.length === 2) {
    const t = welchTTest(samples[0], samples[1]);
    return { test: "welch-t", statistic: t.statistic, df: t.df, df2: NaN, pValue: t.pValue, minExpected: NaN, smallExpected: false };
  }
  const f = welchAnova(samples);
  return { test: "welch-anova", statistic: f.statistic, df: f.df1, df2: f.df2, pValue: f.pValue, minExpected: NaN, smallExpected: false };
}

/** counts[level][group]. */
export function categoricalTest(counts: number[][]): GroupTest {
  const chi = chiSquareIndependence(counts);
  if (chi.rows === 2 && chi.columns === 2 && chi.minExpected < 5) {
    const nonEmptyRows = counts.filter((row) => row.some((v) => v > 0));
    const used = nonEmptyRows[0].map((_, j) => j).filter((j) => nonEmptyRows.some((row) => row[j] > 0));
    const table: [[number, number], [number, number]] = [
      [nonEmptyRows[0][used[0]], nonEmptyRows[0][used[1]]],
      [nonEmptyRows[1][used[0]], nonEmptyRows[1][used[1]]],
    ];
    return { test: "fisher-exact", statistic: NaN, df: NaN, df2: NaN, pValue: fisherExact2x2(table), minExpected: chi.minExpected, smallExpected: false };
  }
  return {
    test: "chi-square",
    statistic: chi.statistic,
    df: chi.df,
    df2: NaN,
    pValue: chi.pValue,
    minExpected: chi.minExpected,
    smallExpected: chi.minExpected < 5,
  };
}

function testLabel(test: GroupTest): string {
  if (!Number.isFinite(test.pValue)) return "not testable";
  switch (test.test) {
    case "welch-t":
      return `Welch's t = ${fixed(test.statistic, 2)}, df = ${fixed(test.df, 1)}`;
    case "welch-anova":
      return `Welch's F = ${fixed(test.statistic, 2)}, df = ${fixed(test.df, 0)}, ${fixed(test.df2, 1)}`;
    case "fisher-exact":
      return "Fisher's exact";
    default:
      return `χ² = ${fixed(test.statistic, 2)}, df = ${fixed(test.df, 0)}${test.smallExpected ? " *" : ""}`;
  }
}

function testRow(variable: string, test: GroupTest): Cell[] {
  return [variable, test.test, test.statistic, test.df, test.df2, test.pValue, test.minExpected];
}

/**
 * "Excluded from the analysis: k of N participants (missing age: 2; …)." or
 * nothing; with `select`, N counts the selected participants only (the others
 * were not analysed by design, see selectionNotes).
 */
function excludedNotes(results: LoadedResults): string[] {
  const { excluded, not_selected: notSelected = 0 } = results.summary.subjects;
  if (excluded.length === 0) return [];
  const reasons = new Map<string, number>();
  for (const x of excluded) reasons.set(x.reason, (reasons.get(x.reason) ?? 0) + 1);
  const list = [...reasons].map(([reason, n]) => `${reason}: ${n}`).join("; ");
  return [
    `Excluded from the analysis: ${excluded.length} of ${selectedCount(results.summary.subjects)} ${notSelected > 0 ? "selected " : ""}${results.summary.repeated ? "scans" : "participants"} (${list}).`,
  ];
}

/** "Analysed subset (select): group = patient (30 of the 60 participants listed)." or nothing. */
function selectionNotes(results: LoadedResults): string[] {
  const { selection, in_table: inTable } = results.summary.subjects;
  if (!selection) return [];
  return [`Analysed subset: ${selectionText(selection)} (${selectedCount(results.summary.subjects)} of the ${inTable} participants listed).`];
}

/** summary.json's `subjects.selection` in words, as `plexus check` prints it: "site = north or south and group = patient". */
export function selectionText(selection: Record<string, string[]>): string {
  return selectionWords(Object.entries(selection).map(([column, values]) => ({ column, values })));
}

/** Excluded participants (ID, line of the participants table, reason): the print table and tables/excluded.tsv. */
export function excludedTables(results: LoadedResults): { print: ReportTable; tsv: TsvTable } {
  const excluded = results.summary.subjects.excluded;
  return {
    print: {
      id: "excluded",
      title: results.summary.repeated ? "Scans excluded from the analysis" : "Participants excluded from the analysis",
      columns: [
        { header: results.summary.repeated ? "Scan" : "Participant", align: "left" },
        { header: "Line", align: "right" },
        { header: "Reason", align: "left" },
      ],
      rows: excluded.map((x) => ({ cells: [x.participant_id, String(x.line), x.reason] })),
      notes: ["Line: the line of the participants table."],
    },
    tsv: { name: "excluded", header: ["participant_id", "line", "reason"], rows: excluded.map((x) => [x.participant_id, x.line, x.reason]) },
  };
}
