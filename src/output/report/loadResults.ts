import { existsSync, statSync } from "node:fs";
import path from "node:path";
import { InputError } from "../../errors.js";
import { edgePairs } from "../../edges/edgeIndex.js";
import type { Region } from "../../io/regions.js";
import { readTextFile } from "../../io/readInputFile.js";
import { parseTsv, type LocatedTsvTable } from "../../io/tsv.js";
import type { EdgeColumns } from "../edgeColumns.js";
import { readEffectSizeColumns } from "../effectSizeColumns.js";
import { FAMILY_NULL_FILE, parseNullTable } from "../nullTable.js";
import type { KnownResults } from "../writeResults.js";
import type { NullChunk } from "../../permute/nullRangeTypes.js";
import { tsvCellText } from "./tsvCellText.js";
import { SUBNETWORK_VALUES_COLUMNS, type SubnetworkValues } from "../subnetworkValues.js";
import type { RecordedOverrides } from "./overridesText.js";

/**
 * A results folder read back from disk, as `plexus run` wrote it:
 * summary.json, subjects.tsv, regions.tsv and, per contrast, edges.tsv,
 * components.tsv and (with permutations) null.tsv. Nothing is recomputed.
 */
export interface LoadedResults {
  dir: string;
  summary: ResultsSummary;
  subjects: SubjectsTable;
  regions: Region[];
  contrasts: ContrastResults[];
}

export interface ResultsSummary {
  tool: { name: string; version: string };
  command: string[] | null;
  inputs: { role: string; path: string; sha256: string }[];
  /** How the matrices were read (absent in results written before it was recorded). */
  matrices_read?: { reader: string; variable: string | null; shape: number[]; subjects_axis: string | null; labels: string; reordered: boolean };
  subjects: {
    in_table: number;
    used: number;
    used_ids: string[];
    excluded: { participant_id: string; line: number; reason: string }[];
    /** The design's `select` (column → values kept), or null; absent in folders written before it. */
    selection?: Record<string, string[]> | null;
    /** How many participants `select` left out (not analysed by design, not excluded). */
    not_selected?: number;
  };
  /** Table 1's grouping and variables (absent in folders written before it: the first factor of the model, every column). */
  cohort_table?: { by: string | null; by_from: "design" | "first contrast" | "none"; variables: string[] };
  /** Several scans per person (`repeated:`); absent otherwise. */
  repeated?: {
    participant: string;
    within: string;
    levels: string[];
    design: "paired differences" | "repeated measures";
    people: number;
    scans: number;
    difference?: string;
    exchange?: "within each person" | "whole people";
    scheme: string;
    scheme_reason: string;
  };
  regions: number;
  edges: number;
  design: {
    model: string;
    intercept: boolean;
    columns: string[];
    coding: string;
    levels: Record<string, string[]>;
    centered: Record<string, number>;
    rank: number;
  };
  df: number;
  contrasts: ContrastSummary[];
  /** What effect sizes the edge tables hold, and how they were computed (output/effectSizeColumns.ts); absent in older results. */
  effect_sizes?: EffectSizesSummary | null;
  /** The coverage rules, when the design has `edges:` (src/output/edgeRulesSummary.ts). */
  edge_rules?: {
    missing: "error" | "drop";
    present_in: number | null;
    edges: number;
    kept: number;
    dropped: number;
    dropped_missing: number;
    dropped_present_in: number;
    regions_without_edges: string[];
  };
  options: {
    transform: string;
    /** Absent in results written before `scale` existed. */
    scale?: "none" | "total";
    symmetrize: boolean;
    asymmetry_tolerance: number;
    inference: {
      method: "components" | "fdr" | "max-t" | "threshold-free";
      threshold: number;
      thresholds?: number[];
      enhancement?: { extent_exponent: number; height_exponent: number; step: number };
      size: "extent" | "mass";
      tail: "upper" | "lower" | "both";
      fdr: "bh" | "by";
      alpha: number;
      permutations: number;
      seed: number;
      scheme: string;
      blocks: string | null;
      block_permutation: string;
      /** `--permutations`/`--seed` that replaced the design's values; null or absent when none. */
      command_line_overrides?: RecordedOverrides | null;
      /** `inference.across_contrasts` (absent in folders written before it existed: false). */
      across_contrasts?: boolean;
    };
  };
  /** With `inference.across_contrasts`: the family of contrasts and its null (src/output/acrossContrastsSummary.ts). */
  across_contrasts?: {
    contrasts: string[];
    null_file: string;
    mode: "exact" | "monte-carlo";
    permutations: number;
    critical_size: number | null;
    critical_size_measure: "extent" | "mass";
    critical_statistic: number | null;
    critical_enhanced?: number | null;
  } | null;
  warnings: string[];
}

