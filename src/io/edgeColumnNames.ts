import { InputError, inputErrors } from "../errors.js";
import { edgeCountFor, edgeIndexOf } from "../edges/edgeIndex.js";
import { shortCell } from "./matrixTextLayout.js";

/**
 * Which edge each column of a participants × edges table holds, from the
 * columns' names (the rule the README states). A name joins two region labels
 * with a joint: one or more of the characters ~ - – — _ | : and space.
 * - With a regions table, each name must split in exactly one way into two
 *   labels of the table, at a joint (the columns may come in any order; a–b and
 *   b–a are the same edge), and every edge must have exactly one column.
 * - Without one, the columns follow plexus's edge order, (1,2), (1,3), …,
 *   (1,N), (2,3), …, (N−1,N), so their count is N(N−1)/2; the labels are read
 *   from the names: the first column's name split at a joint gives labels 1
 *   and 2, the next N−2 names (after label 1 and a joint) labels 3 … N, and
 *   every other name must be its two labels joined. Labels read so neither
 *   begin nor end with a joint character. Exactly one reading may fit; names
 *   that are region numbers ("1-2", "1-3", …) give the labels "1" … "N".
 */
export const JOINT_CHARACTERS = "~-–—_|: ";

export interface EdgeColumns {
  regionCount: number;
  /** The edge (src/edges/edgeIndex.ts order) of each edge column. */
  edgeOfColumn: Int32Array;
  /** The labels read from the names, when there is no regions table. */
  labels?: string[];
}

/** Where each edge column's name sits in the file: its header line; column c (0-based among the edge columns) is file column c + 2. */
export interface HeaderPlace {
  file: string;
  line: number;
}

const isJoint = (c: string): boolean => JOINT_CHARACTERS.includes(c);
const JOINTS_SHOWN = "one or more of ~ - – — _ | : or a space";

export function edgeColumns(names: readonly string[], place: HeaderPlace, regionTable?: { labels: readonly string[]; file: string }): EdgeColumns {
  if (names.length === 0) throw new InputError("the edge table has no edge columns after its participant ID column", { file: place.file, line: place.line });
  return regionTable ? columnsByTable(names, place, regionTable) : columnsInEdgeOrder(names, place);
}

/** Every split of `name` at a joint: left and right of any non-empty run of joint characters inside a run of them. */
function splitsAtJoints(name: string): [string, string][] {
  const splits: [string, string][] = [];
  for (let a = 1; a < name.length; a++) {
    if (!isJoint(name[a]) || isJoint(name[a - 1])) continue;
    let b = a;
    while (b < name.length && isJoint(name[b])) b++;
    if (b === name.length) break;
    for (let i = a; i < b; i++) for (let j = i + 1; j <= b; j++) splits.push([name.slice(0, i), name.slice(j)]);
    a = b;
  }
  return splits;
}

function columnsByTable(names: readonly string[], place: HeaderPlace, table: { labels: readonly string[]; file: string }): EdgeColumns {
  const n = table.labels.length;
  const index = new Map(table.labels.map((label, k) => [label, k]));
  const edgeOfColumn = new Int32Array(names.length);
  const columnOfEdge = new Int32Array(edgeCountFor(n)).fill(-1);
  const problems: InputError[] = [];
  names.forEach((name, c) => {
    const where = { file: place.file, line: place.line, column: c + 2 };
    const readings = new Map<string, [number, number]>();
    for (const [left, right] of splitsAtJoints(name)) {
      const i = index.get(left);
      const j = index.get(right);
      if (i !== undefined && j !== undefined) readings.set(`${i},${j}`, [i, j]);
    }
    if (readings.size === 0) {
      problems.push(
        new InputError(
          `the edge column '${shortCell(name)}' does not name two regions of the regions table (${table.file}) joined by ${JOINTS_SHOWN}`,
          where,
        ),
      );
      return;
    }
    if (readings.size > 1) {
      const shown = [...readings.values()].map(([i, j]) => `'${shortCell(table.labels[i])}' and '${shortCell(table.labels[j])}'`).join(", or ");
      problems.push(new InputError(`the edge column '${shortCell(name)}' can be read as ${shown}; rename the column so that one reading names two regions`, where));
      return;
    }
    const [i, j] = [...readings.values()][0];
    if (i === j) {
      problems.push(new InputError(`the edge column '${shortCell(name)}' names the region '${shortCell(table.labels[i])}' twice; an edge joins two regions`, where));
      return;
    }
    const edge = edgeIndexOf(n, i, j);
    if (columnOfEdge[edge] >= 0) {
      problems.push(new InputError(`the edge column '${shortCell(name)}' holds the same edge as column ${columnOfEdge[edge] + 2} ('${shortCell(names[columnOfEdge[edge]])}')`, where));
      return;
    }
    columnOfEdge[edge] = c;
    edgeOfColumn[c] = edge;
  });
  if (problems.length === 0) {
    const missing: string[] = [];
    for (let i = 0, e = 0; i < n; i++) {
      for (let j = i + 1; j < n; j++, e++) if (columnOfEdge[e] < 0) missing.push(`'${shortCell(table.labels[i])}' – '${shortCell(table.labels[j])}'`);
    }
    if (missing.length > 0) {
      problems.push(
        new InputError(
          `the edge table has no column for ${missing.length} of the ${edgeCountFor(n)} edges between the regions table's ${n} regions: ${missing.slice(0, 5).join(", ")}` +
            (missing.length > 5 ? `, and ${missing.length - 5} more` : ""),
          { file: place.file, line: place.line },
          "every edge needs one column, named by its two region labels",
        ),
      );
    }
  }
  const error = inputErrors(problems);
  if (error) throw error;
  return { regionCount: n, edgeOfColumn };
}

