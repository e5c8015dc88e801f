import type { Cell } from "../tsvWriter.js";

/**
 * A table for print, independent of the output format: text cells already
 * formatted for reading (numbers rounded, p-values "< 0.001") but not yet
 * escaped; each writer (Markdown, LaTeX, HTML) escapes them its own way.
 */
export interface ReportTable {
  /** Anchor in report.html, e.g. "cohort" or "edges-patient_gt_control". */
  id: string;
  title: string;
  columns: TableColumn[];
  rows: TableRow[];
  /** Footnotes printed under the table, in order. */
  notes: string[];
}

export interface TableColumn {
  header: string;
  align: "left" | "right";
}

export interface TableRow {
  cells: string[];
  /** Indented under the row above (a level of a categorical variable). */
  indent?: boolean;
}

/** A TSV twin: full-precision values for tables/<name>.tsv, written with formatTsv. */
export interface TsvTable {
  /** File name under tables/, without ".tsv". */
  name: string;
  header: string[];
  rows: Cell[][];
}