export interface EffectSizesSummary {
  confidence_level: number;
  contrasts: { name: string; columns: string[]; cohens_d: { factor: string; levels: [string, string]; scale: number } | null; level_means: { columns: [string, string]; levels: [string, string] } | null }[];
}

export interface ContrastSummary {
  name: string;
  expression: string;
  /** "t" (one row) or "F" (several rows); absent in folders written before F contrasts, meaning "t". */
  statistic?: "t" | "F";
  /** t contrasts: the contrast vector. F contrasts: every row of the contrast matrix (folders written before this held row 1 alone). */
  vector: number[] | number[][];
  /** F contrasts: the contrast matrix, one row per test, and its row count. */
  rows?: number[][];
  df1?: number;
  df: number;
  edges_without_statistic: number;
  supra_threshold_components: number;
  significant_components: number | null;
  significant_edges_fdr: number;
  mode: "exact" | "monte-carlo" | null;
  permutations?: number;
  distinct_relabelings?: number | null;
  scheme?: "permute" | "sign-flip";
  scheme_reason?: string;
  seed?: number;
  exchangeability_blocks?: { column: string; count: number; permutation: string } | null;
  critical_size?: number | null;
  critical_size_measure?: "extent" | "mass";
  critical_statistic?: number | null;
  smallest_possible_p?: number;
  /** The file its p_FWE come from: `<name>/null.tsv`, or the family null with `inference.across_contrasts`. */
  p_fwe_null?: string;
  corrected_across_contrasts?: boolean;
  /** The data behind the significant subnetworks (output/subnetworkValues.ts); absent when none were written. */
  subnetwork_values?: {
    file: string;
    plot: "groups" | "covariate" | "mean";
    variable: string | null;
    levels: string[];
    adjusted_for: string[];
    selection: SubnetworkValues["selection"];
    confidence_level: number;
    subnetworks: { subnetwork: number; edges: number }[];
  };
}

/** The contrast's rows: `rows` for an F contrast, else the one vector. */
export function contrastRows(c: Pick<ContrastSummary, "rows" | "vector">): number[][] {
  if (c.rows) return c.rows;
  return Array.isArray(c.vector[0]) ? (c.vector as number[][]) : [c.vector as number[]];
}

/** subjects.tsv: every participant of the table, the model (and block) columns as read; null = missing. */
export interface SubjectsTable {
  columns: string[];
  rows: SubjectRow[];
}

export interface SubjectRow {
  id: string;
  values: (string | null)[];
  included: boolean;
  reason: string;
}


export interface ComponentRow {
  id: number;
  extent: number;
  nodes: number;
  mass: number;
  /** NaN when no permutations ran. */
  pFwe: number;
  sign: 1 | -1;
  /** Clopper–Pearson interval of a Monte Carlo p_fwe; NaN when exact or absent. */
  pFweLow: number;
  pFweHigh: number;
}

export interface ContrastResults {
  summary: ContrastSummary;
  edges: EdgeColumns;
  components: ComponentRow[];
  nullDistribution?: NullChunk;
  /** threshold_robustness.tsv of a threshold sweep: per edge, the significant component at each threshold. */
  robustness?: RobustnessTable;
  /** subnetwork_values.tsv, when the contrast has significant subnetworks with a data view. */
  subnetworkValues?: SubnetworkValues;
}

export interface RobustnessTable {
  thresholds: number[];
  rows: { regionA: string; regionB: string; statistic: number; significant: boolean[] }[];
}

/** A surrogate code unit outside a pair (the `u` flag reads a pair as one code point). */
const LONE_SURROGATE = /\p{Cs}/u;

