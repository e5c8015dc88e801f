import type { Segment } from "../output/report/methodsSegment.js";
import type { ResultsSummary } from "../output/report/loadResults.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import type { StrengthAnalysis } from "./strengthAnalysis.js";

/**
 * Words and small pieces shared by strength's methods and results text:
 * numbers as words, lists, the measured quantity's nouns, and the design read
 * as a run's summary.json says it (for the run's sentence helpers).
 */
const NUMBER_WORDS = ["zero", "one", "two", "three", "four", "five", "six", "seven", "eight", "nine", "ten"];

/** Small whole numbers as words (style guides spell them out), others as digits. */
export function numberWord(value: number): string {
  return NUMBER_WORDS[value] ?? String(value);
}

export function capitalised(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/** Items joined as "a", "a and b", "a, b and c" (segments; user text stays apart). */
export function listed<T>(items: readonly T[], render: (item: T) => Segment[]): Segment[] {
  return items.flatMap((item, k) => [...(k === 0 ? [] : [k === items.length - 1 ? " and " : ", "]), ...render(item)]);
}

/** What one measure is called in a sentence, singular and plural. */
export interface MeasureNouns {
  /** "region", "subnetwork", "measure". */
  one: string;
  many: string;
  /** What a contrast compares, in words: "strength", "global strength", "mean connectivity". */
  quantity: string;
}

export function measureNouns(analysis: StrengthAnalysis): MeasureNouns {
  switch (analysis.choice.measure) {
    case "nodal":
      return { one: "region", many: "regions", quantity: "strength" };
    case "global":
      return { one: "measure", many: "measures", quantity: "global strength" };
    default:
      return { one: "subnetwork", many: "subnetworks", quantity: "mean connectivity" };
  }
}

/** "1 region", "60 regions". */
export function counted(value: number, nouns: Pick<MeasureNouns, "one" | "many">): string {
  return `${value} ${value === 1 ? nouns.one : nouns.many}`;
}

/** The design as a run's summary.json records it (what contrastDirection and the selection sentence read). */
export function designView(prepared: PreparedAnalysis): Pick<ResultsSummary, "design" | "subjects"> {
  const { matrix, design } = prepared;
  const levels: Record<string, string[]> = {};
  const centered: Record<string, number> = {};
  for (const variable of matrix.variables.values()) {
    if (variable.kind === "factor") levels[variable.name] = variable.levels;
    if (variable.kind === "numeric" && design.center.includes(variable.name)) centered[variable.name] = variable.center;
  }
  return {
    design: {
      model: design.model,
      intercept: prepared.formula.intercept,
      columns: matrix.columns.map((c) => c.name),
      coding: "treatment (first level is the reference)",
      levels,
      centered,
      rank: matrix.cols,
    },
    subjects: {
      in_table: prepared.participants.ids.length,
      used: prepared.kept.length,
      used_ids: prepared.kept.map((k) => k.id),
      excluded: prepared.excluded.map((x) => ({ participant_id: x.id, line: x.line, reason: x.reason })),
      selection: design.select.length > 0 ? Object.fromEntries(design.select.map((s) => [s.column, s.values])) : null,
      not_selected: prepared.notSelected.length,
    },
  };
}

/** A number for prose: the typographic minus sign in place of the hyphen. */
export function signed(text: string): string {
  return text.startsWith("-") ? `−${text.slice(1)}` : text;
}
