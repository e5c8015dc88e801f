import { InputError, inputErrors } from "../errors.js";
import { controlCharacterProblem } from "./controlCharacters.js";
import { isMissingCell } from "./participants.js";
import { printable } from "./printable.js";
import { parseTsv, readTableText } from "./tsv.js";

/** A regions table's missing-value codes (BIDS): `n/a` and an empty cell; `NA` may be a label. */
const REGION_MISSING_VALUES: readonly string[] = ["", "n/a"];

/** One network node: its label and, optionally, coordinates, hemisphere and system (module). */
export interface Region {
  label: string;
  x?: number;
  y?: number;
  z?: number;
  hemisphere?: string;
  system?: string;
}

const DECIMAL = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

/**
 * Parses a regions table (tab-separated, header row). `label` is required;
 * `x`, `y`, `z` come all three or not at all and must be finite numbers;
 * `hemisphere` and `system` are optional text (`n/a` or empty = absent); other
 * columns are ignored. Labels must be unique; a label, hemisphere or system
 * with a control character is refused, since it would be written raw into
 * the results. The problems of every row are raised as one error, each at its
 * file:line:column. When `expectedCount` is given
 * (the matrices' N) the table must have exactly that many rows.
 */
export function parseRegions(text: string, file: string, expectedCount?: number): Region[] {
  const { header, rows, lines, headerLine } = parseTsv(text, file);
  const column = (name: string): number => header.indexOf(name);
  const labelColumn = column("label");
  if (labelColumn < 0) {
    throw new InputError(`the regions table needs a 'label' column (found: ${header.join(", ")})`, {
      file,
      line: headerLine,
    });
  }
  const coordinateColumns = [column("x"), column("y"), column("z")];
  const coordinateCount = coordinateColumns.filter((c) => c >= 0).length;
  if (coordinateCount !== 0 && coordinateCount !== 3) {
    const missing = ["x", "y", "z"].filter((_, k) => coordinateColumns[k] < 0);
    throw new InputError(`coordinates need all three columns x, y and z; missing ${missing.join(", ")}`, {
      file,
      line: headerLine,
    });
  }
  const hemisphereColumn = column("hemisphere");
  const systemColumn = column("system");

  const regions: Region[] = [];
  const lineOfLabel = new Map<string, number>();
  const problems: InputError[] = [];
  for (let r = 0; r < rows.length; r++) {
    const row = rows[r];
    const line = lines[r];
    for (const c of [labelColumn, hemisphereColumn, systemColumn]) {
      const problem = c >= 0 ? controlCharacterProblem(header[c], row[c]) : undefined;
      if (problem) problems.push(new InputError(problem, { file, line, column: c + 1 }, "remove the control character from the regions table"));
    }
    const label = row[labelColumn];
    if (isMissingCell(label, REGION_MISSING_VALUES)) {
      problems.push(new InputError(`region ${r + 1} has no label`, { file, line, column: labelColumn + 1 }));
    }
    const earlier = lineOfLabel.get(label);
    if (earlier !== undefined && !isMissingCell(label, REGION_MISSING_VALUES)) {
      problems.push(
        new InputError(`duplicate region label '${printable(label)}' on lines ${earlier} and ${line}`, {
          file,
          line,
          column: labelColumn + 1,
        }),
      );
    }
    if (earlier === undefined) lineOfLabel.set(label, line);

    const region: Region = { label };
    if (coordinateCount === 3) {
      const [x, y, z] = coordinateColumns.map((c) => {
        const cell = row[c];
        const value = DECIMAL.test(cell) ? Number(cell) : Number.NaN;
        if (!Number.isFinite(value)) {
          problems.push(
            new InputError(`coordinate ${header[c]} of region '${printable(label)}' is not a finite number: '${printable(cell)}'`, {
              file,
              line,
              column: c + 1,
            }),
          );
        }
        return value;
      });
      region.x = x;
      region.y = y;
      region.z = z;
    }
    if (hemisphereColumn >= 0 && !isMissingCell(row[hemisphereColumn], REGION_MISSING_VALUES)) region.hemisphere = row[hemisphereColumn];
    if (systemColumn >= 0 && !isMissingCell(row[systemColumn], REGION_MISSING_VALUES)) region.system = row[systemColumn];
    regions.push(region);
  }

  const error = inputErrors(problems);
  if (error) throw error;
  if (expectedCount !== undefined && regions.length !== expectedCount) {
    throw new InputError(
      `the regions table has ${regions.length} rows but the matrices have ${expectedCount} regions`,
      { file, line: regions.length > expectedCount ? lines[expectedCount] : (lines[lines.length - 1] ?? headerLine) },
    );
  }
  if (regions.length === 0) {
    throw new InputError("the regions table has no rows", { file, line: headerLine });
  }
  return regions;
}

/** Reads and parses a regions table; an unreadable file is an InputError naming it. */
export function readRegions(path: string, expectedCount?: number): Region[] {
  return parseRegions(readTableText(path, "the regions table"), path, expectedCount);
}

/** Regions labelled "1" … "N", for matrices given without a regions table. */
export function defaultRegions(count: number): Region[] {
  return Array.from({ length: count }, (_, k) => ({ label: String(k + 1) }));
}
