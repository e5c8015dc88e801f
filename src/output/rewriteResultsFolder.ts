import { existsSync, mkdirSync, mkdtempSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from "node:fs";
import path from "node:path";
import { InputError } from "../errors.js";
import { systemReason } from "../io/readInputFile.js";
import { onInterrupt } from "./interruptCleanup.js";
import { OutputLock } from "./outputLock.js";
import { sha256Text } from "../common/sha256.js";
import { readRecord, recordText, REPORT_STAGING_PREFIX, WRITTEN_RECORD } from "./writtenRecord.js";

/**
 * Rewrites files of an existing results folder (`plexus report DIR`): under
 * the folder's lock, `produce` makes the files (relative path → text); each
 * may replace only a file the folder's record names, unchanged. Every file is
 * first written into a temporary folder inside DIR; only when all are written
 * are they renamed into place, and the record (updated with the new files)
 * last, so a failure leaves the earlier files as they were.
 */
export async function rewriteResultsFolder(
  dir: string,
  produce: () => Map<string, string | Uint8Array> | Promise<Map<string, string | Uint8Array>>,
  warn: (text: string) => void = () => {},
): Promise<Map<string, string | Uint8Array>> {
  const root = path.resolve(dir);
  if (!existsSync(root) || !statSync(root).isDirectory()) return produce();
  const lock = OutputLock.acquire(root, warn);
  let staging: string | undefined;
  const forget = onInterrupt(() => {
    if (staging) rmSync(staging, { recursive: true, force: true });
    lock.release();
    return `the files of ${dir} are as they were`;
  });
  try {
    const files = await produce();
    const record = readRecord(root);
    if (!record) {
      throw new InputError(
        `plexus rewrites only a results folder it wrote, and this one has no ${WRITTEN_RECORD}`,
        { file: dir },
        "run the analysis again into a new folder (plexus run --out)",
      );
    }
    const refused = [...files.keys()].filter((relative) => {
      const target = path.join(root, relative);
      return existsSync(target) && (record.get(relative) === undefined || sha256Text(readFileSyncSafe(target)) !== record.get(relative));
    });
    if (refused.length > 0) {
      throw new InputError(
        `${refused.length === 1 ? "a file" : `${refused.length} files`} in the report's place ${refused.length === 1 ? "was" : "were"} not written by plexus or changed since (e.g. ${refused[0]})`,
        { file: dir },
        "move them out of the folder to keep them, then run plexus report again",
      );
    }
    try {
      staging = mkdtempSync(path.join(root, `${REPORT_STAGING_PREFIX}${process.pid}-`));
    } catch (error) {
      throw new InputError(`cannot write into the results folder: ${systemReason(error)}`, { file: dir });
    }
    const inside = (base: string, relative: string) => {
      const full = path.resolve(base, relative);
      if (!full.startsWith(base + path.sep)) throw new Error(`refusing to write outside the results folder: ${relative}`);
      return full;
    };
    for (const [relative, text] of files) {
      const full = inside(staging, relative);
      mkdirSync(path.dirname(full), { recursive: true });
      writeFileSync(full, text);
      record.set(relative, sha256Text(text));
    }
    writeFileSync(path.join(staging, WRITTEN_RECORD), recordText(record));
    for (const relative of files.keys()) {
      const target = inside(root, relative);
      mkdirSync(path.dirname(target), { recursive: true });
      renameSync(inside(staging, relative), target);
    }
    renameSync(path.join(staging, WRITTEN_RECORD), path.join(root, WRITTEN_RECORD));
    return files;
  } finally {
    if (staging) rmSync(staging, { recursive: true, force: true });
    forget();
    lock.release();
  }
}

function readFileSyncSafe(file: string): Buffer {
  try {
    return readFileSync(file);
  } catch {
    return Buffer.alloc(0);
  }
}
