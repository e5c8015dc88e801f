import { InputError } from "../errors.js";
import type { NullChunk } from "../permute/nullRangeTypes.js";
import { parseTsv } from "../io/tsv.js";
import { formatTsv, type Cell } from "./tsvWriter.js";

/** The family null of `inference.across_contrasts` (row-wise maxima over the contrasts), at the top of a results folder. */
export const FAMILY_NULL_FILE = "null_across_contrasts.tsv";

export const NULL_COLUMNS = ["permutation", "max_extent", "max_mass", "max_statistic"] as const;

/** null.tsv: one row per relabeling, numbered from `from` (1 for a whole run). */
export function nullTable(rows: NullChunk): string {
  const out: Cell[][] = new Array(rows.to - rows.from);
  for (let i = 0; i < out.length; i++) {
    out[i] = [rows.from + i, rows.maxExtent[i], rows.maxMass[i], rows.maxStatistic[i], ...rows.extra.map((values) => values[i])];
  }
  return formatTsv([...NULL_COLUMNS, ...rows.extraNames], out);
}

/** Reads a null.tsv back (for merging shards); checks the columns and the numbering. */
export function parseNullTable(text: string, file: string): NullChunk {
  const table = parseTsv(text, file);
  NULL_COLUMNS.forEach((name, j) => {
    if (table.header[j] !== name) {
      throw new InputError(`expected the column '${name}' in position ${j + 1}, found '${table.header[j] ?? ""}'`, {
        file,
        line: table.headerLine,
      });
    }
  });
  const count = table.rows.length;
  const from = count > 0 ? Number(table.rows[0][0]) : 1;
  const extraNames = table.header.slice(NULL_COLUMNS.length);
  const chunk: NullChunk = {
    from,
    to: from + count,
    maxExtent: new Float64Array(count),
    maxMass: new Float64Array(count),
    maxStatistic: new Float64Array(count),
    extraNames,
    extra: extraNames.map(() => new Float64Array(count)),
  };
  table.rows.forEach((row, i) => {
    const line = table.lines[i];
    if (Number(row[0]) !== from + i) {
      throw new InputError(`permutations must be numbered consecutively; expected ${from + i}, found '${row[0]}'`, { file, line });
    }
    const read = (j: number) => {
      if (row[j] === "") return NaN;
      const value = Number(row[j]);
      if (!Number.isFinite(value)) throw new InputError(`'${row[j]}' is not a number`, { file, line, column: j + 1 });
      return value;
    };
    chunk.maxExtent[i] = read(1);
    chunk.maxMass[i] = read(2);
    chunk.maxStatistic[i] = read(3);
    extraNames.forEach((_, j) => (chunk.extra[j][i] = read(NULL_COLUMNS.length + j)));
  });
  return chunk;
}
