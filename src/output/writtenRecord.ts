import { sha256Text } from "../common/sha256.js";
import { existsSync, lstatSync, readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { VERSION } from "../version.js";

/**
 * plexus-files.json: the record, written last into every folder plexus
 * writes, of each file it wrote there and that file's SHA-256 (FIPS 180-4).
 * `--force` replaces a folder only when this record names plexus and the
 * folder holds nothing else and nothing changed; `plexus report` keeps it up
 * to date.
 */
export const WRITTEN_RECORD = "plexus-files.json";

/** Temporary folders `plexus report` makes inside a results folder (its own, left by an interrupted report). */
export const REPORT_STAGING_PREFIX = ".plexus-tmp-report-";

export interface WrittenRecord {
  tool: { name: string; version: string };
  /** Relative path ('/'-separated) → SHA-256 of the bytes written. */
  files: Record<string, string>;
}

export function recordText(files: Map<string, string>): string {
  const sorted = [...files.keys()].sort();
  const record: WrittenRecord = { tool: { name: "plexus", version: VERSION }, files: Object.fromEntries(sorted.map((f) => [f, files.get(f)!])) };
  return `${JSON.stringify(record, null, 2)}\n`;
}

/** The record of a folder, or undefined when it has none or one that does not name plexus. */
export function readRecord(folder: string): Map<string, string> | undefined {
  const file = path.join(folder, WRITTEN_RECORD);
  if (!existsSync(file)) return undefined;
  try {
    const record = JSON.parse(readFileSync(file, "utf8")) as WrittenRecord;
    if (record?.tool?.name !== "plexus" || typeof record.files !== "object" || record.files === null) return undefined;
    const files = new Map<string, string>();
    for (const [name, hash] of Object.entries(record.files)) if (typeof hash === "string") files.set(name, hash);
    return files;
  } catch {
    return undefined;
  }
}

/** What a folder holds beyond the files its record names, unchanged. */
export interface ForeignContents {
  /** Files, links and other entries plexus did not write (relative paths). */
  unknown: string[];
  /** Recorded files whose bytes changed since plexus wrote them. */
  changed: string[];
}

/**
 * Compares a folder with its record: every entry must be a recorded file with
 * its recorded bytes, a folder of such files (or an empty one), the record
 * itself, or a temporary folder of an interrupted report. Links are never
 * followed.
 */
export function foreignContents(folder: string, record: Map<string, string>): ForeignContents {
  const result: ForeignContents = { unknown: [], changed: [] };
  const walk = (relative: string) => {
    for (const name of readdirSync(path.join(folder, relative)).sort()) {
      const inner = relative === "" ? name : `${relative}/${name}`;
      if (relative === "" && (name === WRITTEN_RECORD || name.startsWith(REPORT_STAGING_PREFIX))) continue;
      const full = path.join(folder, inner);
      const stat = lstatSync(full);
      if (stat.isDirectory()) walk(inner);
      else if (!stat.isFile() || !record.has(inner)) result.unknown.push(inner);
      else if (sha256Text(readFileSync(full)) !== record.get(inner)) result.changed.push(inner);
    }
  };
  walk("");
  return result;
}

/** "3 files plexus did not write (e.g. thesis.docx)" and the like, for messages. */
export function describeForeign(foreign: ForeignContents): string {
  const parts: string[] = [];
  const count = (n: number, one: string, many: string) => (n === 1 ? one : many.replace("#", String(n)));
  if (foreign.unknown.length > 0) {
    parts.push(`${count(foreign.unknown.length, "a file", "# files")} plexus did not write (e.g. ${foreign.unknown[0]})`);
  }
  if (foreign.changed.length > 0) {
    parts.push(`${count(foreign.changed.length, "a file", "# files")} changed since plexus wrote ${foreign.changed.length === 1 ? "it" : "them"} (e.g. ${foreign.changed[0]})`);
  }
  return parts.join(" and ");
}
