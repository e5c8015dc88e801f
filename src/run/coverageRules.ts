import { InputError, inputErrors, isInputError } from "../errors.js";
import { MISSING_EDGES_HINT } from "../io/connectomeEdges.js";
import type { LoadedConnectomes } from "../io/connectomes.js";
import { designKeyLocation, type DesignSpec } from "../io/designFile.js";
import { printable } from "../io/printable.js";
import type { EdgePairs } from "../edges/edgeIndex.js";
import { applyEdgeRules, compactEdges, EDGE_MISSING, EDGE_RARE, keptPairs, regionsWithoutKeptEdge, scaleToTotal } from "../edges/edgeRules.js";
import { presentInPercent } from "../output/edgeRulesSummary.js";
import type { AppliedEdgeRules, KeptSubject } from "../output/preparedAnalysis.js";

/**
 * The edges' path from the matrices to the model, after the transform applied
 * at reading (fisher-z, log1p): the coverage rules (`edges:`), then the
 * per-participant scaling (`scale: total`, over the kept edges). The model,
 * the permutation engine and the strength measures see the kept edges only:
 * the data are compacted to them and the pairs carry their real regions.
 */
export function applyCoverage(
  design: DesignSpec,
  connectomes: LoadedConnectomes,
  pairs: EdgePairs,
  kept: readonly KeptSubject[],
): { connectomes: LoadedConnectomes; pairs: EdgePairs; edgeRules?: AppliedEdgeRules } {
  const S = connectomes.subjectCount;
  let data = connectomes.data;
  let analysed = pairs;
  let edgeRules: AppliedEdgeRules | undefined;
  if (design.edges) {
    const rules = design.edges;
    const counts = applyEdgeRules(data, S, pairs.edgeCount, { dropMissing: rules.missing === "drop", presentIn: rules.presentIn });
    const reasons = Array.from(counts.reason, (reason, e) => {
      if (reason === EDGE_MISSING) return `missing in ${counts.missing[e]} participant${counts.missing[e] === 1 ? "" : "s"}`;
      if (reason === EDGE_RARE) return `present in ${presentInPercent(counts.present[e] / S)} < ${presentInPercent(rules.presentIn!)}`;
      return "";
    });
    let missing = 0;
    let rare = 0;
    for (const reason of counts.reason) {
      if (reason === EDGE_MISSING) missing++;
      else if (reason === EDGE_RARE) rare++;
    }
    if (counts.kept.length === 0) {
      throw new InputError(
        `the edge rules leave no edge to analyse: ${missing} of ${pairs.edgeCount} edges are missing in some participant` +
          (rules.presentIn !== undefined ? `, ${rare} are present in fewer than ${presentInPercent(rules.presentIn)} of the ${S} participants` : ""),
        designKeyLocation(design, "edges"),
        rules.presentIn !== undefined ? "lower `edges.present_in`" : undefined,
      );
    }
    if (counts.kept.length < pairs.edgeCount) {
      const compact = new Float64Array(new SharedArrayBuffer(counts.kept.length * S * Float64Array.BYTES_PER_ELEMENT));
      data = compactEdges(data, S, counts.kept, compact);
      analysed = keptPairs(pairs, counts.kept);
    }
    edgeRules = {
      missing: rules.missing,
      ...(rules.presentIn !== undefined ? { presentIn: rules.presentIn } : {}),
      allPairs: pairs,
      kept: counts.kept,
      reasons,
      dropped: { missing, rare },
      regionsWithoutEdges: regionsWithoutKeptEdge(pairs, counts.kept),
    };
  }
  if (design.scale === "total") {
    const totals = scaleToTotal(data, S, analysed.edgeCount);
    const problems: InputError[] = [];
    totals.forEach((total, s) => {
      if (!(total > 0 && Number.isFinite(total))) {
        const file = connectomes.files.length === S ? connectomes.files[s] : connectomes.files[0];
        problems.push(
          new InputError(
            `participant '${printable(kept[s].id)}': the sum of the ${edgeRules ? "kept " : ""}edges is ${total}; 'scale: total' divides each matrix by that sum, which must be a positive number`,
            { file },
            "scale: total is meant for non-negative weights such as streamline counts; use `scale: none` for signed data",
          ),
        );
      }
    });
    const error = inputErrors(problems);
    if (error) throw error;
  }
  const result = data === connectomes.data ? connectomes : { ...connectomes, data, edgeCount: analysed.edgeCount };
  return { connectomes: result, pairs: analysed, ...(edgeRules ? { edgeRules } : {}) };
}

/**
 * A loading error about a non-finite cell, when the design does not drop missing
 * edges, gains (once, on its first line) the hint that `edges: {missing: drop}` exists.
 */
export function withMissingEdgesHint(error: unknown, design: DesignSpec): unknown {
  if (!isInputError(error) || design.edges?.missing === "drop") return error;
  // Non-finite cells of any reader; in a participants × edges table also empty, NA and nan cells (which `drop` reads as missing).
  const missingLike = /not finite|must be finite|is NaN|^the cell '(NA|nan)?' of edge '.*' is (empty|not a number)$/i;
  if (!error.problems.some((problem) => missingLike.test(problem.message))) return error;
  const hint = error.hint ? `${error.hint}\n  ${MISSING_EDGES_HINT}` : MISSING_EDGES_HINT;
  return new InputError(error.message, error.location, hint, error.also, error.unlisted);
}
