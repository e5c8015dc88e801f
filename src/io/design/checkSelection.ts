import { isMap, isScalar, isSeq, type Node } from "yaml";
import { InputError } from "../../errors.js";
import { COHORT_TABLE_KEYS, DESIGN_KEYS } from "./designKeys.js";
import { DesignSection } from "./designSection.js";
import type { CohortTableSpec, SelectionSpec } from "./designSpec.js";

// The two keys that say who is analysed and how they are described:
// `select` (the analysed subset) and `cohort_table` (Table 1's grouping and variables).
// Shapes only here; the columns and values are checked against the participants
// table in run/prepareAnalysis.ts (io/selectParticipants.ts).

/**
 * select: { column: [value, ...] } (one value may be written alone). Values are
 * cell texts: a number or boolean is taken as the file writes it (`[1]` keeps
 * cells reading `1`, not `1.0`).
 */
export function checkSelect(top: DesignSection): SelectionSpec[] | undefined {
  const node = top.node("select");
  if (node === undefined) return undefined;
  const example = "e.g. select: { group: [patient] }";
  if (!isMap(node) || node.items.length === 0) {
    throw new InputError("'select' maps a column of the participants table to the values kept", top.where("select"), example);
  }
  const limit = DESIGN_KEYS.select.limit;
  const selection: SelectionSpec[] = [];
  for (const pair of node.items) {
    const column = isScalar(pair.key) ? String(pair.key.value).trim() : "";
    const key = `select.${column}`;
    const where = { file: top.yaml.file, key, line: top.yaml.lines.get(key) ?? top.where("select").line };
    if (column === "") throw new InputError("'select' needs column names as its keys", where, example);
    const value = pair.value as Node | null;
    const items = isSeq(value) ? value.items : [value];
    const values = items.map((item) => cellText(top, item as Node | null));
    if (items.length === 0 || items.length > limit || !values.every((v): v is string => v !== undefined)) {
      throw new InputError(
        `'${key}' lists the cell texts kept: 1 to ${limit.toLocaleString("en-US")} texts or numbers without tabs or surrounding spaces`,
        where,
        example,
      );
    }
    selection.push({ column, values: [...new Set(values)], line: where.line });
  }
  return selection;
}

/** A scalar's cell text: a text as is, a number or boolean as written; undefined for anything else. */
function cellText(top: DesignSection, item: Node | null): string | undefined {
  if (!isScalar(item)) return undefined;
  let text: string;
  if (typeof item.value === "string") text = item.value;
  else if (typeof item.value === "number" || typeof item.value === "boolean") text = top.yaml.written(item);
  else return undefined;
  return text === "" || text !== text.trim() || /[\t\r\n]/.test(text) ? undefined : text;
}

/** cohort_table: { by: column | null, variables: [column, ...] }. */
export function checkCohortTable(top: DesignSection): CohortTableSpec | undefined {
  const node = top.node("cohort_table");
  if (node === undefined) return undefined;
  if (!isMap(node)) {
    throw new InputError("'cohort_table' must be a mapping", top.where("cohort_table"), "e.g. cohort_table: { by: group, variables: [age, sex, education] }");
  }
  const section = new DesignSection(top.yaml, node, COHORT_TABLE_KEYS, "cohort_table");
  const spec: CohortTableSpec = {};
  const by = section.value("by");
  if (by === null) spec.by = null;
  else if (by !== undefined) {
    if (typeof by !== "string" || by.trim() === "") {
      throw new InputError("'cohort_table.by' names a column of the participants table (or ~ for one column of every analysed participant)", section.where("by"));
    }
    spec.by = by.trim();
  }
  const variables = section.value("variables");
  if (variables !== undefined) {
    const list = typeof variables === "string" ? [variables] : variables;
    const limit = COHORT_TABLE_KEYS.variables.limit;
    if (!Array.isArray(list) || list.length > limit || !list.every((v) => typeof v === "string" && v.trim() !== "")) {
      throw new InputError(
        `'cohort_table.variables' lists columns of the participants table (at most ${limit}), e.g. [age, sex, education]`,
        section.where("variables"),
      );
    }
    spec.variables = [...new Set((list as string[]).map((v) => v.trim()))];
  }
  return spec;
}
