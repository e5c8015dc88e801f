import { existsSync, mkdirSync, mkdtempSync, renameSync, rmSync, statSync, writeFileSync } from "node:fs";
import path from "node:path";
import type { Command } from "commander";
import { InputError } from "../../errors.js";
import { systemReason } from "../../io/readInputFile.js";
import { loadResults } from "../../report/loadResults.js";
import { reportFiles } from "../../report/writeReport.js";
import type { OutputSink } from "../main.js";

/**
 * `plexus report DIR`: rewrites the tables, methods, figures and report.html
 * of an existing results folder from its files, without recomputing. Every
 * file is first written into a temporary folder inside DIR; only when all are
 * written are they renamed into place, so a failure leaves the earlier report
 * files as they were.
 */
export function registerReport(program: Command, sink: OutputSink): void {
  program
    .command("report")
    .description("rewrite the tables, methods paragraph, figures and report.html of a results folder (no recomputation)")
    .argument("<dir>", "results folder written by `plexus run`")
    .option("--median", "add a median [IQR] row under each numeric characteristic of the cohort table", false)
    .action((dir: string, flags: { median: boolean }) => {
      const files = reportFiles(loadResults(dir), { median: flags.median });
      replaceFiles(dir, files);
      sink.out(`plexus report: wrote ${files.size} files to ${dir} (report.html, tables.md, tables.tex, methods.md, tables/, figures/)\n`);
    });
}

/** Writes `files` (relative path → text) into `dir` through a temporary folder and renames them into place. */
export function replaceFiles(dir: string, files: Map<string, string>): void {
  const root = path.resolve(dir);
  if (!existsSync(root) || !statSync(root).isDirectory()) throw new InputError("the results folder does not exist", { file: dir });
  let staging: string;
  try {
    staging = mkdtempSync(path.join(root, `.plexus-tmp-report-${process.pid}-`));
  } catch (error) {
    throw new InputError(`cannot write into the results folder: ${systemReason(error)}`, { file: dir });
  }
  const inside = (base: string, relative: string) => {
    const full = path.resolve(base, relative);
    if (!full.startsWith(base + path.sep)) throw new Error(`refusing to write outside the results folder: ${relative}`);
    return full;
  };
  try {
    for (const [relative, text] of files) {
      const full = inside(staging, relative);
      mkdirSync(path.dirname(full), { recursive: true });
      writeFileSync(full, text);
    }
    for (const relative of files.keys()) {
      const target = inside(root, relative);
      mkdirSync(path.dirname(target), { recursive: true });
      renameSync(inside(staging, relative), target);
    }
  } finally {
    rmSync(staging, { recursive: true, force: true });
  }
}
