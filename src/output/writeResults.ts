import type { AnalysisResults } from "./analysisResults.js";
import type { EdgeColumns } from "./edgeColumns.js";
import { effectSizeColumns } from "./effectSizeColumns.js";
import { FAMILY_NULL_FILE, nullTable } from "./nullTable.js";
import { allEdgesFloat, allEdgesLabels } from "./allEdges.js";
import { componentsTable, edgeColumnsReadBack, edgesTable, regionsTable, subjectsTable, type ExtraEdgeColumn } from "./resultTables.js";
import type { ResultsFolder } from "./resultsFolder.js";
import { resultsSummary } from "./resultsSummary.js";
import { thresholdSweepFiles } from "./thresholdSweepFiles.js";
import { SUBNETWORK_VALUES_FILE, subnetworkValuesTable } from "./subnetworkValues.js";

/**
 * What the writer of a results folder still holds of it, so that a report made
 * right after the run reads nothing back from disk: the text of each file it
 * wrote (by absolute path) and each contrast's edge columns as they read back
 * from edges.tsv (src/output/resultTables.ts edgeColumnsReadBack), by name.
 */
export interface KnownResults {
  texts: Map<string, string>;
  edges: Map<string, EdgeColumns>;
}

/**
 * Writes every result file into the (staging) results folder; returns what the
 * report needs of them (their texts, and each contrast's edge columns as they
 * read back), so that writeReport need not read them from disk.
 */
export function writeResults(folder: ResultsFolder, results: AnalysisResults): KnownResults {
  const { prepared, contrasts, nulls, inferred } = results;
  const known: KnownResults = { texts: new Map(), edges: new Map() };
  const write = (relative: string, text: string): void => {
    folder.write(relative, text);
    known.texts.set(folder.pathOf(relative), text);
  };
  const { inference } = prepared.design;
  contrasts.forEach((observed, i) => {
    const contrastNull = nulls[i];
    const exact = contrastNull?.setup.context.plan.exact ?? false;
    const { fwe, free, sweep } = inferred[i];
    const { statistics } = observed;
    const extra: ExtraEdgeColumn[] = [];
    if (free) extra.push({ name: "enhanced", values: free.enhanced }, { name: "p_fwe", values: free.edgeP });
    else if (fwe?.edgeP) extra.push({ name: "p_fwe", values: fwe.edgeP });
    if (observed.contrast.kind === "F") extra.push({ name: "partial_eta_squared", values: statistics.partialR });
    else extra.push({ name: "partial_r", values: statistics.partialR }, { name: "standard_error", values: statistics.standardError });
    extra.push(...effectSizeColumns(observed));
    const name = observed.contrast.name;
    const labels = free ? free.labels : observed.labels;
    // With edge rules, the analysis saw the kept edges only; the table lists every edge, the others empty with their reason.
    const rules = prepared.edgeRules;
    const pairs = rules ? rules.allPairs : prepared.pairs;
    const float = (values: Float64Array) => (rules ? allEdgesFloat(values, rules) : values);
    const columns = [float(statistics.statistic), float(statistics.estimate), float(observed.pUncorrected), float(observed.qFdr)] as const;
    const edgeLabels = rules ? allEdgesLabels(labels, rules) : labels;
    const edgeExtra = rules ? extra.map((c) => ({ name: c.name, values: allEdgesFloat(c.values, rules) })) : extra;
    folder.write(`${name}/edges.tsv`, edgesTable(pairs, prepared.regions, ...columns, edgeLabels, edgeExtra, rules?.reasons));
    // The report takes this table's columns, not its text (which it would have to parse).
    known.edges.set(name, edgeColumnsReadBack(pairs, ...columns, edgeLabels, edgeExtra));
    write(
      `${name}/components.tsv`,
      free
        ? componentsTable(free.components, { pFwe: free.componentP })
        : componentsTable(
            observed.components,
            fwe
              ? {
                  pFwe: fwe.componentP.map((r) => r.p),
                  ...(fwe.exact ? {} : { pFweLow: fwe.componentP.map((r) => r.low), pFweHigh: fwe.componentP.map((r) => r.high) }),
                }
              : {},
          ),
    );
    if (sweep) for (const [file, text] of thresholdSweepFiles(name, prepared, observed, sweep, { alpha: inference.alpha, exact })) write(file, text);
    if (contrastNull) write(`${name}/null.tsv`, nullTable(contrastNull.rows));
    const values = results.subnetworkValues?.[i];
    if (values) write(`${name}/${SUBNETWORK_VALUES_FILE}`, subnetworkValuesTable(values));
  });
  if (results.familyNull) write(FAMILY_NULL_FILE, nullTable(results.familyNull));
  write("subjects.tsv", subjectsTable(prepared));
  write("regions.tsv", regionsTable(prepared.regions));
  const summary = resultsSummary(results);
  write("summary.json", `${JSON.stringify(summary, null, 2)}\n`);
  return known;
}