/**
 * The files of the folder: a text the writer holds, else the file on disk.
 * A held text is used only when it is well-formed UTF-16, so that it is the
 * string the file decodes to (a lone surrogate is written as U+FFFD).
 */
class FolderFiles {
  constructor(private readonly known: KnownResults | undefined) {}

  private held(file: string): string | undefined {
    const text = this.known?.texts.get(path.resolve(file));
    return text !== undefined && !LONE_SURROGATE.test(text) ? text : undefined;
  }

  exists(file: string): boolean {
    return this.held(file) !== undefined || existsSync(file);
  }

  text(file: string): string {
    return this.held(file) ?? readTextFile(file);
  }

  table(file: string): LocatedTsvTable {
    return parseTsv(this.text(file), file);
  }

  edges(contrast: string): EdgeColumns | undefined {
    return this.known?.edges.get(contrast);
  }
}

/**
 * Reads a results folder; a missing folder or file, or a malformed one, is an
 * InputError naming it. `known`: what the writer of the folder still holds of
 * it (the same values, read without the disk).
 */
export function loadResults(dir: string, known?: KnownResults): LoadedResults {
  const files = new FolderFiles(known);
  if (!existsSync(dir) || !statSync(dir).isDirectory()) {
    throw new InputError("not a results folder: the folder does not exist", { file: dir }, "give the folder that `plexus run --out` wrote");
  }
  const summaryFile = path.join(dir, "summary.json");
  if (!files.exists(summaryFile)) {
    throw new InputError("not a results folder: summary.json is missing", { file: summaryFile }, "give the folder that `plexus run --out` wrote");
  }
  const summary = readSummary(files, summaryFile);
  const regions = readRegionsTable(files, path.join(dir, "regions.tsv"), summary.regions);
  const subjects = readSubjects(files, path.join(dir, "subjects.tsv"));
  const contrasts = summary.contrasts.map((contrast) => readContrast(files, dir, contrast, regions));
  return { dir, summary, subjects, regions, contrasts };
}

function readSummary(files: FolderFiles, file: string): ResultsSummary {
  let parsed: unknown;
  try {
    parsed = JSON.parse(files.text(file));
  } catch (error) {
    if (error instanceof InputError) throw error;
    throw new InputError(`summary.json is not valid JSON: ${(error as Error).message}`, { file });
  }
  const expect = (value: unknown, key: string, kind: "object" | "array" | "number" | "string"): void => {
    const ok =
      kind === "array" ? Array.isArray(value) : kind === "object" ? typeof value === "object" && value !== null && !Array.isArray(value) : typeof value === kind;
    if (!ok) throw new InputError(`expected ${kind === "array" ? "an array" : `a${kind === "object" ? "n" : ""} ${kind}`} in summary.json`, { file, key });
  };
  expect(parsed, "(top level)", "object");
  const root = parsed as Record<string, unknown>;
  for (const key of ["tool", "subjects", "design", "options"]) expect(root[key], key, "object");
  for (const key of ["inputs", "contrasts", "warnings"]) expect(root[key], key, "array");
  for (const key of ["regions", "edges", "df"]) expect(root[key], key, "number");
  const subjects = root.subjects as Record<string, unknown>;
  expect(subjects.excluded, "subjects.excluded", "array");
  expect(subjects.in_table, "subjects.in_table", "number");
  expect(subjects.used, "subjects.used", "number");
  if (subjects.selection !== undefined && subjects.selection !== null) {
    expect(subjects.selection, "subjects.selection", "object");
    if (!Object.values(subjects.selection as object).every((v) => Array.isArray(v) && v.every((x) => typeof x === "string"))) {
      throw new InputError("expected lists of values in summary.json", { file, key: "subjects.selection" });
    }
  }
  if (subjects.not_selected !== undefined) expect(subjects.not_selected, "subjects.not_selected", "number");
  if (root.cohort_table !== undefined) {
    expect(root.cohort_table, "cohort_table", "object");
    const table = root.cohort_table as Record<string, unknown>;
    if (table.by !== null) expect(table.by, "cohort_table.by", "string");
    expect(table.variables, "cohort_table.variables", "array");
    if (!(table.variables as unknown[]).every((v) => typeof v === "string")) {
      throw new InputError("expected column names in summary.json", { file, key: "cohort_table.variables" });
    }
  }
  const design = root.design as Record<string, unknown>;
  expect(design.model, "design.model", "string");
  expect(design.columns, "design.columns", "array");
  expect(design.levels, "design.levels", "object");
  const options = root.options as Record<string, unknown>;
  expect(options.inference, "options.inference", "object");
  const inference = options.inference as Record<string, unknown>;
  for (const key of ["threshold", "alpha"]) expect(inference[key], `options.inference.${key}`, "number");
  for (const key of ["method", "size", "tail", "fdr"]) expect(inference[key], `options.inference.${key}`, "string");
  if (root.repeated !== undefined) {
    expect(root.repeated, "repeated", "object");
    const repeated = root.repeated as Record<string, unknown>;
    for (const key of ["participant", "within", "design"]) expect(repeated[key], `repeated.${key}`, "string");
    for (const key of ["people", "scans"]) expect(repeated[key], `repeated.${key}`, "number");
    expect(repeated.levels, "repeated.levels", "array");
    if (!(repeated.levels as unknown[]).every((level) => typeof level === "string")) throw new InputError("expected level names in summary.json", { file, key: "repeated.levels" });
  }
  (root.contrasts as unknown[]).forEach((contrast, k) => {
    expect(contrast, `contrasts[${k}]`, "object");
    const c = contrast as Record<string, unknown>;
    expect(c.name, `contrasts[${k}].name`, "string");
    expect(c.vector, `contrasts[${k}].vector`, "array");
    if (!/^[^/\\]+$/.test(c.name as string) || c.name === "." || c.name === "..") {
      throw new InputError(`contrast name '${String(c.name)}' cannot name a folder`, { file, key: `contrasts[${k}].name` });
    }
  });
  return parsed as ResultsSummary;
}

