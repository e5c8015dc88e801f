import { copyEdges, meanOverEdges } from "../edges/subnetworkMeans.js";
import { covariateAdjusted } from "../model/covariateAdjusted.js";
import { dataViewColumns, type DataView } from "../model/dataViewColumns.js";
import { observedComponents, signsOfTail } from "../network/components.js";
import { ThresholdFreeEnhancer } from "../network/thresholdFree.js";
import type { ContrastInference, ObservedContrast } from "../output/contrastResults.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import type { SubnetworkValues } from "../output/subnetworkValues.js";

/** Confidence level of the fitted values' interval in subnetwork_values.tsv. */
export const SUBNETWORK_VALUES_LEVEL = 0.95;

/**
 * The analysed data of the edges that can belong to a significant subnetwork,
 * copied before the permutations overwrite the data (run/runAnalysis.ts): the
 * edges of the observed supra-threshold components (components, max-t), the
 * edges the threshold-free enhancement does not leave at zero (only they can
 * reach p_FWE ≤ α). Only for t contrasts with a data view. Without
 * permutations (fdr) the data themselves, uncopied.
 */
export interface CapturedEdges {
  /** Kept-edge indices, ascending. */
  edges: Uint32Array;
  /** Edge-major copy: rows[k·S + s] for edges[k]. */
  rows: Float64Array;
  subjects: number;
}

export function captureSubnetworkEdges(prepared: PreparedAnalysis, contrasts: ObservedContrast[]): CapturedEdges {
  const { inference } = prepared.design;
  const { pairs } = prepared;
  const subjects = prepared.connectomes.subjectCount;
  // Without permutations nothing overwrites the data: they are used as they are, with no copy.
  if (inference.method === "fdr") return { edges: Uint32Array.from({ length: pairs.edgeCount }, (_, e) => e), rows: prepared.connectomes.data, subjects };
  const wanted = new Uint8Array(pairs.edgeCount);
  for (const observed of contrasts) {
    if (!dataViewColumns(observed.contrast, prepared.matrix)) continue;
    const t = observed.statistics.statistic;
    if (inference.method === "threshold-free") {
      const enhancer = new ThresholdFreeEnhancer(pairs.regionA, pairs.regionB, pairs.regionCount, inference.enhancement);
      const enhanced = enhancer.enhanceTail(t, signsOfTail(inference.tail), new Float64Array(t.length));
      for (let e = 0; e < t.length; e++) if (enhanced[e] !== 0 && Number.isFinite(t[e])) wanted[e] = 1;
    } else {
      for (let e = 0; e < t.length; e++) if (observed.labels[e] > 0) wanted[e] = 1;
    }
  }
  const edges: number[] = [];
  wanted.forEach((w, e) => {
    if (w) edges.push(e);
  });
  const list = Uint32Array.from(edges);
  return { edges: list, rows: copyEdges(prepared.connectomes.data, subjects, list), subjects };
}

/**
 * Each contrast's significant subnetworks as edge lists: components with
 * p_FWE ≤ α (components, max-t: the supra-threshold components; threshold-free:
 * the components of the edges with p_FWE ≤ α), or (fdr) the connected
 * components of the FDR-significant edges, positive and negative edges apart,
 * numbered largest first.
 */
function significantSubnetworks(prepared: PreparedAnalysis, observed: ObservedContrast, inferred: ContrastInference): { selection: SubnetworkValues["selection"]; subnetworks: { id: number; edges: number[] }[] } {
  const { inference } = prepared.design;
  let labels: Int32Array;
  let ids: number[];
  let selection: SubnetworkValues["selection"];
  if (inferred.free) {
    labels = inferred.free.labels;
    ids = inferred.free.components.filter((_, k) => inferred.free!.componentP[k] <= inference.alpha).map((c) => c.id);
    selection = "threshold-free components";
  } else if (inferred.fwe) {
    labels = observed.labels;
    ids = observed.components.filter((_, k) => inferred.fwe!.componentP[k].p <= inference.alpha).map((c) => c.id);
    selection = "components p_fwe";
  } else {
    const t = observed.statistics.statistic;
    const marks = Float64Array.from(t, (v, e) => (observed.qFdr[e] <= inference.alpha && Number.isFinite(v) ? Math.sign(v) : 0));
    const { pairs } = prepared;
    const found = observedComponents(marks, pairs.regionA, pairs.regionB, pairs.regionCount, 0.5, inference.tail, "extent");
    labels = found.labels;
    ids = found.components.map((c) => c.id);
    selection = "fdr components";
  }
  const byId = new Map(ids.map((id) => [id, [] as number[]]));
  for (let e = 0; e < labels.length; e++) byId.get(labels[e])?.push(e);
  return { selection, subnetworks: ids.map((id) => ({ id, edges: byId.get(id)! })) };
}

