import { InputError, inputErrors } from "../errors.js";
import type { MatrixReading } from "./arrays/containerConnectomes.js";
import type { MatrixLabels } from "./matrixTextLabels.js";
import { shortCell } from "./matrixTextLayout.js";

/**
 * What the labels of labelled text matrices mean for the whole cohort: the
 * first file's labels are every file's; with a regions table they must be its
 * labels, in any order (rows and columns are then reordered to the table's
 * order), and without one they become the region labels.
 */
export interface TextLabelPlan {
  /** Where the labels came from, for `plexus check`. */
  labels: MatrixReading["labels"];
  /** order[k]: the files' index of the regions table's k-th region, when the orders differ. */
  order?: Int32Array;
  /** The region labels, in the order of the loaded data (the table's, or the files'). */
  names?: string[];
}

export function textLabelPlan(
  labels: MatrixLabels | undefined,
  file: string,
  regionTable: { labels: readonly string[]; file: string } | undefined,
): TextLabelPlan {
  if (!labels) return { labels: regionTable ? "regions table" : "numbered 1 … N" };
  if (!regionTable) return { labels: "file", names: [...labels.names] };
  const order = tableOrder(labels, file, regionTable);
  return { labels: "regions table, matched to the file's labels", names: [...regionTable.labels], ...(order ? { order } : {}) };
}

/**
 * Where each of the table's labels is among the file's, or undefined when the
 * orders agree. A file label the table lacks is an error at its line and
 * column; a table label the file lacks is an error naming it. All at once.
 */
function tableOrder(labels: MatrixLabels, file: string, table: { labels: readonly string[]; file: string }): Int32Array | undefined {
  const index = new Map(labels.names.map((name, k) => [name, k]));
  const tableSet = new Set(table.labels);
  const problems: InputError[] = [];
  labels.names.forEach((name, k) => {
    if (!tableSet.has(name)) {
      problems.push(new InputError(`the region label '${shortCell(name)}' is not in the regions table (${table.file})`, { file, ...labels.places[k] }));
    }
  });
  const firstLine = labels.places[0]?.line;
  for (const name of table.labels) {
    if (!index.has(name)) {
      problems.push(
        new InputError(
          `the regions table (${table.file}) has the region '${shortCell(name)}', which this file does not name` +
            (labels.names.length !== table.labels.length ? ` (the file names ${labels.names.length} regions, the table ${table.labels.length})` : ""),
          { file, ...(firstLine !== undefined ? { line: firstLine } : {}) },
        ),
      );
    }
  }
  const error = inputErrors(problems);
  if (error) throw error;
  const order = Int32Array.from(table.labels, (name) => index.get(name)!);
  return order.every((k, i) => k === i) ? undefined : order;
}

/**
 * A later participant's file against the first: both without labels, or both
 * naming the same regions in the same order. Undefined when they agree.
 */
export function labelMismatch(labels: MatrixLabels | undefined, firstLabels: readonly string[] | undefined, firstFile: string, file: string): InputError | undefined {
  const rule = "every participant's file must name the same regions in the same order";
  if (!labels && !firstLabels) return undefined;
  if (!labels) return new InputError(`this file names no regions (no header row, no label column), but ${firstFile} does; ${rule}`, { file });
  if (!firstLabels) {
    return new InputError(`this file names its regions (${labels.layout}), but ${firstFile} does not; ${rule}`, { file, ...labels.places[0] });
  }
  const k = labels.names.findIndex((name, i) => name !== firstLabels[i]);
  if (k < 0) return undefined;
  return new InputError(`region ${k + 1} is '${shortCell(labels.names[k])}' here but '${shortCell(firstLabels[k])}' in ${firstFile}; ${rule}`, {
    file,
    ...labels.places[k],
  });
}