/** N with N(N−1)/2 = count, or undefined. */
function regionsFor(count: number): number | undefined {
  const n = Math.round((1 + Math.sqrt(1 + 8 * count)) / 2);
  return edgeCountFor(n) === count ? n : undefined;
}

/** The text after `prefix` and a run of joint characters, or undefined. */
function afterJoint(name: string, prefix: string): string | undefined {
  if (!name.startsWith(prefix)) return undefined;
  let p = prefix.length;
  if (p >= name.length || !isJoint(name[p])) return undefined;
  while (p < name.length && isJoint(name[p])) p++;
  const rest = name.slice(p);
  return rest === "" || isJoint(rest[rest.length - 1]) ? undefined : rest;
}

/** Whether `name` is `left`, a run of joint characters, and `right`. */
function joins(name: string, left: string, right: string): boolean {
  if (name.length <= left.length + right.length || !name.startsWith(left) || !name.endsWith(right)) return false;
  for (let p = left.length; p < name.length - right.length; p++) if (!isJoint(name[p])) return false;
  return true;
}

/** One reading of the names: the labels, or the first column that does not fit it. */
type Reading = { labels: string[] } | { failedColumn: number; expected: string };

function readLabels(names: readonly string[], n: number, first: string, second: string): Reading {
  const labels = [first, second];
  for (let k = 2; k < n; k++) {
    const label = afterJoint(names[k - 1], first);
    if (label === undefined) return { failedColumn: k - 1, expected: `'${shortCell(first)}' joined to region ${k + 1}'s label` };
    labels.push(label);
  }
  const seen = new Set<string>();
  for (const [k, label] of labels.entries()) {
    if (seen.has(label)) return { failedColumn: k === 1 ? 0 : k - 1, expected: `a label other than '${shortCell(label)}', which names an earlier region too` };
    seen.add(label);
  }
  for (let i = 1, c = n - 1; i < n; i++) {
    for (let j = i + 1; j < n; j++, c++) {
      if (!joins(names[c], labels[i], labels[j])) return { failedColumn: c, expected: `'${shortCell(labels[i])}' and '${shortCell(labels[j])}' joined` };
    }
  }
  return { labels };
}

function columnsInEdgeOrder(names: readonly string[], place: HeaderPlace): EdgeColumns {
  const where = (c: number) => ({ file: place.file, line: place.line, column: c + 2 });
  const hint = "without a regions table the edge columns must come in plexus's edge order, (1,2), (1,3), …, (1,N), (2,3), …, (N−1,N), each named by its two labels joined; with a regions table (`regions:`) they may come in any order";
  const n = regionsFor(names.length);
  if (n === undefined) {
    throw new InputError(`the edge table has ${names.length} edge columns, which is no count N(N−1)/2 of the edges between N regions`, { file: place.file, line: place.line }, hint);
  }
  const candidates = splitsAtJoints(names[0]).filter(([left, right]) => !isJoint(left[left.length - 1]) && !isJoint(right[0]) && !isJoint(right[right.length - 1]));
  if (candidates.length === 0) {
    throw new InputError(`the edge column '${shortCell(names[0])}' does not join two region labels by ${JOINTS_SHOWN}`, where(0), hint);
  }
  const readings = candidates.map(([first, second]) => readLabels(names, n, first, second));
  const fits = readings.filter((reading): reading is { labels: string[] } => "labels" in reading);
  if (fits.length === 1) {
    const edgeOfColumn = Int32Array.from(names, (_, c) => c);
    return { regionCount: n, edgeOfColumn, labels: fits[0].labels };
  }
  if (fits.length > 1) {
    const shown = fits.map((reading) => reading.labels.slice(0, 2).map((label) => `'${shortCell(label)}'`).join(" and ")).join(", or ");
    throw new InputError(
      `the edge columns' names can be read in ${fits.length} ways: the first column '${shortCell(names[0])}' joins ${shown}`,
      where(0),
      "rename the columns so that the labels read one way only, or give a regions table (`regions:`)",
    );
  }
  const best = readings.reduce((a, b) => ((b as { failedColumn: number }).failedColumn > (a as { failedColumn: number }).failedColumn ? b : a)) as {
    failedColumn: number;
    expected: string;
  };
  throw new InputError(
    `the edge column '${shortCell(names[best.failedColumn])}' (edge column ${best.failedColumn + 1} of ${names.length}) does not fit plexus's edge order: expected ${best.expected}`,
    where(best.failedColumn),
    hint,
  );
}