/** Index of each named column; a missing one is an InputError on the header line. */
function columnsOf(table: LocatedTsvTable, names: readonly string[]): Map<string, number> {
  const found = new Map<string, number>();
  for (const name of names) {
    const index = table.header.indexOf(name);
    if (index < 0) {
      throw new InputError(`the column '${name}' is missing (found: ${table.header.join(", ")})`, {
        file: table.file,
        line: table.headerLine,
      });
    }
    found.set(name, index);
  }
  return found;
}

/** A numeric cell; empty means "no value" (NaN); anything else unreadable is located. */
function numberCell(table: LocatedTsvTable, row: number, column: number): number {
  const text = table.rows[row][column];
  if (text === "") return NaN;
  const value = Number(text);
  if (!Number.isFinite(value)) {
    throw new InputError(`'${text}' is not a number`, { file: table.file, line: table.lines[row], column: column + 1 });
  }
  return value;
}

function readRegionsTable(files: FolderFiles, file: string, count: number): Region[] {
  const table = files.table(file);
  const columns = columnsOf(table, ["label"]);
  const label = columns.get("label")!;
  const optional = (name: string) => table.header.indexOf(name);
  const [x, y, z, hemisphere, system] = ["x", "y", "z", "hemisphere", "system"].map(optional);
  if (table.rows.length !== count) {
    throw new InputError(`expected ${count} regions (summary.json), found ${table.rows.length}`, { file, line: table.headerLine });
  }
  return table.rows.map((cells, row) => {
    const region: Region = { label: tsvCellText(cells[label]) };
    if (x >= 0 && y >= 0 && z >= 0 && cells[x] !== "" && cells[y] !== "" && cells[z] !== "") {
      region.x = numberCell(table, row, x);
      region.y = numberCell(table, row, y);
      region.z = numberCell(table, row, z);
    }
    if (hemisphere >= 0 && cells[hemisphere] !== "") region.hemisphere = tsvCellText(cells[hemisphere]);
    if (system >= 0 && cells[system] !== "") region.system = tsvCellText(cells[system]);
    return region;
  });
}

