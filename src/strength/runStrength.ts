import { existsSync } from "node:fs";
import path from "node:path";
import { silentProgress, type Progress } from "../common/progress.js";
import { InputError } from "../errors.js";
import { defaultThreads } from "../permute/nullEngine.js";
import { hashInputs } from "../output/provenance.js";
import type { GuardedInputs } from "../output/inputOverlap.js";
import { ResultsFolder } from "../output/resultsFolder.js";
import { pValue } from "../output/report/printNumbers.js";
import { tablesDocx } from "../output/report/tablesDocx.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import { prepareAnalysis } from "../run/prepareAnalysis.js";
import { refuseRepeated } from "../run/repeatedScans.js";
import { circularityWarning, sampleOverlap, type SampleOverlap } from "./sampleOverlap.js";
import { selectEdgeSets } from "./selectEdgeSets.js";
import { analyzeStrength, type StrengthAnalysis } from "./strengthAnalysis.js";
import { strengthLatex, strengthMarkdown } from "./strengthMarkdown.js";
import { strengthReportContent, strengthReportFiles, type StrengthReportInput } from "./strengthReport.js";
import { inputsSummary } from "../output/summaryParts.js";
import { resolveMeasure, type EdgeSelection, type StrengthOptions } from "./strengthOptions.js";
import { strengthSummary } from "./strengthSummary.js";
import { VERSION } from "../version.js";
import type { SubnetworkSource } from "./subnetworksFromResults.js";
import { measuresTable, nodesTable, valuesTable } from "./strengthTables.js";

/**
 * `plexus strength`: checks the options, reads the design and its inputs,
 * computes the measures, fits the contrasts, draws the permutations and
 * writes the results folder atomically:
 *   <contrast>/nodes.tsv     (nodal)  or  <contrast>/measures.tsv (global, subnetwork)
 *   strength_values.tsv, results.md (draft results paragraphs and the print tables), tables.tex and
 *   tables.docx (the same tables), methods.md, figures/<contrast>-nodal-180mm.svg, -85mm.svg and .png
 *   (nodal, when the figure draws), report.html, summary.json
 */
export interface StrengthLog {
  info(text: string): void;
  warn(text: string): void;
}

export interface StrengthResult {
  prepared: PreparedAnalysis;
  analysis: StrengthAnalysis;
  outputFolder: string;
  warnings: string[];
  overlap?: SampleOverlap;
}

export const STRENGTH_CHUNK_SIZE = 250;

export async function runStrength(options: StrengthOptions, log: StrengthLog, progress: Progress = silentProgress): Promise<StrengthResult> {
  const measure = resolveMeasure(options);
  const opened: { folder?: ResultsFolder } = {};
  try {
    // The output is checked (inputs, lock, --force rule) before any matrix is read.
    const prepared = prepareAnalysis(options.designFile, {
      ...(options.overrides ? { overrides: options.overrides } : {}),
      beforeMatrices: (design, inputs) => {
        refuseRepeated(design, "plexus strength");
        opened.folder = ResultsFolder.open(options.out, { force: options.force ?? false, inputs: withSelectionInputs(inputs, options.selection), warn: log.warn });
      },
    });
    const folder = opened.folder;
    if (!folder) throw new Error("the output folder was not opened before the matrices were read");
    refuseFContrasts(prepared);
    const warnings = [...prepared.warnings];
    // The strength measures' p_FWE are corrected over the measures of each contrast; the design's option applies to `run`.
    if (prepared.design.inference.acrossContrasts && prepared.contrasts.length > 1) {
      warnings.push("'inference.across_contrasts' applies to `plexus run`; the p_FWE of `plexus strength` are corrected over the measures within each contrast, not across contrasts");
    }
    for (const warning of warnings) log.warn(warning);
    const selected = measure === "subnetwork" ? selectEdgeSets(options.selection ?? {}, prepared.regions, prepared.pairs) : undefined;
    const inputs = hashInputs([...prepared.inputs, ...(selected?.files ?? [])]);
    let source: { subnetworks: SubnetworkSource; overlap: SampleOverlap } | undefined;
    if (selected?.source) {
      const overlap = sampleOverlap(selected.source.results.summary, inputs, prepared.kept.map((k) => k.id));
      const warning = circularityWarning(overlap, selected.source.folder);
      if (warning) {
        warnings.push(warning);
        log.warn(warning);
      }
      source = { subnetworks: selected.source, overlap };
    }
    const analysis = await analyzeStrength(
      prepared,
      { measure, positiveOnly: options.positiveOnly ?? false, mean: options.mean ?? false, sets: selected?.sets ?? [] },
      {
        threads: options.threads ?? defaultThreads(),
        chunkSize: options.chunkSize ?? STRENGTH_CHUNK_SIZE,
        progress: options.quiet ? silentProgress : progress,
      },
    );
    for (const result of analysis.contrasts) {
      const name = result.contrast.name;
      if (measure === "nodal") folder.write(`${name}/nodes.tsv`, nodesTable(analysis, result));
      else folder.write(`${name}/measures.tsv`, measuresTable(analysis, result));
      const degenerate = result.statistics.degenerate;
      if (degenerate > 0) {
        const warning = `${name}: ${degenerate} measure${degenerate > 1 ? "s have" : " has"} zero residual variance (e.g. a region without edges in every subject) and no statistic`;
        if (!warnings.includes(warning)) {
          warnings.push(warning);
          log.warn(warning);
        }
      }
    }
    folder.write("strength_values.tsv", valuesTable(prepared.kept.map((k) => k.id), [], analysis.names, analysis.values));
    const summary = strengthSummary(prepared, analysis, inputs, options.commandLine ?? null, source, warnings);
    const report: StrengthReportInput = { prepared, analysis, warnings, source, inputs: inputsSummary(inputs, prepared.design.file), command: options.commandLine ?? null };
    const content = strengthReportContent(report);
    folder.write("results.md", strengthMarkdown(prepared, analysis, warnings, content.results));
    const twins = `<contrast>/${measure === "nodal" ? "nodes" : "measures"}.tsv hold the same values`;
    folder.write("tables.tex", strengthLatex(content.tables, VERSION, twins));
    folder.write("tables.docx", await tablesDocx(content.tables, VERSION, twins));
    // methods.md, the figures (SVG and PNG at both widths) and report.html, into the same uncommitted folder.
    for (const [file, text] of strengthReportFiles(report, content)) folder.write(file, text);
    folder.write("summary.json", `${JSON.stringify(summary, null, 2)}\n`);
    folder.commit();
    if (!options.quiet) {
      for (const line of resultLines(prepared, analysis)) log.info(line);
      log.info(`results written to ${folder.target}`);
    }
    return { prepared, analysis, outputFolder: folder.target, warnings, overlap: source?.overlap };
  } catch (error) {
    opened.folder?.abandon();
    throw error;
  }
}

