import path from "node:path";
import { InputError, inputErrors } from "../errors.js";
import { loadConnectomes, resolveTemplate, type ConnectomeSource, type ConnectomeSubject, type LoadedConnectomes } from "../io/connectomes.js";
import { designKeyLocation, readDesign, type DesignSpec } from "../io/designFile.js";
import { nearestName } from "../io/nearestName.js";
import { factorCellProblems } from "../io/factorCells.js";
import { missingCodeLevelWarnings } from "../io/missingCodeLevels.js";
import { modelColumnProblems } from "../io/numericCells.js";
import { printable } from "../io/printable.js";
import { templateValueProblem } from "../io/templateValues.js";
import { PARTICIPANT_ID, readParticipantsCollecting } from "../io/participants.js";
import { controlCharacterCells, selectParticipants, selectionText, tableRows } from "../io/selectParticipants.js";
import { defaultRegions, readRegions } from "../io/regions.js";
import { contrastStatistics } from "../edges/contrastStatistics.js";
import { edgePairs } from "../edges/edgeIndex.js";
import { fitEdges, type EdgeFit } from "../edges/fitEdges.js";
import { contrastFStatistics } from "../edges/fStatistics.js";
import { parseContrast } from "../model/contrast.js";
import { buildDesignMatrix } from "../model/designMatrix.js";
import { formulaVariables, parseFormula } from "../model/formula.js";
import { codeVariable, type Variable } from "../model/variables.js";
import type { GuardedInputs } from "../output/inputOverlap.js";
import { contrastFolderProblem } from "../output/reservedNames.js";
import { checkRelabelings } from "../permute/exchangeability.js";
import { checkSharedRelabelings } from "../permute/sharedRelabelings.js";
import type { ExcludedSubject, KeptSubject, PreparedAnalysis } from "../output/preparedAnalysis.js";
import { applyCoverage, withMissingEdgesHint } from "./coverageRules.js";
import { checkEnhancementLevels } from "./enhancementLevels.js";
import { applyInferenceOverrides, overrideWarning, type InferenceOverrides } from "../common/inferenceOverrides.js";
import { chooseCohortTable } from "./cohortTableChoice.js";
import { scanDifferences } from "../edges/scanDifferences.js";
import { sharedFloat64 } from "../permute/nullContext.js";
import { availableThreads } from "../parallel/workerPool.js";
import { memoryBudget, type MemoryLimit } from "./memoryPlan.js";
import {
  absorbedColumns,
  checkPersonColumns,
  checkRepeatedColumns,
  completePeople,
  exchangeWholePeople,
  fittedDesign,
  groupScans,
  repeatedContrast,
  repeatedRecord,
  type ScanGroups,
} from "./repeatedScans.js";
import { presentInPercent } from "../output/edgeRulesSummary.js";


/**
 * Where the matrices come from: a path with `{column}` placeholders is a
 * template (one file per participant), any other path one file for every
 * participant; what a file holds is told by its bytes when it is read.
 */
export function connectomeSource(design: DesignSpec): ConnectomeSource {
  const spec = design.connectomes;
  const choice = {
    ...(design.connectomeVariable !== undefined ? { variable: design.connectomeVariable } : {}),
    ...(design.subjectsAxis !== undefined ? { subjectsAxis: design.subjectsAxis } : {}),
  };
  if (spec.includes("{")) return { kind: "template", template: spec, baseDir: design.baseDir, choice };
  return { kind: "file", path: path.resolve(design.baseDir, spec), choice };
}

export interface PrepareHooks {
  /**
   * Called once the design and the participants table are read and checked,
   * before any matrix is read, with every input the run will read (the output
   * is checked against them here, so that a wrong --out fails at once).
   */
  beforeMatrices?: (design: DesignSpec, inputs: GuardedInputs) => void;
  /** `--permutations`/`--seed` given on the command line, replacing the design's values. */
  overrides?: InferenceOverrides;
  /** The run's threads and memory limit (default: every core, this machine's memory), for the memory plan checked before the matrices are read. */
  memory?: { threads?: number; limit?: MemoryLimit };
}

/** Whether the design holds the edge data twice at some moment (memoryPlan.ts). */
export function holdsSecondCopy(design: DesignSpec): boolean {
  return design.edges !== undefined || design.repeated !== undefined || (design.inference.method !== "fdr" && design.contrasts.length > 1);
}