function readSubjects(files: FolderFiles, file: string): SubjectsTable {
  const table = files.table(file);
  const fixed = columnsOf(table, ["participant_id", "included", "exclusion_reason"]);
  const id = fixed.get("participant_id")!;
  const included = fixed.get("included")!;
  const reason = fixed.get("exclusion_reason")!;
  const valueColumns = table.header.map((_, k) => k).filter((k) => k !== id && k !== included && k !== reason);
  return {
    columns: valueColumns.map((k) => tsvCellText(table.header[k])),
    rows: table.rows.map((cells, row) => {
      const flag = cells[included];
      if (flag !== "yes" && flag !== "no") {
        throw new InputError(`'included' must be yes or no, found '${flag}'`, { file, line: table.lines[row], column: included + 1 });
      }
      return {
        id: tsvCellText(cells[id]),
        values: valueColumns.map((k) => (cells[k] === "n/a" || cells[k] === "" ? null : tsvCellText(cells[k]))),
        included: flag === "yes",
        reason: tsvCellText(cells[reason]),
      };
    }),
  };
}

const EDGE_COLUMNS = ["region_a", "region_b", "statistic", "estimate", "p_unc", "q_fdr", "component"] as const;

function readContrast(files: FolderFiles, dir: string, summary: ContrastSummary, regions: Region[]): ContrastResults {
  const folder = path.join(dir, summary.name);
  const edges = files.edges(summary.name) ?? readEdges(files, path.join(folder, "edges.tsv"), regions);
  const components = readComponents(files, path.join(folder, "components.tsv"));
  let nullDistribution: NullChunk | undefined;
  if (summary.mode !== null && summary.mode !== undefined) {
    // With error control across contrasts, the p-values and critical values come from the family null: show that one.
    const nullFile = summary.corrected_across_contrasts ? path.join(dir, FAMILY_NULL_FILE) : path.join(folder, "null.tsv");
    nullDistribution = parseNullTable(files.text(nullFile), nullFile);
  }
  const robustnessFile = path.join(folder, "threshold_robustness.tsv");
  let robustness: RobustnessTable | undefined;
  if (files.exists(robustnessFile)) {
    const table = files.table(robustnessFile);
    const columns = table.header.slice(3, -1);
    robustness = {
      thresholds: columns.map((name) => Number(name.replace(/^component_t/, ""))),
      rows: table.rows.map((row) => ({
        regionA: tsvCellText(row[0]),
        regionB: tsvCellText(row[1]),
        statistic: Number(row[2]),
        significant: columns.map((_, j) => row[3 + j] !== ""),
      })),
    };
  }
  const subnetworkValues = summary.subnetwork_values ? readSubnetworkValues(files, path.join(dir, summary.subnetwork_values.file), summary.subnetwork_values) : undefined;
  return { summary, edges, components, nullDistribution, robustness, ...(subnetworkValues ? { subnetworkValues } : {}) };
}

/** subnetwork_values.tsv read back (rows subnetwork by subnetwork, each in design order), with summary.json's description of it. */
function readSubnetworkValues(files: FolderFiles, file: string, meta: NonNullable<ContrastSummary["subnetwork_values"]>): SubnetworkValues {
  const table = files.table(file);
  const columns = columnsOf(table, SUBNETWORK_VALUES_COLUMNS);
  const column = (name: (typeof SUBNETWORK_VALUES_COLUMNS)[number]) => columns.get(name)!;
  const bySubnetwork = new Map<number, number[]>();
  table.rows.forEach((_, row) => {
    const id = numberCell(table, row, column("subnetwork"));
    if (!bySubnetwork.has(id)) bySubnetwork.set(id, []);
    bySubnetwork.get(id)!.push(row);
  });
  const first = [...bySubnetwork.values()][0] ?? [];
  const numbers = (rows: number[], name: (typeof SUBNETWORK_VALUES_COLUMNS)[number]) => Float64Array.from(rows, (row) => numberCell(table, row, column(name)));
  return {
    plot: meta.plot,
    variable: meta.variable,
    levels: meta.levels,
    adjustedFor: meta.adjusted_for,
    selection: meta.selection,
    level: meta.confidence_level,
    ids: first.map((row) => tsvCellText(table.rows[row][column("participant_id")])),
    groups: first.map((row) => tsvCellText(table.rows[row][column("group")])),
    covariate: numbers(first, "covariate"),
    subnetworks: meta.subnetworks.map(({ subnetwork, edges }) => {
      const rows = bySubnetwork.get(subnetwork);
      if (!rows || rows.length !== first.length) {
        throw new InputError(`expected ${first.length} rows of subnetwork ${subnetwork} (summary.json lists it), found ${rows?.length ?? 0}`, { file, line: table.headerLine });
      }
      return {
        id: subnetwork,
        edges,
        mean: numbers(rows, "mean_connectivity"),
        adjusted: numbers(rows, "adjusted_connectivity"),
        fitted: numbers(rows, "fitted_connectivity"),
        lower: numbers(rows, "fitted_lower"),
        upper: numbers(rows, "fitted_upper"),
      };
    }),
  };
}

