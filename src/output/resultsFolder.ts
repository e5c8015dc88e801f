import { existsSync, lstatSync, mkdirSync, readdirSync, renameSync, rmSync, statSync, writeFileSync } from "node:fs";
import path from "node:path";
import { InputError, isInputError } from "../errors.js";
import { refuseInputOverlap, type GuardedInputs } from "./inputOverlap.js";
import { onInterrupt } from "./interruptCleanup.js";
import { OutputLock, processAlive } from "./outputLock.js";
import { sha256Text } from "../common/sha256.js";
import { describeForeign, foreignContents, readRecord, recordText, WRITTEN_RECORD } from "./writtenRecord.js";

export interface OpenOptions {
  force: boolean;
  /** What the command reads: the folder may not be, hold or lie inside any of it. */
  inputs?: GuardedInputs;
  /** Where a warning goes (a stale lock taken over). */
  warn?: (text: string) => void;
}

/**
 * A results folder written all at once: files go into a temporary sibling
 * folder and only a complete set is renamed into place, so a failure at any
 * point (including a full disk) leaves any earlier results exactly as they were.
 * The folder's lock is held from `open` to `commit` or `abandon`; Ctrl-C or
 * SIGTERM in between removes the temporary folder and the lock.
 */
export class ResultsFolder {
  private finished = false;
  private readonly written = new Map<string, string>();

  private constructor(
    readonly target: string,
    readonly staging: string,
    private readonly lock: OutputLock,
    private readonly forget: () => void,
  ) {}

  /**
   * Checks the target before anything is computed: not an input and not among
   * them; locked by no other process; absent, empty, or (with `force`) a
   * folder plexus wrote that holds nothing else. Then takes the lock and
   * creates the staging folder.
   */
  static open(target: string, options: OpenOptions): ResultsFolder {
    const resolved = path.resolve(target);
    if (options.inputs) refuseInputOverlap(target, options.inputs);
    const parent = path.dirname(resolved);
    try {
      mkdirSync(parent, { recursive: true });
    } catch (error) {
      throw new InputError(`cannot create the folder ${parent}: ${(error as Error).message}`, { file: target });
    }
    const lock = OutputLock.acquire(resolved, options.warn);
    try {
      refuseUnreplaceable(target, resolved, options.force);
      removeAbandonedStaging(parent, path.basename(resolved));
      const staging = path.join(parent, `.${path.basename(resolved)}.plexus-tmp-${process.pid}-${Date.now().toString(36)}`);
      mkdirSync(staging, { recursive: true });
      const forget = onInterrupt(() => {
        rmSync(staging, { recursive: true, force: true });
        lock.release();
        return `nothing was written to ${target}`;
      });
      return new ResultsFolder(resolved, staging, lock, forget);
    } catch (error) {
      lock.release();
      throw error;
    }
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
    this.written.set(path.relative(this.staging, full).split(path.sep).join("/"), sha256Text(content));
  }

  /**
   * Runs `work` (which reads back what was just written, e.g. the report),
   * naming in any input error the results folder the user asked for instead
   * of the temporary staging folder.
   */
  readingBack<T>(work: () => T): T {
    const located = (error: unknown): unknown => {
      const file = isInputError(error) ? error.location.file : undefined;
      if (!isInputError(error) || file === undefined || !(file === this.staging || file.startsWith(this.staging + path.sep))) return error;
      return new InputError(
        `${error.message} (while reading back the results being written; nothing was written)`,
        { ...error.location, file: this.target + file.slice(this.staging.length) },
        error.hint,
      );
    };
    let result: T;
    try {
      result = work();
    } catch (error) {
      throw located(error);
    }
    // An asynchronous reader (the report, whose Word writer is asynchronous): the same, when its promise fails.
    if (result instanceof Promise) {
      return result.catch((error: unknown) => {
        throw located(error);
      }) as T;
    }
    return result;
  }

  /** Writes the record of the files written, then moves the complete results into place, replacing an earlier folder only now. */
  commit(): void {
    if (this.finished) return;
    this.write(WRITTEN_RECORD, recordText(this.written));
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
    this.finish();
  }

  /** Removes the staging folder after a failure; the target is untouched. */
  abandon(): void {
    if (this.finished) return;
    rmSync(this.staging, { recursive: true, force: true });
    this.finish();
  }

  private finish(): void {
    this.finished = true;
    this.forget();
    this.lock.release();
  }
}

/**
 * The rule for an existing target: an empty folder is used as it is; any
 * other folder only with `force`, and only when plexus wrote it (its record
 * names plexus) and it holds nothing else, unchanged.
 */
function refuseUnreplaceable(target: string, resolved: string, force: boolean): void {
  if (!existsSync(resolved) && !isLink(resolved)) return;
  let entries: string[];
  try {
    if (!statSync(resolved).isDirectory()) throw new Error("not a folder");
    entries = readdirSync(resolved);
  } catch {
    throw new InputError("the output path exists and is not a folder", { file: target }, "choose a folder name; plexus never replaces a file with a folder");
  }
  if (entries.length === 0) return;
  if (!force) {
    throw new InputError(
      "the output folder exists and is not empty",
      { file: target },
      "choose another folder, or add --force to replace it (only a folder plexus wrote can be replaced)",
    );
  }
  const record = readRecord(resolved);
  if (!record) {
    throw new InputError(
      `--force replaces only a folder plexus wrote, and this one has no ${WRITTEN_RECORD} (it holds ${entries.length} entr${entries.length === 1 ? "y" : "ies"}, e.g. ${entries.sort()[0]})`,
      { file: target },
      "choose another folder, or move its contents away yourself",
    );
  }
  const foreign = foreignContents(resolved, record);
  if (foreign.unknown.length > 0 || foreign.changed.length > 0) {
    throw new InputError(
      `--force replaces only a folder plexus wrote that holds nothing else, and this one holds ${describeForeign(foreign)}`,
      { file: target },
      "move those files out of the folder (or choose another folder), then run again",
    );
  }
}

function isLink(file: string): boolean {
  try {
    return lstatSync(file).isSymbolicLink();
  } catch {
    return false;
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
