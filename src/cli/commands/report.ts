import type { Command } from "commander";
import { rewriteResultsFolder } from "../../output/rewriteResultsFolder.js";
import { loadResults } from "../../output/report/loadResults.js";
import { allReportFiles } from "../../output/report/writeReport.js";
import type { OutputSink } from "../outputSink.js";

/**
 * `plexus report DIR`: rewrites the tables, methods, figures and report.html
 * of an existing results folder from its files, without recomputing, under
 * the folder's lock and through a temporary folder (output/rewriteResultsFolder.ts),
 * replacing only files plexus wrote there.
 */
export function registerReport(program: Command, sink: OutputSink): void {
  program
    .command("report")
    .description("rewrite the tables (Markdown, LaTeX, Word), methods paragraph, figures and report.html of a results folder (no recomputation)")
    .argument("<dir>", "results folder written by `plexus run`")
    .option("--median", "add a median [IQR] row under each numeric characteristic of the cohort table", false)
    .action(async (dir: string, flags: { median: boolean }) => {
      const files = await rewriteResultsFolder(
        dir,
        () => allReportFiles(loadResults(dir), { median: flags.median }),
        (warning) => sink.err(`plexus: warning: ${warning}\n`),
      );
      sink.out(`plexus report: wrote ${files.size} files to ${dir} (report.html, tables.md, tables.tex, tables.docx, methods.md, results.md, tables/, figures/)\n`);
    });
}