function readEdges(files: FolderFiles, edgesFile: string, regions: Region[]): EdgeColumns {
  const table = files.table(edgesFile);
  const columns = columnsOf(table, EDGE_COLUMNS);
  const pairs = edgePairs(regions.length);
  if (table.rows.length !== pairs.edgeCount) {
    throw new InputError(`expected ${pairs.edgeCount} edges for ${regions.length} regions, found ${table.rows.length}`, {
      file: edgesFile,
      line: table.headerLine,
    });
  }
  const count = pairs.edgeCount;
  const numeric = (name: string): Float64Array => {
    const column = columns.get(name) ?? table.header.indexOf(name);
    const out = new Float64Array(count).fill(NaN);
    if (column >= 0) for (let e = 0; e < count; e++) out[e] = numberCell(table, e, column);
    return out;
  };
  const a = columns.get("region_a")!;
  const b = columns.get("region_b")!;
  for (let e = 0; e < count; e++) {
    const labelA = tsvCellText(table.rows[e][a]);
    const labelB = tsvCellText(table.rows[e][b]);
    if (labelA !== regions[pairs.regionA[e]].label || labelB !== regions[pairs.regionB[e]].label) {
      throw new InputError(
        `expected the edge ${regions[pairs.regionA[e]].label} – ${regions[pairs.regionB[e]].label} (regions.tsv order), found ${labelA} – ${labelB}`,
        { file: edgesFile, line: table.lines[e] },
      );
    }
  }
  const componentValues = numeric("component");
  const edges: EdgeColumns = {
    regionA: pairs.regionA,
    regionB: pairs.regionB,
    statistic: numeric("statistic"),
    estimate: numeric("estimate"),
    pUncorrected: numeric("p_unc"),
    qFdr: numeric("q_fdr"),
    component: Int32Array.from(componentValues, (v) => (Number.isFinite(v) ? v : 0)),
    partialR: numeric("partial_r"),
    standardError: numeric("standard_error"),
    partialEtaSquared: numeric("partial_eta_squared"),
  };
  if (table.header.includes("p_fwe")) edges.pFwe = numeric("p_fwe");
  Object.assign(edges, readEffectSizeColumns(table.header, numeric));
  return edges;
}

function readComponents(files: FolderFiles, file: string): ComponentRow[] {
  const table = files.table(file);
  const columns = columnsOf(table, ["component", "extent", "nodes", "mass", "p_fwe", "sign"]);
  const low = table.header.indexOf("p_fwe_low");
  const high = table.header.indexOf("p_fwe_high");
  return table.rows.map((cells, row) => {
    const sign = cells[columns.get("sign")!];
    if (sign !== "positive" && sign !== "negative") {
      throw new InputError(`'sign' must be positive or negative, found '${sign}'`, { file, line: table.lines[row] });
    }
    const number = (name: string) => numberCell(table, row, columns.get(name)!);
    return {
      id: number("component"),
      extent: number("extent"),
      nodes: number("nodes"),
      mass: number("mass"),
      pFwe: number("p_fwe"),
      sign: sign === "positive" ? 1 : -1,
      pFweLow: low >= 0 ? numberCell(table, row, low) : NaN,
      pFweHigh: high >= 0 ? numberCell(table, row, high) : NaN,
    };
  });
}