/**
 * A design's inputs plus what an edge selection reads: an edge list, and the
 * contrast folder given with --from together with the results folder holding
 * it (the folder above, when it has a summary.json).
 */
export function withSelectionInputs(inputs: GuardedInputs, selection: EdgeSelection | undefined): GuardedInputs {
  const files = [...inputs.files];
  const folders = [...inputs.folders];
  if (selection?.pairs) files.push(path.resolve(selection.pairs));
  if (selection?.from) {
    const from = path.resolve(selection.from);
    folders.push(from);
    if (existsSync(path.join(path.dirname(from), "summary.json"))) folders.push(path.dirname(from));
  }
  return { files, folders };
}

/** The tables report β, SE and t per measure: a one-row (t) contrast each. */
function refuseFContrasts(prepared: PreparedAnalysis): void {
  prepared.contrasts.forEach((contrast, k) => {
    if (contrast.kind !== "F") return;
    const spec = prepared.design.contrasts[k];
    throw new InputError(
      `'${contrast.name}' is an F contrast (${contrast.rows.length} rows); plexus strength reports β, SE and t per measure, which need a one-row contrast`,
      { file: prepared.design.file, key: spec.key, line: spec.line },
      "test its rows as separate contrasts",
    );
  });
}

/** "p = 0.012" or "p < 0.001". */
function pText(label: string, p: number): string {
  const text = pValue(p);
  return text.startsWith("<") ? `${label} ${text}` : `${label} = ${text}`;
}

/** One line per contrast for the terminal. */
function resultLines(prepared: PreparedAnalysis, analysis: StrengthAnalysis): string[] {
  const { alpha } = prepared.design.inference;
  return analysis.contrasts.map((result) => {
    const name = result.contrast.name;
    const { familywise } = result;
    if (analysis.choice.measure === "nodal") {
      const fdr = Array.from(result.qFdr).filter((q) => q <= alpha).length;
      const regions = (count: number) => `${count} ${count === 1 ? "region" : "regions"}`;
      const fwe = familywise ? `${regions(Array.from(familywise.pFwe).filter((p) => p <= alpha).length)} with p_FWE ≤ ${alpha}, ` : "";
      return `${name}: ${fwe}${familywise ? fdr : regions(fdr)} with q_FDR ≤ ${alpha} (of ${analysis.names.length} regions)`;
    }
    const parts = analysis.names.map((measureName, m) => {
      const t = result.statistics.statistic[m];
      const fwe = familywise ? `, ${pText("p_FWE", familywise.pFwe[m])}` : "";
      return `${measureName} t(${result.statistics.df}) = ${Number.isFinite(t) ? t.toFixed(2) : "n/a"}, ${pText("p", result.pUncorrected[m])}${fwe}`;
    });
    return `${name}: ${parts.join("; ")}`;
  });
}
