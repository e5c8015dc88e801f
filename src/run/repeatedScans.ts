import { InputError, inputErrors, type InputLocation } from "../errors.js";
import type { DesignSpec } from "../io/designFile.js";
import { nearestName } from "../io/nearestName.js";
import { PARTICIPANT_ID, type ParticipantsTable } from "../io/participants.js";
import { printable } from "../io/printable.js";
import { changeDesign, mapContrastRow, type FittedDesign } from "../model/changeDesign.js";
import { parseContrast, type Contrast, type ContrastExpression } from "../model/contrast.js";
import type { DesignMatrix } from "../model/designMatrix.js";
import { constantWithinPersons, personEffectsDesign } from "../model/personEffectsDesign.js";
import { compareLevels, isNumericText } from "../model/variables.js";
import type { ExcludedSubject, KeptSubject, RepeatedDesign } from "../output/preparedAnalysis.js";

/**
 * `repeated: { participant, within }`: a long-form participants table (one
 * row per scan) analysed per person. Two levels of the within factor: paired
 * differences (model/changeDesign.ts); three or more: person effects with
 * relabelings within each person (model/personEffectsDesign.ts).
 */

/** Checks the two columns against the table and the model before any row is read (keys `repeated.*`). */
export function checkRepeatedColumns(design: DesignSpec, participants: ParticipantsTable, modelVariables: string[]): void {
  const spec = design.repeated!;
  const where = (key: string): InputLocation => ({ file: design.file, key, line: design.lines.get(key) ?? design.lines.get("repeated") });
  for (const key of ["participant", "within"] as const) {
    const name = spec[key];
    if (name !== PARTICIPANT_ID && !participants.columns.has(name)) {
      const near = nearestName(name, participants.header);
      throw new InputError(`'repeated.${key}' names '${name}', which is not a column of ${participants.file}`, where(`repeated.${key}`), near ? `did you mean '${near}'?` : `columns: ${participants.header.join(", ")}`);
    }
  }
  if (spec.participant === PARTICIPANT_ID) {
    throw new InputError(
      `'repeated.participant' cannot be '${PARTICIPANT_ID}', which identifies each row (each scan): every person would have one scan`,
      where("repeated.participant"),
      "add a column naming the person of each scan (several rows share it) and name it here",
    );
  }
  if (!modelVariables.includes(spec.within)) {
    throw new InputError(
      `the model does not use the within-person factor '${spec.within}' that 'repeated.within' names`,
      where("model"),
      `write it in the model, e.g. \`model: ${spec.within} + group\`, and test it with a contrast such as ${spec.within}[second] - ${spec.within}[first]`,
    );
  }
  if (modelVariables.includes(spec.participant)) {
    throw new InputError(
      `the model uses the participant column '${spec.participant}': with 'repeated' plexus builds the person effects itself`,
      where("model"),
      `remove '${spec.participant}' from the model`,
    );
  }
  if (design.lines.has("inference.block_permutation")) {
    throw new InputError(
      "'inference.block_permutation' cannot be combined with 'repeated': plexus chooses it (scans permuted within each person for within-person contrasts, whole people exchanged for contrasts between people)",
      where("inference.block_permutation"),
      "remove `block_permutation:`",
    );
  }
  if (design.inference.blocks !== undefined) {
    throw new InputError(
      "'inference.blocks' cannot be combined with 'repeated': the relabelings are built from the participants (each person's scans are one block, or each person's difference is one unit)",
      where("inference.blocks"),
      "remove `blocks:`",
    );
  }
}

/**
 * The within factor's levels: the design's `levels:` order, else numeric order when every value is a number.
 * Text levels need `levels:`: their order sets the direction of the change (second minus first) that
 * between-person contrasts test, and an alphabetical order (post before pre) would reverse it silently.
 */
export function withinLevels(design: DesignSpec, participants: ParticipantsTable, rows: number[]): string[] {
  const within = design.repeated!.within;
  const given = design.levels[within];
  if (given) return given;
  const column = participants.columns.get(within)!;
  const distinct = [...new Set(rows.map((row) => column[row]!))];
  if (distinct.every(isNumericText)) return distinct.sort((a, b) => compareLevels(a, b) || (a < b ? -1 : a > b ? 1 : 0));
  const shown = distinct.slice(0, 6).map(printable);
  throw new InputError(
    `the levels of the within factor '${printable(within)}' (${shown.join(", ")}${distinct.length > 6 ? ", …" : ""}) need an order under 'levels:': the first is the reference, and with two levels each person's change is the second minus the first`,
    { file: design.file, key: "levels", line: design.lines.get("levels") ?? design.lines.get("repeated") },
    `e.g. \`levels: { ${within}: [${shown.join(", ")}] }\`, listed from the first session (baseline) on`,
  );
}

