import { existsSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { InputError } from "../errors.js";
import { VERSION } from "../version.js";
import { refuseInputOverlap, type GuardedInputs } from "./inputOverlap.js";
import { sha256Text } from "../common/sha256.js";
import { writeFilesAtomically } from "../common/writeAtomically.js";

/**
 * A single result file (`plexus extract --out FILE`), written to a temporary
 * name beside the target and renamed into place, with a record beside it,
 * `.NAME.plexus-file.json`, naming plexus and the SHA-256 of the bytes
 * written. `--force` replaces an existing file only when that record exists
 * and the file still has those bytes; a file is never replaced by one whose
 * path is an input or lies among the inputs.
 */
export function fileRecordFor(target: string): string {
  const resolved = path.resolve(target);
  return path.join(path.dirname(resolved), `.${path.basename(resolved)}.plexus-file.json`);
}

/** Checks that `out` may be written; returns its absolute path. */
export function checkResultFile(out: string, options: { force: boolean; inputs: GuardedInputs; key: string }): string {
  refuseInputOverlap(out, options.inputs, options.key);
  const target = path.resolve(out);
  if (!existsSync(target)) {
    if (!existsSync(path.dirname(target))) throw new InputError(`the folder of the output file does not exist: ${path.dirname(target)}`, { key: options.key });
    return target;
  }
  if (statSync(target).isDirectory()) throw new InputError("the output path is a folder; give a file name such as values.tsv", { key: options.key });
  if (!options.force) throw new InputError(`the output file ${out} exists`, { key: options.key }, "choose another name, or add --force to replace it (only a file plexus wrote can be replaced)");
  let recorded: string | undefined;
  try {
    const record = JSON.parse(readFileSync(fileRecordFor(target), "utf8")) as { tool?: { name?: string }; sha256?: string };
    if (record.tool?.name === "plexus" && typeof record.sha256 === "string") recorded = record.sha256;
  } catch {
    recorded = undefined;
  }
  if (recorded === undefined) {
    throw new InputError(
      `--force replaces only a file plexus wrote, and ${out} was not written by plexus (no ${path.basename(fileRecordFor(target))} beside it)`,
      { key: options.key },
      "choose another name, or move the file away yourself",
    );
  }
  if (sha256Text(readFileSync(target)) !== recorded) {
    throw new InputError(
      `--force replaces only a file plexus wrote, unchanged, and ${out} changed since plexus wrote it`,
      { key: options.key },
      "choose another name, or move the file away yourself",
    );
  }
  return target;
}

/** Writes `content` to a temporary sibling of `target`, renames it into place, then records it. */
export function writeResultFile(target: string, content: string): void {
  const temporary = path.join(path.dirname(target), `.${path.basename(target)}.plexus-tmp-${process.pid}-${Date.now().toString(36)}`);
  const record = `${JSON.stringify({ tool: { name: "plexus", version: VERSION }, sha256: sha256Text(content) }, null, 2)}\n`;
  try {
    writeFilesAtomically([
      { file: target, content, temporary },
      { file: fileRecordFor(target), content: record, temporary: `${temporary}.record` },
    ]);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    throw new InputError(
      `cannot write the values (${code ?? (error as Error).message})${code === "ENOSPC" ? ": the disk is full" : ""}`,
      { file: target },
      "nothing was changed at that path",
    );
  }
}
