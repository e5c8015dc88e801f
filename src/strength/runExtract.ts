import { InputError } from "../errors.js";
import { formulaVariables } from "../model/formula.js";
import { hashInputs } from "../output/provenance.js";
import { checkResultFile, writeResultFile } from "../output/resultFile.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import { prepareAnalysis } from "../run/prepareAnalysis.js";
import { refuseRepeated } from "../run/repeatedScans.js";
import type { EdgeSet } from "./edgeSets.js";
import { edgeSetMean } from "./measures.js";
import { circularityWarning, sampleOverlap, type SampleOverlap } from "./sampleOverlap.js";
import { selectEdgeSets } from "./selectEdgeSets.js";
import { hasEdgeSet, OPTION, type EdgeSelection } from "./strengthOptions.js";
import { withSelectionInputs, type StrengthLog } from "./runStrength.js";
import { valuesTable } from "./strengthTables.js";

/**
 * `plexus extract`: the per-subject mean connectivity of each chosen edge
 * set (by default every significant subnetwork of an earlier results
 * folder), after the design's transform, in one TSV with participant_id and
 * the model's columns as read, the sets' means, then every other column of
 * the participants table, for analysis in any statistics package. The
 * file is written to a temporary name beside the target and renamed into
 * place. When the subnetwork was found in the same data, a warning says that
 * testing it again there is circular, and what would be valid.
 */
export interface ExtractOptions {
  designFile: string;
  /** The TSV to write. */
  out: string;
  selection: EdgeSelection;
  force?: boolean;
  quiet?: boolean;
}

export interface ExtractResult {
  prepared: PreparedAnalysis;
  sets: EdgeSet[];
  /** Set-major values over the design's subjects: values[k·S + s]. */
  values: Float64Array;
  outputFile: string;
  overlap?: SampleOverlap;
  warnings: string[];
}

export function runExtract(options: ExtractOptions, log: StrengthLog): ExtractResult {
  const { selection } = options;
  if (!hasEdgeSet(selection)) {
    throw new InputError(
      "choose the edges to average",
      { key: OPTION.from },
      "give --from RESULTS_DIR/<contrast> (its significant subnetworks), --pairs FILE, --system NAME or --between A,B",
    );
  }
  if ((selection.components?.length ?? 0) > 0 && !selection.from) {
    throw new InputError("--component picks components of the results folder given with --from", { key: OPTION.component }, "add --from RESULTS_DIR/<contrast>");
  }
  let target = "";
  // The output is checked (not an input, not among them, the --force rule) before any matrix is read.
  const prepared = prepareAnalysis(options.designFile, {
    beforeMatrices: (design, inputs) => {
      refuseRepeated(design, "plexus extract");
      target = checkResultFile(options.out, { force: options.force ?? false, inputs: withSelectionInputs(inputs, selection), key: OPTION.out });
    },
  });
  const warnings = [...prepared.warnings];
  for (const warning of prepared.warnings) log.warn(warning);
  const selected = selectEdgeSets(selection, prepared.regions, prepared.pairs);
  const ids = prepared.kept.map((k) => k.id);
  let overlap: SampleOverlap | undefined;
  if (selected.source) {
    overlap = sampleOverlap(selected.source.results.summary, hashInputs(prepared.inputs.filter((i) => i.role === "connectome")), ids);
    const warning = circularityWarning(overlap, selected.source.folder);
    if (warning) {
      warnings.push(warning);
      log.warn(warning);
    }
  }
  const { data, subjectCount: S } = prepared.connectomes;
  const values = new Float64Array(selected.sets.length * S);
  selected.sets.forEach((set, k) => values.set(edgeSetMean(data, S, set.edges, false), k * S));

  const columns = formulaVariables(prepared.formula);
  if (prepared.blocks && !columns.includes(prepared.blocks.column)) columns.push(prepared.blocks.column);
  const cells = columns.map((name) => {
    const column = prepared.participants.columns.get(name)!;
    return { name, cells: prepared.kept.map((k) => column[k.tableRow]) };
  });
  // Then every other column of the participants table, in table order, so the file stands alone for analysis elsewhere.
  const rest = prepared.participants.header
    .slice(1)
    .filter((name) => !columns.includes(name))
    .map((name) => {
      const column = prepared.participants.columns.get(name)!;
      return { name, cells: prepared.kept.map((k) => column[k.tableRow]) };
    });
  writeResultFile(target, valuesTable(ids, cells, selected.sets.map((s) => s.name), values, rest));
  if (!options.quiet) {
    for (const set of selected.sets) log.info(`${set.name}: ${set.description}, ${set.edges.length} edges`);
    log.info(`mean connectivity of ${selected.sets.length} edge set(s) for ${S} participants written to ${target}`);
  }
  return { prepared, sets: selected.sets, values, outputFile: target, overlap, warnings };
}