export interface ScanGroups {
  kept: KeptSubject[];
  /** Scans left out because their person lacks a scan the design needs (reason "no post scan", "one scan only"). */
  excluded: ExcludedSubject[];
  levels: string[];
  /** Per kept scan, its person (0-based, in order of first appearance). */
  person: Int32Array;
  labels: string[];
  /** The within column's cells, by row of the participants table. */
  levelColumn: (string | null)[];
  /** Two levels: per person, the position among the kept scans of the first and of the second level's scan. */
  first?: Int32Array;
  second?: Int32Array;
  /** Three or more levels, between-person contrasts: whole people are exchanged (each has a scan at every level). */
  whole?: boolean;
}

/**
 * Groups the kept scans by person: two scans of one person at the same level
 * are an error (every such pair in one pass); with two levels a person
 * needs both, with more a person needs at least two scans.
 */
export function groupScans(design: DesignSpec, participants: ParticipantsTable, kept: KeptSubject[]): ScanGroups {
  const { participant, within } = design.repeated!;
  const personColumn = participants.columns.get(participant)!;
  const levelColumn = participants.columns.get(within)!;
  const levels = withinLevels(design, participants, kept.map((k) => k.tableRow));
  const byPerson = new Map<string, Map<string, KeptSubject>>();
  const problems: InputError[] = [];
  for (const scan of kept) {
    const who = personColumn[scan.tableRow]!;
    const level = levelColumn[scan.tableRow]!;
    const scans = byPerson.get(who) ?? byPerson.set(who, new Map()).get(who)!;
    const earlier = scans.get(level);
    if (earlier) {
      problems.push(
        new InputError(
          `participant '${printable(who)}' has two scans at ${within} '${printable(level)}' (lines ${participants.lines[earlier.tableRow]} and ${participants.lines[scan.tableRow]})`,
          { file: participants.file, line: participants.lines[scan.tableRow] },
          `each person has at most one row per level of '${within}'`,
        ),
      );
    } else {
      scans.set(level, scan);
    }
  }
  const error = inputErrors(problems);
  if (error) throw error;
  const two = levels.length === 2;
  const keptScans: KeptSubject[] = [];
  const excluded: ExcludedSubject[] = [];
  const labels: string[] = [];
  for (const [who, scans] of byPerson) {
    const complete = two ? scans.size === 2 : scans.size >= 2;
    if (!complete) {
      const reason = two ? `no ${levels.find((l) => !scans.has(l))} scan` : "one scan only";
      for (const scan of scans.values()) excluded.push({ id: scan.id, line: participants.lines[scan.tableRow], reason });
      continue;
    }
    labels.push(who);
  }
  const keepPerson = new Map(labels.map((who, p) => [who, p]));
  const person: number[] = [];
  for (const scan of kept) {
    const p = keepPerson.get(personColumn[scan.tableRow]!);
    if (p === undefined) continue;
    keptScans.push(scan);
    person.push(p);
  }
  if (labels.length === 0) {
    throw new InputError(
      two
        ? `no participant has a scan at both levels of '${within}' (${levels.join(", ")}) with values in every model column`
        : `no participant has two or more scans with values in every model column`,
      { file: design.file, key: "repeated.participant", line: design.lines.get("repeated.participant") },
      `check the columns '${participant}' and '${within}' of ${participants.file}`,
    );
  }
  const groups: ScanGroups = { kept: keptScans, excluded, levels, person: Int32Array.from(person), labels, levelColumn };
  if (two) {
    groups.first = new Int32Array(labels.length);
    groups.second = new Int32Array(labels.length);
    keptScans.forEach((scan, i) => {
      const level = levelColumn[scan.tableRow]!;
      (level === levels[0] ? groups.first! : groups.second!)[person[i]] = i;
    });
  }
  return groups;
}

/**
 * With two levels, every model column other than the within factor describes
 * the person: its two rows must agree (each difference is one person's).
 */
export function checkPersonColumns(design: DesignSpec, participants: ParticipantsTable, groups: ScanGroups, modelVariables: string[]): void {
  if (!groups.first) return;
  const { participant, within } = design.repeated!;
  const problems: InputError[] = [];
  for (const name of modelVariables) {
    if (name === within) continue;
    const column = participants.columns.get(name)!;
    groups.labels.forEach((who, p) => {
      const a = groups.kept[groups.first![p]].tableRow;
      const b = groups.kept[groups.second![p]].tableRow;
      if (column[a] !== column[b]) {
        problems.push(
          new InputError(
            `'${name}' differs between the two scans of ${participant} '${printable(who)}' ('${printable(column[a] ?? "")}' on line ${participants.lines[a]}, '${printable(column[b] ?? "")}' on line ${participants.lines[b]})`,
            { file: participants.file, line: participants.lines[b] },
            `with two levels of '${within}' the other model columns describe the person and must be the same on both rows (e.g. age at the first scan)`,
          ),
        );
      }
    });
  }
  const error = inputErrors(problems);
  if (error) throw error;
}