/** Reads and validates every input of a design file, in the order a user would fix them. */
export function prepareAnalysis(designFile: string, hooks: PrepareHooks = {}): PreparedAnalysis {
  const design = readDesign(designFile);
  return prepareFromDesign(design, hooks);
}

export function prepareFromDesign(designAsWritten: DesignSpec, hooks: PrepareHooks = {}): PreparedAnalysis {
  const { inference: overridden, applied: overrides } = applyInferenceOverrides(designAsWritten.inference, hooks.overrides);
  const design: DesignSpec = overrides ? { ...designAsWritten, inference: overridden } : designAsWritten;
  // A value given on the command line is located at its flag, not at the design key it replaced.
  const where = (key: string) =>
    (key === "inference.permutations" && overrides?.permutations !== undefined) || (key === "inference.seed" && overrides?.seed !== undefined)
      ? { key: `--${key.slice("inference.".length)}` }
      : designKeyLocation(design, key);
  for (const spec of design.contrasts) {
    const problem = contrastFolderProblem(spec.name);
    if (problem) {
      throw new InputError(
        `contrast name '${spec.name}' cannot be the folder of its results: ${problem}`,
        { file: design.file, key: spec.key, line: spec.line },
        "rename the contrast",
      );
    }
  }
  const formula = parseFormula(design.model, where("model"));
  const { inference } = design;
  if (inference.method !== "fdr" && 1 / (inference.permutations + 1) > inference.alpha) {
    throw new InputError(
      `with ${inference.permutations} permutations no p-value can fall below 1/(K+1) = ${(1 / (inference.permutations + 1)).toPrecision(3)}, which is above alpha = ${inference.alpha}`,
      where("inference.permutations"),
      `use at least ${Math.ceil(1 / inference.alpha)} permutations (thousands are usual)`,
    );
  }
  const participantsPath = path.resolve(design.baseDir, design.subjects);
  const { table: participants, problems: tableProblems } = readParticipantsCollecting(participantsPath, design.missingValues);
  const available = participants.header;

  const needed = formulaVariables(formula);
  for (const name of needed) {
    if (!participants.columns.has(name)) {
      const near = nearestName(name, available);
      throw new InputError(
        `the model uses '${name}', which is not a column of ${participants.file}`,
        where("model"),
        near ? `did you mean '${near}'?` : `columns: ${available.join(", ")}`,
      );
    }
  }
  for (const factor of Object.keys(design.levels)) {
    if (!needed.includes(factor)) {
      throw new InputError(`'levels' names '${factor}', which is not in the model`, where("levels"));
    }
  }
  for (const name of design.center) {
    if (!needed.includes(name)) throw new InputError(`'center' names '${name}', which is not in the model`, where("center"));
  }
  if (design.repeated) checkRepeatedColumns(design, participants, needed);
  const blockColumn = design.inference.blocks;
  if (blockColumn === PARTICIPANT_ID) {
    throw new InputError(
      `the exchangeability blocks column cannot be '${PARTICIPANT_ID}': every block would hold one subject`,
      where("inference.blocks"),
      "name a column that groups several subjects (e.g. family or site), or remove `blocks:`",
    );
  }
  if (blockColumn !== undefined && !participants.columns.has(blockColumn)) {
    const near = nearestName(blockColumn, available);
    throw new InputError(
      `the exchangeability blocks column '${blockColumn}' is not in ${participants.file}`,
      where("inference.blocks"),
      near ? `did you mean '${near}'?` : `columns: ${available.join(", ")}`,
    );
  }

  // The design's subset first (`select`), then listwise deletion over the model and block columns within it
  // (and the person column of a repeated design).
  const selection = selectParticipants(participants, design.select, where);
  const notSelected: ExcludedSubject[] = selection.notSelected.map(({ row, reason }) => ({ id: participants.ids[row], line: participants.lines[row], reason }));
  const checked = [...needed, ...(blockColumn ? [blockColumn] : []), ...(design.repeated ? [design.repeated.participant] : [])];
  let kept: KeptSubject[] = [];
  let excluded: ExcludedSubject[] = [];
  selection.rows.forEach((row) => {
    const id = participants.ids[row];
    const missing = checked.filter((name) => participants.columns.get(name)![row] === null);
    if (missing.length > 0) excluded.push({ id, line: participants.lines[row], reason: `missing ${missing.join(", ")}` });
    else kept.push({ id, tableRow: row });
  });

  // Every problem of the participants table's cells, reported in one pass, in file order.
  const source = connectomeSource(design);
  // The model's cells are checked in the analysed subset only; every cell written to subjects.tsv is free of control characters.
  const selected = tableRows(participants, selection.rows);
  const notSelectedRows = selection.notSelected.map((x) => x.row);
  const cellProblems = [
    ...tableProblems,
    ...modelColumnProblems(selected, needed, new Set(Object.keys(design.levels))),
    ...factorCellProblems(selected, needed, design.levels, blockColumn),
    ...controlCharacterCells(participants, checked, notSelectedRows),
    ...controlCharacterCells(
      participants,
      [...design.select.map((s) => s.column), ...(design.cohortTable.by ? [design.cohortTable.by] : []), ...(design.cohortTable.variables ?? [])].filter(
        (name) => !checked.includes(name),
      ),
      participants.ids.map((_, row) => row),
    ),
  ];
  if (source.kind === "template") {
    const problem = templateValueProblem(source.template, participants, kept.map((k) => k.tableRow), "connectomes");
    if (problem) cellProblems.push(problem);
  }
  cellProblems.sort((a, b) => (a.location.line ?? 0) - (b.location.line ?? 0) || (a.location.column ?? 0) - (b.location.column ?? 0));
  const cellError = inputErrors(cellProblems);
  if (cellError) throw cellError;
  if (kept.length === 0) {
    throw new InputError(
      `no ${design.select.length > 0 ? "selected " : ""}subject has values in every model column (${checked.join(", ")})`,
      { file: participants.file },
      `check for missing values (${design.missingValues.map((v) => JSON.stringify(v)).join(", ")}) in those columns`,
    );
  }
  const warnings: string[] = [];
  if (overrides) warnings.push(overrideWarning(overrides, design.file, inference.method !== "fdr"));
  if (excluded.length > 0) {
    warnings.push(
      `${excluded.length} participant${excluded.length > 1 ? "s" : ""} left out for missing values: ${excluded
        .map((x) => `${printable(x.id)} (${x.reason})`)
        .join("; ")}`,
    );
  }

  selectedFactorCheck(design, needed, kept.map((k) => k.tableRow), participants, where);
  // Several scans per person: group them, leave out people without the scans the design needs.
  let scans: ScanGroups | undefined;
  if (design.repeated) {
    scans = groupScans(design, participants, kept);
    checkPersonColumns(design, participants, scans, needed);
    kept = scans.kept;
    excluded = [...excluded, ...scans.excluded].sort((a, b) => a.line - b.line);
    if (scans.excluded.length > 0) {
      warnings.push(
        `${scans.excluded.length} scan${scans.excluded.length > 1 ? "s" : ""} left out because the person lacks a scan the design needs: ${scans.excluded
          .map((x) => `${printable(x.id)} (${x.reason})`)
          .join("; ")}`,
      );
    }
  }

  const codeVariables = (rows: KeptSubject[]): Map<string, Variable> => {
    const coded = new Map<string, Variable>();
    for (const name of needed) {
      const column = participants.columns.get(name)!;
      coded.set(
        name,
        codeVariable(
          name,
          {
            values: rows.map((k) => column[k.tableRow]!),
            lines: rows.map((k) => participants.lines[k.tableRow]),
            file: participants.file,
          },
          {
            levels: scans && name === design.repeated!.within ? scans.levels : design.levels[name],
            center: design.center.includes(name),
            levelsKey: where("levels"),
            centerKey: where("center"),
          },
        ),
      );
    }
    return coded;
  };
  let variables = codeVariables(kept);
  const factorColumns = [...variables.values()].filter((v) => v.kind === "factor").map((v) => v.name);
  warnings.push(
    ...missingCodeLevelWarnings(
      participants,
      blockColumn ? [...factorColumns, blockColumn] : factorColumns,
      kept.map((k) => k.tableRow),
      design.missingValues,
    ),
  );
  let longMatrix = buildDesignMatrix(formula, variables, kept.length, where("model"));
  if (scans && !scans.first && exchangeWholePeople(design, longMatrix, scans)) {
    // Between-person contrasts with three or more levels: whole people are exchanged, so each needs a scan at every level.
    const complete = completePeople(participants, scans);
    if (complete.excluded.length > 0) {
      warnings.push(
        `${complete.excluded.length} scan${complete.excluded.length > 1 ? "s" : ""} left out because the person lacks a scan at some level (people are exchanged as units, so each needs every level): ${complete.excluded
          .map((x) => `${printable(x.id)} (${x.reason})`)
          .join("; ")}`,
      );
      excluded = [...excluded, ...complete.excluded].sort((a, b) => a.line - b.line);
      kept = complete.kept;
      variables = codeVariables(kept);
      longMatrix = buildDesignMatrix(formula, variables, kept.length, where("model"));
    }
    scans = complete;
    warnings.push(
      "the contrasts compare people, so whole people are exchanged as units; the edges' uncorrected p-values and q-values treat scans as independent and ignore the correlation of a person's scans: rely on the permutation p-values (p_fwe)",
    );
  }
  const fitted = scans ? fittedDesign(design, longMatrix, scans) : undefined;
  const matrix = fitted ? fitted.matrix : longMatrix;
  const absorbed = fitted && scans ? absorbedColumns(longMatrix, fitted, scans) : [];
  if (absorbed.length > 0) {
    warnings.push(
      `the person effects absorb the between-person column${absorbed.length > 1 ? "s" : ""} ${absorbed.join(", ")} (constant over each person's scans): ${absorbed.length > 1 ? "they are" : "it is"} not fitted, and only contrasts within people are tested`,
    );
  }
  const contrasts = design.contrasts.map((spec) =>
    fitted
      ? repeatedContrast(spec.name, spec.expression, longMatrix, fitted, design, scans!, { file: design.file, key: spec.key, line: spec.line })
      : parseContrast(spec.name, spec.expression, matrix, { file: design.file, key: spec.key, line: spec.line }),
  );
  for (const contrast of contrasts) if (contrast.note) warnings.push(contrast.note);
  for (const [k, contrast] of contrasts.entries()) {
    if (contrast.kind === "F" && inference.tail !== "upper") {
      const spec = design.contrasts[k];
      throw new InputError(
        `'${contrast.name}' is an F contrast (${contrast.rows.length} rows), which has no direction; 'inference.tail: ${inference.tail}' applies to t contrasts only`,
        { file: design.file, key: spec.key, line: spec.line },
        "use `tail: upper` (the default), or split the F contrast into t contrasts",
      );
    }
  }

  const cohortTable = chooseCohortTable({
    spec: design.cohortTable,
    participants,
    rows: kept.map((k) => k.tableRow),
    matrix,
    contrasts,
    defaultVariables: blockColumn ? [...needed, blockColumn] : needed,
    ...(design.repeated ? { personColumns: [design.repeated.participant, design.repeated.within] } : {}),
    where,
  });

  let blocks: PreparedAnalysis["blocks"];
  if (blockColumn) {
    const column = participants.columns.get(blockColumn)!;
    const values = kept.map((k) => column[k.tableRow]!);
    const labels = [...new Set(values)];
    blocks = { column: blockColumn, codes: Int32Array.from(values, (v) => labels.indexOf(v)), labels };
  }
  let relabelings: PreparedAnalysis["relabelings"];
  if (scans && !scans.first) {
    // Repeated measures: each person's scans are one exchangeability block, permuted within (Winkler et al. 2015),
    // or whole people exchanged as units for between-person contrasts (scans.whole).
    if (inference.scheme === "sign-flip" && !scans.whole) {
      throw new InputError(
        "with three or more levels of the within factor the scans of a person are not independent, so their signs cannot be flipped one by one",
        where("inference.scheme"),
        "use `scheme: auto` (relabelings within each person) or analyse two levels (paired differences, tested by sign flips)",
      );
    }
    blocks = { column: design.repeated!.participant, codes: scans.person, labels: scans.labels };
  }
  // Whole people exchanged as units (repeated measures, between-person contrasts): the run's block rule.
  const runDesign: DesignSpec = scans?.whole ? { ...design, inference: { ...design.inference, blockPermutation: "whole" } } : design;
  if (inference.method !== "fdr") {
    relabelings = checkRelabelings({
      matrix,
      contrasts,
      contrastWhere: design.contrasts.map((spec) => ({ file: design.file, key: spec.key, line: spec.line })),
      inference: runDesign.inference,
      blocks: blocks?.codes,
      where,
    });
  }
  // The schemes checkRelabelings just chose (none under method fdr, which checkSharedRelabelings refuses first).
  const acrossNote = checkSharedRelabelings({ contrasts, schemes: relabelings?.map((r) => r.scheme) ?? [], inference, where });
  if (acrossNote) warnings.push(acrossNote);

  const subjectOfRow = (row: number): ConnectomeSubject => ({
    id: participants.ids[row],
    tableRow: row,
    values: Object.fromEntries(participants.header.map((name) => [name, participants.columns.get(name)![row]])),
  });
  const regionsPath = design.regions ? path.resolve(design.baseDir, design.regions) : undefined;
  hooks.beforeMatrices?.(design, plannedInputs(design, source, participantsPath, regionsPath, participants.ids.map((_, row) => subjectOfRow(row))));
  const regionTable = regionsPath ? readRegions(regionsPath) : undefined;
  let loaded: LoadedConnectomes;
  try {
    loaded = loadConnectomes(
      source,
      kept.map((k) => subjectOfRow(k.tableRow)),
      {
        symmetrize: design.symmetrize,
        asymmetryTolerance: design.asymmetryTolerance,
        transform: design.transform,
        ...(design.edges ? { missing: design.edges.missing } : {}),
        participantRowCount: participants.ids.length,
        ...(regionTable ? { regionTable: { labels: regionTable.map((r) => r.label), file: regionsPath! } } : {}),
      },
      memoryBudget({ secondCopy: holdsSecondCopy(design), threads: hooks.memory?.threads ?? availableThreads() }, hooks.memory?.limit),
    );
  } catch (error) {
    throw withMissingEdgesHint(error, design);
  }
  if (loaded.regionCount < 2) {
    throw new InputError("connectivity matrices must have at least 2 regions", where("connectomes"));
  }
  // The edge rules and scaling apply to every scan; then, for paired differences, each person's second scan minus
  // the first, edge by edge over the kept edges (after any transform, e.g. of z values).
  const covered = applyCoverage(design, loaded, edgePairs(loaded.regionCount), kept);
  const { pairs, edgeRules } = covered;
  const connectomes: LoadedConnectomes = scans?.first
    ? {
        ...covered.connectomes,
        subjectCount: scans.labels.length,
        data: scanDifferences(
          covered.connectomes.data,
          covered.connectomes.subjectCount,
          covered.connectomes.edgeCount,
          scans.first,
          scans.second!,
          sharedFloat64(scans.labels.length * covered.connectomes.edgeCount),
        ),
      }
    : covered.connectomes;
  if (connectomes.reading.reordered) {
    warnings.push("the matrices name their regions in another order than the regions table; their rows and columns were reordered to the table's order");
  }
  if (edgeRules && edgeRules.kept.length < edgeRules.allPairs.edgeCount) {
    const { missing, rare } = edgeRules.dropped;
    const why = [
      ...(edgeRules.missing === "drop" ? [`${missing} missing in some participant`] : []),
      ...(edgeRules.presentIn !== undefined ? [`${rare} present in fewer than ${presentInPercent(edgeRules.presentIn)} of the participants`] : []),
    ];
    warnings.push(`the edge rules left out ${missing + rare} of ${edgeRules.allPairs.edgeCount} edges (${why.join(", ")}); ${edgeRules.kept.length} edges are analysed`);
  }
  let fit: EdgeFit | undefined;
  if (inference.method === "threshold-free") {
    // The enhancement's work grows with the largest statistic ÷ step: fit here (the run reuses this fit), so that
    // `check` and a run refuse a step that is too fine before any checkpoint or relabeling.
    fit = fitEdges(matrix.values, matrix.rows, matrix.cols, connectomes.data, connectomes.edgeCount);
    for (const contrast of contrasts) {
      const statistic = contrast.kind === "F" ? contrastFStatistics(fit, contrast.rows).statistic : contrastStatistics(fit, contrast.vector).statistic;
      checkEnhancementLevels(statistic, inference, where("inference.enhancement.step"));
    }
  }
  const regions = regionsPath
    ? regionTable!.length === connectomes.regionCount
      ? regionTable!
      : readRegions(regionsPath, connectomes.regionCount)
    : connectomes.labels
      ? connectomes.labels.map((label) => ({ label }))
      : defaultRegions(connectomes.regionCount);

  if (edgeRules && edgeRules.regionsWithoutEdges.length > 0) {
    const names = edgeRules.regionsWithoutEdges.map((r) => printable(regions[r].label));
    warnings.push(
      `${names.length === 1 ? "1 region has" : `${names.length} regions have`} no analysed edge (the edge rules left out all of ${names.length === 1 ? "its" : "their"} edges): ${names.join(", ")}`,
    );
  }
  const inputs = [
    { role: "design", path: path.resolve(design.file) },
    { role: "participants", path: participantsPath },
    ...(regionsPath ? [{ role: "regions", path: regionsPath }] : []),
    ...connectomes.files.map((file, k) => ({ role: "connectome", path: file, ...(connectomes.sha256 ? { sha256: connectomes.sha256[k] } : {}) })),
  ];
  return {
    design: runDesign,
    formula,
    participants,
    kept,
    excluded,
    notSelected,
    cohortTable,
    matrix,
    contrasts,
    regions,
    pairs,
    connectomes,
    ...(edgeRules ? { edgeRules } : {}),
    blocks,
    inputs,
    warnings,
    ...(scans && fitted ? { repeated: repeatedRecord(design, scans, fitted) } : {}),
    ...(fit ? { fit } : {}),
    ...(overrides ? { overrides } : {}),
    ...(relabelings ? { relabelings } : {}),
  };
}

