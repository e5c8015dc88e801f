import { InputError, type InputLocation } from "../errors.js";
import type { CohortTableSpec } from "../io/design/designSpec.js";
import { nearestName } from "../io/nearestName.js";
import { PARTICIPANT_ID, type ParticipantsTable } from "../io/participants.js";
import { printable } from "../io/printable.js";
import type { Contrast } from "../model/contrast.js";
import type { DesignMatrix } from "../model/designMatrix.js";
import type { CohortTableChoice } from "../output/preparedAnalysis.js";

/** Table 1 groups by a categorical column: at most this many different values among the analysed participants. */
export const COHORT_GROUPS_LIMIT = 20;

/**
 * Table 1's grouping and variables. `by`: the design's `cohort_table.by`
 * (`~`: none); else the factor compared by the first t contrast that weights
 * only the level columns of one factor (`group[patient] - group[control]`);
 * else none (one column, "All") — never a factor no contrast compares.
 * `variables`: the design's list; else the model's columns and the blocks
 * column, in that order. `by` is never among the variables.
 */
export function chooseCohortTable(options: {
  spec: CohortTableSpec;
  participants: ParticipantsTable;
  /** Rows of the analysed participants. */
  rows: readonly number[];
  matrix: DesignMatrix;
  contrasts: readonly Contrast[];
  defaultVariables: readonly string[];
  /** A repeated design's person and within-person columns: Table 1 describes people, so it never groups by these or lists them by default. */
  personColumns?: readonly string[];
  where: (key: string) => InputLocation;
}): CohortTableChoice {
  const { spec, participants, rows, matrix, contrasts, where } = options;
  const column = (name: string, key: string) => {
    if (name === PARTICIPANT_ID) {
      throw new InputError(`'${key}' cannot be '${PARTICIPANT_ID}': every participant would be a row of its own`, where(key));
    }
    if (!participants.columns.has(name)) {
      const near = nearestName(name, participants.header);
      throw new InputError(
        `'${key}' names '${printable(name)}', which is not a column of ${participants.file}`,
        where(key),
        near ? `did you mean '${near}'?` : `columns: ${participants.header.join(", ")}`,
      );
    }
  };
  let by: string | null;
  let byFrom: CohortTableChoice["byFrom"];
  if (spec.by !== undefined) {
    by = spec.by;
    byFrom = "design";
    if (by !== null) {
      column(by, "cohort_table.by");
      const cells = participants.columns.get(by)!;
      const distinct = new Set(rows.map((r) => cells[r]).filter((c) => c !== null));
      if (distinct.size > COHORT_GROUPS_LIMIT) {
        throw new InputError(
          `'cohort_table.by' is '${printable(by)}', which has ${distinct.size} different values among the analysed participants; Table 1 groups by a categorical column (at most ${COHORT_GROUPS_LIMIT} groups)`,
          where("cohort_table.by"),
          "name a categorical column (e.g. group), or list a numeric one under `cohort_table.variables`",
        );
      }
    }
  } else {
    by = comparedFactor(matrix, contrasts);
    if (by !== null && options.personColumns?.includes(by)) by = null;
    byFrom = by === null ? "none" : "first contrast";
  }
  if (spec.variables) for (const name of spec.variables) column(name, "cohort_table.variables");
  const variables = (spec.variables ?? options.defaultVariables.filter((name) => !options.personColumns?.includes(name))).filter((name) => name !== by && name !== PARTICIPANT_ID);
  return { by, byFrom, variables: [...new Set(variables)] };
}

/** The factor whose levels the first such t contrast compares: every weighted design column is a level column of that one factor. */
export function comparedFactor(matrix: DesignMatrix, contrasts: readonly Contrast[]): string | null {
  for (const contrast of contrasts) {
    if (contrast.kind !== "t") continue;
    const factors = new Set<string>();
    let pure = true;
    contrast.vector.forEach((weight, j) => {
      if (weight === 0) return;
      const parts = matrix.columns[j].parts;
      if (parts.length === 1 && parts[0].level !== undefined) factors.add(parts[0].variable);
      else pure = false;
    });
    if (pure && factors.size === 1) return [...factors][0];
  }
  return null;
}
