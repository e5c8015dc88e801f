import { linkSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { InputError } from "../errors.js";

/** What a lock file says about its holder. */
interface LockHolder {
  tool: string;
  pid: number;
  host: string;
  started: string;
}

/**
 * The lock on an output: a file `.NAME.plexus-lock` beside the output folder
 * (or file), created atomically (a complete file hard-linked into place, which
 * fails if one exists), naming the process that holds it. A second process
 * is refused with the holder's pid, host and start time. A lock whose holder
 * ran on this host and no longer exists is stale: it is taken over, with a
 * warning. The checkpoint beside the output is covered by the same lock.
 */
export class OutputLock {
  private released = false;

  private constructor(readonly file: string) {}

  static fileFor(output: string): string {
    const resolved = path.resolve(output);
    return path.join(path.dirname(resolved), `.${path.basename(resolved)}.plexus-lock`);
  }

  /** Takes the lock of `output` (whose parent folder must exist). */
  static acquire(output: string, warn: (text: string) => void = () => {}): OutputLock {
    const file = OutputLock.fileFor(output);
    const holder: LockHolder = { tool: "plexus", pid: process.pid, host: os.hostname(), started: new Date().toISOString() };
    const temporary = `${file}.${process.pid}-${Date.now().toString(36)}`;
    const cannotLock = (error: unknown) =>
      new InputError(`cannot create the lock file ${file} (${(error as NodeJS.ErrnoException).code ?? (error as Error).message})`, { file: output }, "the folder holding the output must be writable");
    try {
      writeFileSync(temporary, `${JSON.stringify(holder)}\n`);
    } catch (error) {
      throw cannotLock(error);
    }
    try {
      for (let attempt = 0; ; attempt++) {
        try {
          linkSync(temporary, file);
          return new OutputLock(file);
        } catch (error) {
          if ((error as NodeJS.ErrnoException).code !== "EEXIST") throw cannotLock(error);
        }
        const held = readHolder(file);
        if (attempt === 0 && held && held.host === os.hostname() && !processAlive(held.pid)) {
          rmSync(file, { force: true });
          warn(`took over the lock of ${output} left by process ${held.pid} (started ${held.started}), which no longer runs`);
          continue;
        }
        throw new InputError(
          held
            ? `another plexus process is writing this output: process ${held.pid} on ${held.host}, started ${held.started}`
            : "another plexus process is writing this output (its lock file cannot be read)",
          { file: output },
          `wait for it to finish; if it no longer runs, delete ${file}`,
        );
      }
    } finally {
      rmSync(temporary, { force: true });
    }
  }

  release(): void {
    if (this.released) return;
    this.released = true;
    rmSync(this.file, { force: true });
  }
}

function readHolder(file: string): LockHolder | undefined {
  try {
    const holder = JSON.parse(readFileSync(file, "utf8")) as LockHolder;
    return Number.isInteger(holder.pid) && typeof holder.host === "string" ? holder : undefined;
  } catch {
    return undefined;
  }
}

/** True when a process with this id exists (on this host). */
export function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === "EPERM";
  }
}
