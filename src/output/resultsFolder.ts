import { existsSync, mkdirSync, readdirSync, renameSync, rmSync, writeFileSync } from "node:fs";
import path from "node:path";
import { InputError } from "../errors.js";

/**
 * A results folder written all at once: files go into a temporary sibling
 * folder and only a complete set is renamed into place, so a failure at any
 * point (including a full disk) leaves any earlier results exactly as they were.
 */
export class ResultsFolder {
  readonly target: string;
  readonly staging: string;
  private finished = false;

  private constructor(target: string, staging: string) {
    this.target = target;
    this.staging = staging;
  }

  /** Refuses an existing non-empty target unless `force`; creates the staging folder. */
  static open(target: string, options: { force: boolean; optionName?: string }): ResultsFolder {
    const resolved = path.resolve(target);
    if (existsSync(resolved)) {
      let entries: string[];
      try {
        entries = readdirSync(resolved);
      } catch {
        throw new InputError(`the output path exists and is not a folder`, { file: target });
      }
      if (entries.length > 0 && !options.force) {
        throw new InputError(
          "the output folder exists and is not empty",
          { file: target },
          `choose another folder, or add ${options.optionName ?? "--force"} to replace it`,
        );
      }
    }
    const parent = path.dirname(resolved);
    try {
      mkdirSync(parent, { recursive: true });
    } catch (error) {
      throw new InputError(`cannot create the folder ${parent}: ${(error as Error).message}`, { file: target });
    }
    removeAbandonedStaging(parent, path.basename(resolved));
    const staging = path.join(parent, `.${path.basename(resolved)}.plexus-tmp-${process.pid}-${Date.now().toString(36)}`);
    mkdirSync(staging, { recursive: true });
    return new ResultsFolder(resolved, staging);
  }

  /** Path inside the staging folder for a relative name; refuses names that leave the folder. */
  pathOf(relative: string): string {
    const full = path.resolve(this.staging, relative);
    if (full !== this.staging && !full.startsWith(this.staging + path.sep)) {
      throw new Error(`refusing to write outside the results folder: ${relative}`);
    }
    return full;
  }

  /** Writes a file; a failure of the file system (e.g. a full disk) is reported as an InputError naming the file. */
  write(relative: string, content: string | Uint8Array): void {
    const full = this.pathOf(relative);
    try {
      mkdirSync(path.dirname(full), { recursive: true });
      writeFileSync(full, content);
    } catch (error) {
      const code = (error as NodeJS.ErrnoException).code;
      throw new InputError(
        `cannot write the results (${code ?? (error as Error).message})${code === "ENOSPC" ? ": the disk is full" : ""}`,
        { file: path.join(this.target, relative) },
        "nothing was changed in the output folder; free space or choose another folder, then run again (add --resume to reuse the finished permutations)",
      );
    }
  }

  /** Moves the complete results into place, replacing an earlier folder only now. */
  commit(): void {
    if (this.finished) return;
    const old = `${this.staging}-old`;
    const hadTarget = existsSync(this.target);
    if (hadTarget) renameSync(this.target, old);
    try {
      renameSync(this.staging, this.target);
    } catch (error) {
      if (hadTarget) renameSync(old, this.target);
      throw error;
    }
    if (hadTarget) rmSync(old, { recursive: true, force: true });
    this.finished = true;
  }

  /** Removes the staging folder after a failure; the target is untouched. */
  abandon(): void {
    if (this.finished) return;
    rmSync(this.staging, { recursive: true, force: true });
    this.finished = true;
  }
}

/** Removes staging folders left by runs that were killed (their process no longer exists). */
function removeAbandonedStaging(parent: string, base: string): void {
  const prefix = `.${base}.plexus-tmp-`;
  let entries: string[];
  try {
    entries = readdirSync(parent);
  } catch {
    return;
  }
  for (const name of entries) {
    if (!name.startsWith(prefix)) continue;
    const pid = Number(name.slice(prefix.length).split("-")[0]);
    if (!Number.isInteger(pid) || pid === process.pid || processAlive(pid)) continue;
    rmSync(path.join(parent, name), { recursive: true, force: true });
  }
}

function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === "EPERM";
  }
}