/**
 * Three or more levels: whether the contrasts compare people (every column
 * they weight is constant over each person's scans, the intercept included),
 * so whole people must be exchanged (Winkler et al. 2015), rather than scans
 * within people. A contrast, or a design, that mixes the two is refused: the
 * two need different models and different relabelings.
 */
export function exchangeWholePeople(design: DesignSpec, long: DesignMatrix, groups: ScanGroups): boolean {
  const { within } = design.repeated!;
  const persons = groups.labels.length;
  const betweenColumn = long.columns.map((column, j) => column.parts.length === 0 || constantWithinPersons(long, j, groups.person, persons));
  const kinds = new Map<string, "between" | "within">();
  for (const spec of design.contrasts) {
    if (isNumericRows(spec.expression)) continue;
    const where: InputLocation = { file: design.file, key: spec.key, line: spec.line };
    const contrast = parseContrast(spec.name, spec.expression, long, where);
    const weighted = new Set<boolean>();
    for (const row of contrast.rows) row.forEach((w, j) => w !== 0 && weighted.add(betweenColumn[j]));
    if (weighted.size > 1) {
      throw new InputError(
        `'${spec.name}' weights both columns that compare people and columns that vary within people: with three or more levels of '${within}' the two are tested with different models and relabelings (scans permuted within each person, or whole people exchanged)`,
        where,
        "split it into a within-person contrast and a between-person contrast, in two design files",
      );
    }
    kinds.set(spec.name, weighted.has(true) ? "between" : "within");
  }
  const values = new Set(kinds.values());
  if (values.size > 1) {
    const named = (kind: string) => [...kinds].filter(([, k]) => k === kind).map(([name]) => `'${name}'`).join(", ");
    throw new InputError(
      `with three or more levels of '${within}', contrasts on the within factor (${named("within")}) and contrasts between people (${named("between")}) need different models and relabelings (scans permuted within each person, or whole people exchanged as units)`,
      { file: design.file, key: "contrasts", line: design.lines.get("contrasts") },
      "put the within-person contrasts and the between-person contrasts in two design files",
    );
  }
  return values.has("between");
}

/** The scan groups restricted to people with a scan at every level (whole people are exchanged: their blocks must match). */
export function completePeople(participants: ParticipantsTable, groups: ScanGroups): ScanGroups {
  const count = new Array<number>(groups.labels.length).fill(0);
  for (const p of groups.person) count[p]++;
  const keepPerson = count.map((n) => n === groups.levels.length);
  const index = new Map<number, number>();
  const labels: string[] = [];
  keepPerson.forEach((keep, p) => {
    if (!keep) return;
    index.set(p, labels.length);
    labels.push(groups.labels[p]);
  });
  // Each person's scans in level order, so that exchanging two people maps scan to scan at the same level
  // (the relabelings exchange blocks position by position).
  const order = groups.kept
    .map((scan, i) => ({ scan, p: groups.person[i], level: groups.levels.indexOf(groups.levelColumn[scan.tableRow]!) }))
    .filter((entry) => keepPerson[entry.p])
    .sort((a, b) => index.get(a.p)! - index.get(b.p)! || a.level - b.level);
  const kept: KeptSubject[] = order.map((entry) => entry.scan);
  const person: number[] = order.map((entry) => index.get(entry.p)!);
  const excluded: ExcludedSubject[] = [];
  const levelsOf = new Map<number, Set<string>>();
  const withinColumn = groups.levelColumn;
  groups.kept.forEach((scan, i) => {
    const p = groups.person[i];
    (levelsOf.get(p) ?? levelsOf.set(p, new Set()).get(p)!).add(withinColumn[scan.tableRow]!);
  });
  groups.kept.forEach((scan, i) => {
    const p = groups.person[i];
    if (keepPerson[p]) return;
    const missing = groups.levels.filter((level) => !levelsOf.get(p)!.has(level));
    excluded.push({ id: scan.id, line: participants.lines[scan.tableRow], reason: `no ${missing.join(", ")} scan` });
  });
  if (labels.length < 2) {
    throw new InputError(
      `fewer than two participants have a scan at every level (${groups.levels.join(", ")}), which exchanging whole people needs`,
      { file: participants.file },
      "test within-person contrasts, or complete the table",
    );
  }
  return { ...groups, kept, excluded, person: Int32Array.from(person), labels, whole: true };
}

