import path from "node:path";
import { VERSION } from "../version.js";
import { hashInputs, type InputRecord } from "../output/provenance.js";
import { ResultsFolder } from "../output/resultsFolder.js";
import { componentsTable, edgesTable } from "../output/resultTables.js";
import { fitAll, observeContrast, type ObservedContrast } from "./analyzeContrasts.js";
import { prepareAnalysis, type PreparedAnalysis } from "./prepareAnalysis.js";

/** What the user asked for (CLI flags or library call). */
export interface RunOptions {
  designFile: string;
  out: string;
  force?: boolean;
  quiet?: boolean;
  /** The command line as typed, for provenance. */
  commandLine?: string[];
}

export interface RunLog {
  info(text: string): void;
  warn(text: string): void;
}

export interface RunResult {
  prepared: PreparedAnalysis;
  contrasts: ObservedContrast[];
  outputFolder: string;
  inputs: InputRecord[];
}

/** Runs a design end to end and writes the results folder atomically. */
export function runAnalysis(options: RunOptions, log: RunLog): RunResult {
  const prepared = prepareAnalysis(options.designFile);
  for (const warning of prepared.warnings) log.warn(warning);
  const folder = ResultsFolder.open(options.out, { force: options.force ?? false });
  try {
    const inputs = hashInputs(prepared.inputs);
    const fit = fitAll(prepared);
    const contrasts = prepared.contrasts.map((contrast) => observeContrast(prepared, fit, contrast));
    for (const result of contrasts) {
      const { statistics } = result;
      folder.write(
        `${result.contrast.name}/edges.tsv`,
        edgesTable(
          prepared.pairs,
          prepared.regions,
          statistics.statistic,
          statistics.estimate,
          result.pUncorrected,
          result.qFdr,
          result.labels,
          [
            { name: "partial_r", values: statistics.partialR },
            { name: "standard_error", values: statistics.standardError },
          ],
        ),
      );
      folder.write(`${result.contrast.name}/components.tsv`, componentsTable(result.components, {}));
      if (statistics.degenerate > 0) {
        log.warn(
          `${result.contrast.name}: ${statistics.degenerate} edge${statistics.degenerate > 1 ? "s have" : " has"} zero residual variance (e.g. absent in every subject) and no statistic`,
        );
      }
    }
    folder.write("summary.json", `${JSON.stringify(buildSummary(prepared, contrasts, inputs, options), null, 2)}\n`);
    folder.commit();
    if (!options.quiet) {
      for (const result of contrasts) {
        const significant = result.qFdr.filter((q) => q <= prepared.design.inference.alpha).length;
        log.info(
          `${result.contrast.name}: ${result.components.length} supra-threshold component(s) at t > ${prepared.design.inference.threshold}; ${significant} edge(s) with q_fdr ≤ ${prepared.design.inference.alpha}`,
        );
      }
      log.info(`results written to ${folder.target}`);
    }
    return { prepared, contrasts, outputFolder: folder.target, inputs };
  } catch (error) {
    folder.abandon();
    throw error;
  }
}

export function buildSummary(
  prepared: PreparedAnalysis,
  contrasts: ObservedContrast[],
  inputs: InputRecord[],
  options: RunOptions,
): Record<string, unknown> {
  const { design, matrix, connectomes } = prepared;
  const designDir = path.dirname(path.resolve(design.file));
  const centers: Record<string, number> = {};
  const levels: Record<string, string[]> = {};
  for (const variable of matrix.variables.values()) {
    if (variable.kind === "numeric" && design.center.includes(variable.name)) centers[variable.name] = variable.center;
    if (variable.kind === "factor") levels[variable.name] = variable.levels;
  }
  return {
    tool: { name: "plexus", version: VERSION },
    command: options.commandLine ?? null,
    inputs: inputs.map((input) => ({
      role: input.role,
      path: path.relative(designDir, input.path) || path.basename(input.path),
      sha256: input.sha256,
    })),
    subjects: {
      in_table: prepared.participants.ids.length,
      used: prepared.kept.length,
      used_ids: prepared.kept.map((k) => k.id),
      excluded: prepared.excluded.map((x) => ({ participant_id: x.id, line: x.line, reason: x.reason })),
    },
    regions: connectomes.regionCount,
    edges: connectomes.edgeCount,
    design: {
      model: design.model,
      intercept: prepared.formula.intercept,
      columns: matrix.columns.map((c) => c.name),
      coding: "treatment (first level is the reference)",
      levels,
      centered: centers,
      rank: matrix.cols,
      df: matrix.rows - matrix.cols,
    },
    df: matrix.rows - matrix.cols,
    contrasts: contrasts.map((result) => ({
      name: result.contrast.name,
      expression: result.contrast.expression,
      vector: [...result.contrast.vector],
      edges_without_statistic: result.statistics.degenerate,
      supra_threshold_components: result.components.length,
    })),
    options: {
      transform: design.transform,
      symmetrize: design.symmetrize,
      asymmetry_tolerance: design.asymmetryTolerance,
      inference: {
        method: design.inference.method,
        threshold: design.inference.threshold,
        size: design.inference.size,
        tail: design.inference.tail,
        fdr: design.inference.fdr,
        alpha: design.inference.alpha,
        permutations: design.inference.permutations,
        seed: design.inference.seed,
        scheme: design.inference.scheme,
        blocks: design.inference.blocks ?? null,
        block_permutation: design.inference.blockPermutation,
      },
    },
    warnings: prepared.warnings,
  };
}