/**
 * Every file a design reads, without reading a matrix: the design, the
 * tables, and each participant's matrix (the template filled for every row
 * of the participants table, left-out subjects included) or the .npy stack;
 * the folders holding per-participant matrices are input folders.
 */
function plannedInputs(
  design: DesignSpec,
  source: ConnectomeSource,
  participantsPath: string,
  regionsPath: string | undefined,
  subjects: ConnectomeSubject[],
): GuardedInputs {
  const files = [path.resolve(design.file), participantsPath, ...(regionsPath ? [regionsPath] : [])];
  const folders = new Set<string>();
  if (source.kind === "file") {
    files.push(source.path);
  } else {
    for (const subject of subjects) {
      let file: string;
      try {
        file = resolveTemplate(source.template, subject, source.baseDir);
      } catch {
        continue; // a row the template cannot fill (e.g. n/a): the loader reports it if that subject is used
      }
      files.push(file);
      folders.add(path.dirname(file));
    }
  }
  return { files, folders: [...folders] };
}

/**
 * A model column that `select` restricts: a factor left with one level among
 * the analysed participants cannot be estimated, and a level listed under
 * `levels:` that `select` leaves out has no participant; both are errors at
 * the `select` key, saying why.
 */
function selectedFactorCheck(
  design: DesignSpec,
  modelColumns: readonly string[],
  rows: readonly number[],
  participants: { columns: Map<string, (string | null)[]> },
  where: (key: string) => { file?: string; key: string; line?: number | undefined },
): void {
  for (const spec of design.select) {
    if (!modelColumns.includes(spec.column)) continue;
    const key = `select.${spec.column}`;
    const listed = design.levels[spec.column];
    const outside = listed?.filter((level) => !spec.values.includes(level)) ?? [];
    if (outside.length > 0) {
      throw new InputError(
        `'levels' of '${spec.column}' list ${outside.map((l) => `'${printable(l)}'`).join(", ")}, which 'select' leaves out (it keeps ${selectionText([spec])}), so no analysed participant has ${outside.length > 1 ? "them" : "it"}`,
        where(key),
        `list only the selected levels under \`levels: ${spec.column}\`, or remove '${spec.column}' from the model if one level remains`,
      );
    }
    const cells = participants.columns.get(spec.column)!;
    const present = new Set(rows.map((r) => cells[r]));
    if (present.size === 1) {
      throw new InputError(
        `the model uses '${spec.column}', but 'select' keeps only ${selectionText([{ column: spec.column, values: [...present].map(String) }])}, so it has one value among the analysed participants and cannot be estimated`,
        where(key),
        `remove '${spec.column}' (and the contrasts that compare its levels) from the model: within the subset it is constant`,
      );
    }
  }
}