/** The design fitted: the change model (two levels), the person-effects model (three or more), or the long-form model when whole people are exchanged. */
export function fittedDesign(design: DesignSpec, long: DesignMatrix, groups: ScanGroups): FittedDesign {
  const modelKey: InputLocation = { file: design.file, key: "model", line: design.lines.get("model") };
  const { participant, within } = design.repeated!;
  if (groups.first) return changeDesign(long, groups.first, groups.second!, within, groups.levels as [string, string], modelKey);
  if (groups.whole) return { matrix: long, target: Int32Array.from(long.columns, (_, j) => j), centres: long.columns.map(() => 0) };
  return personEffectsDesign(long, groups.person, groups.labels, participant, modelKey);
}

function isNumericRows(expression: ContrastExpression): boolean {
  if (typeof expression === "string") return false;
  return expression.every((item) => typeof item === "number" || (Array.isArray(item) && item.every((v) => typeof v === "number")));
}

/**
 * A contrast read as written against the long-form model (`session[post] -
 * session[pre]`, `group[treated] - group[waitlist]`), then carried to the
 * fitted columns; a numeric vector is over the fitted columns (as `plexus
 * check` lists them). Columns the fitted design cannot test are refused with
 * the reason.
 */
export function repeatedContrast(
  name: string,
  expression: ContrastExpression,
  long: DesignMatrix,
  fitted: FittedDesign,
  design: DesignSpec,
  groups: ScanGroups,
  where: InputLocation,
): Contrast {
  if (isNumericRows(expression)) return parseContrast(name, expression, fitted.matrix, where);
  const onLong = parseContrast(name, expression, long, where);
  const { within } = design.repeated!;
  const two = groups.first !== undefined;
  const [firstLevel, secondLevel] = groups.levels;
  const rows = onLong.rows.map((row) => {
    const { vector, untestable } = mapContrastRow(row, fitted.target, fitted.matrix.cols);
    if (untestable.length > 0) {
      const named = untestable.map((j) => long.columns[j].name).join(", ");
      if (two) {
        throw new InputError(
          `'${name}' weights ${named}: the mean level of connectivity over both scans, which each person's difference removes`,
          where,
          `test the change with ${within}[${secondLevel}] - ${within}[${firstLevel}], or a difference in change with a between-person term (e.g. group[b] - group[a])`,
        );
      }
      throw new InputError(
        `'${name}' compares people (it weights ${named}, which is constant over each participant's scans): with three or more levels of '${within}' the person effects absorb every between-person difference; testing one would need whole participants exchanged as units, each with the same number of scans (Winkler et al. 2015)`,
        where,
        `test contrasts on '${within}' (or its interactions) here; for a difference in change between groups, analyse two levels of '${within}' (paired differences)`,
      );
    }
    return Array.from(vector);
  });
  const contrast = parseContrast(name, rows.length === 1 ? rows[0] : rows, fitted.matrix, where);
  const { note: _note, ...rest } = contrast;
  return { ...rest, kind: rows.length === 1 ? "t" : "F", expression: onLong.expression, ...(onLong.note ? { note: onLong.note } : {}) };
}

/** The long-form columns the person effects absorb (between-person terms of a within-person design), for a warning; empty otherwise. */
export function absorbedColumns(long: DesignMatrix, fitted: FittedDesign, groups: ScanGroups): string[] {
  if (groups.first || groups.whole) return [];
  return long.columns.filter((column, j) => column.parts.length > 0 && fitted.target[j] < 0).map((column) => column.name);
}

/** The `repeated` record of a prepared analysis (summary.json, methods, report). */
export function repeatedRecord(design: DesignSpec, groups: ScanGroups, fitted: FittedDesign): RepeatedDesign {
  const { participant, within } = design.repeated!;
  const two = groups.first !== undefined;
  return {
    participant,
    within,
    levels: groups.levels,
    design: two ? "paired differences" : "repeated measures",
    people: groups.labels.length,
    scans: groups.kept.length,
    ...(two ? {} : { exchange: groups.whole ? "whole people" : "within each person" }),
    ...(two
      ? {
          difference: `${groups.levels[1]} - ${groups.levels[0]}`,
          centred: Object.fromEntries(fitted.matrix.columns.slice(1).map((c, k) => [c.name, fitted.centres[k + 1]])),
        }
      : {}),
  };
}

/**
 * Commands that take one row per person (strength measures, extraction, power
 * planning from a pilot) refuse a repeated design before any matrix is read.
 */
export function refuseRepeated(design: DesignSpec, command: string): void {
  if (!design.repeated) return;
  throw new InputError(
    `${command} does not support 'repeated' (several scans per person): it takes one matrix per participant`,
    { file: design.file, key: "repeated", line: design.lines.get("repeated") },
    "run `plexus run` on this design, or give this command a design with one row per participant (e.g. each person's difference computed beforehand)",
  );
}
