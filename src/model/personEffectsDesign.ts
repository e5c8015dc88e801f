import type { InputLocation } from "../errors.js";
import { assemble, type FittedDesign } from "./changeDesign.js";
import type { DesignColumn, DesignMatrix } from "./designMatrix.js";

/**
 * The person-effects design of a repeated design with three or more levels
 * (or any within-person term): one indicator column per person, then every
 * long-form column that varies within a person (the within factor, its
 * interactions, covariates measured at each scan). The indicators absorb the
 * long-form intercept and every between-person column, so those cannot be
 * tested here; the within-person columns keep their meaning (Winkler,
 * Webster, Vidaurre, Nichols & Smith 2015, NeuroImage 123:253, on
 * relabelings within each person's block).
 *
 * @param person  per long-form row, the 0-based person index
 * @param labels  each person's label (the participant column's value)
 */
export function personEffectsDesign(long: DesignMatrix, person: Int32Array, labels: string[], participant: string, modelKey: InputLocation): FittedDesign {
  const rows = long.rows;
  const persons = labels.length;
  const columns: DesignColumn[] = labels.map((label) => ({ name: `${participant}[${label}]`, parts: [{ variable: participant, level: label }], term: -1 }));
  const data: Float64Array[] = labels.map((_, p) => Float64Array.from(person, (q) => (q === p ? 1 : 0)));
  const target = new Int32Array(long.cols).fill(-1);
  long.columns.forEach((column, j) => {
    if (column.parts.length === 0 || constantWithinPersons(long, j, person, persons)) return;
    target[j] = columns.length;
    columns.push(column);
    data.push(Float64Array.from({ length: rows }, (_, i) => long.values[i * long.cols + j]));
  });
  return { matrix: assemble(long, columns, data, rows, modelKey, "scans"), target, centres: columns.map(() => 0) };
}

/** True when long-form column j takes one value within each person. */
export function constantWithinPersons(long: DesignMatrix, j: number, person: Int32Array, persons: number): boolean {
  const seen = new Float64Array(persons).fill(NaN);
  for (let i = 0; i < long.rows; i++) {
    const value = long.values[i * long.cols + j];
    const p = person[i];
    if (Number.isNaN(seen[p])) seen[p] = value;
    else if (seen[p] !== value) return false;
  }
  return true;
}
