import { renameSync, rmSync, writeFileSync } from "node:fs";

/** A file to write, and the temporary sibling it is first written to (by default `<file>.tmp-<pid>`). */
export interface AtomicFile {
  file: string;
  content: string | Uint8Array;
  temporary?: string;
}

/**
 * Writes files so that each is seen either as it was or whole: every content
 * goes to its temporary sibling first, and only then is each renamed onto
 * its target (a rename is atomic on one file system). When a write or a
 * rename fails, the temporaries still there are removed and the error is
 * thrown on.
 */
export function writeFilesAtomically(files: readonly AtomicFile[]): void {
  const temporaries = files.map((f) => f.temporary ?? `${f.file}.tmp-${process.pid}`);
  try {
    files.forEach((f, k) => writeFileSync(temporaries[k], f.content));
    files.forEach((f, k) => renameSync(temporaries[k], f.file));
  } catch (error) {
    for (const temporary of temporaries) rmSync(temporary, { force: true });
    throw error;
  }
}

/** One file, written to `<file>.tmp-<pid>` and renamed into place. */
export function writeAtomically(file: string, content: string | Uint8Array): void {
  writeFilesAtomically([{ file, content }]);
}
