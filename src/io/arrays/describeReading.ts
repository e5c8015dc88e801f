import { printable } from "../printable.js";
import type { MatrixReading } from "./containerConnectomes.js";

/** How the matrices were read, in one line, e.g. "MATLAB 5 .mat, variable conn, 90 × 90 × 40, participants on the last axis; labels from the file". */
export function describeReading(reading: MatrixReading): string {
  const parts = [
    reading.reader,
    ...(reading.variable !== undefined ? [`variable ${printable(reading.variable)}`] : []),
    reading.shape.join(" × "),
    ...(reading.subjectsAxis ? [`participants on the ${reading.subjectsAxis} axis`] : []),
  ];
  const labels =
    reading.labels === "regions table, matched to the file's labels"
      ? `labels from the regions table, matched to the file's labels${reading.reordered ? " (rows and columns reordered to the table's order)" : ""}`
      : reading.labels === "numbered 1 … N"
        ? "regions numbered 1 … N (no regions table, no labels in the file)"
        : `labels from the ${reading.labels}`;
  return `${parts.join(", ")}; ${labels}`;
}