/** The identifier of each design row: the participant_id of each analysed row, or each person's for paired differences. */
function rowIds(prepared: PreparedAnalysis): string[] {
  const { repeated, kept, participants, matrix } = prepared;
  if (repeated?.design === "paired differences") {
    const column = participants.columns.get(repeated.participant)!;
    const people: string[] = [];
    for (const k of kept) {
      const person = column[k.tableRow] ?? "";
      if (!people.includes(person)) people.push(person);
    }
    if (people.length === matrix.rows) return people;
  }
  return kept.length === matrix.rows ? kept.map((k) => k.id) : Array.from({ length: matrix.rows }, (_, i) => String(i + 1));
}

/** Per design row, the group or the covariate value the figure shows. */
function shownValues(prepared: PreparedAnalysis, view: DataView): { levels: string[]; groups: string[]; covariate: Float64Array } | undefined {
  const rows = prepared.matrix.rows;
  const none = { levels: [], groups: new Array<string>(rows).fill(""), covariate: new Float64Array(rows).fill(NaN) };
  if (view.variable === null) return none;
  const variable = prepared.matrix.variables.get(view.variable);
  if (!variable) return undefined;
  if (variable.kind === "factor") {
    if (variable.codes.length !== rows) return undefined;
    return { ...none, levels: variable.levels, groups: Array.from(variable.codes, (c) => variable.levels[c]) };
  }
  if (variable.values.length !== rows) return undefined;
  return { ...none, covariate: Float64Array.from(variable.values) };
}

/**
 * The values behind each contrast's significant subnetworks (undefined for a
 * contrast without a data view or without a significant subnetwork), from the
 * captured edges: per design row, the mean over the subnetwork's edges of the
 * analysed values (each person's difference for paired differences), and the
 * same adjusted for the nuisance columns (model/covariateAdjusted.ts).
 */
export function subnetworkValues(
  prepared: PreparedAnalysis,
  contrasts: ObservedContrast[],
  inferred: ContrastInference[],
  captured: CapturedEdges,
): (SubnetworkValues | undefined)[] {
  const position = new Map<number, number>();
  captured.edges.forEach((e, k) => position.set(e, k));
  const { matrix } = prepared;
  return contrasts.map((observed, i) => {
    const view = dataViewColumns(observed.contrast, matrix);
    if (!view) return undefined;
    const shown = shownValues(prepared, view);
    if (!shown) return undefined;
    const { selection, subnetworks } = significantSubnetworks(prepared, observed, inferred[i]);
    const usable = subnetworks.filter((s) => s.edges.length > 0 && s.edges.every((e) => position.has(e)));
    if (usable.length === 0) return undefined;
    return {
      plot: view.plot,
      variable: view.variable,
      levels: shown.levels,
      adjustedFor: view.adjustedFor,
      selection,
      level: SUBNETWORK_VALUES_LEVEL,
      ids: rowIds(prepared),
      groups: shown.groups,
      covariate: shown.covariate,
      subnetworks: usable.map((s) => {
        const mean = meanOverEdges(captured.rows, captured.subjects, s.edges.map((e) => position.get(e)!));
        const adjusted = covariateAdjusted(matrix.values, matrix.rows, matrix.cols, view.nuisance, mean, SUBNETWORK_VALUES_LEVEL);
        return { id: s.id, edges: s.edges.length, mean, adjusted: adjusted.adjusted, fitted: adjusted.fitted, lower: adjusted.lower, upper: adjusted.upper };
      }),
    };
  });
}
