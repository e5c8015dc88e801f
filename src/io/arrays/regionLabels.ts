import { InputError } from "../../errors.js";
import { printable } from "../printable.js";

/**
 * Where each region of the regions table sits among a file's labels: order[k]
 * is the file's index of the table's k-th label. The two must hold the same
 * labels; a label of one that the other lacks is an error naming the file and
 * the label. Undefined when the orders already agree.
 */
export function regionOrder(fileLabels: readonly string[], tableLabels: readonly string[], file: string, tableFile: string): Int32Array | undefined {
  const index = new Map(fileLabels.map((label, k) => [label, k]));
  if (index.size !== fileLabels.length) {
    const seen = new Set<string>();
    const repeated = fileLabels.find((label) => (seen.has(label) ? true : (seen.add(label), false)))!;
    throw new InputError(`the region label '${printable(repeated)}' appears twice among the file's labels`, { file });
  }
  const missing = tableLabels.filter((label) => !index.has(label));
  const tableSet = new Set(tableLabels);
  const extra = fileLabels.filter((label) => !tableSet.has(label));
  if (missing.length > 0 || extra.length > 0) {
    const parts = [
      ...(missing.length > 0 ? [`no region ${missing.slice(0, 5).map((l) => `'${printable(l)}'`).join(", ")}${missing.length > 5 ? ` and ${missing.length - 5} more` : ""} of the regions table (${tableFile})`] : []),
      ...(extra.length > 0 ? [`region${extra.length > 1 ? "s" : ""} ${extra.slice(0, 5).map((l) => `'${printable(l)}'`).join(", ")}${extra.length > 5 ? ` and ${extra.length - 5} more` : ""} that the regions table lacks`] : []),
    ];
    throw new InputError(`the matrix's region labels do not match the regions table: the file has ${parts.join(", and ")}`, { file });
  }
  const order = Int32Array.from(tableLabels, (label) => index.get(label)!);
  return order.every((k, i) => k === i) ? undefined : order;
}

/** The N × N matrix with rows and columns taken in `order` (out[i][j] = matrix[order[i]][order[j]]). */
export function reorderMatrix(matrix: Float64Array, n: number, order: Int32Array, out: Float64Array): Float64Array {
  for (let i = 0; i < n; i++) {
    const from = order[i] * n;
    for (let j = 0; j < n; j++) out[i * n + j] = matrix[from + order[j]];
  }
  return out;
}
