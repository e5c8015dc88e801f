import { FAMILY_NULL_FILE } from "./nullTable.js";
import { SHARD_MANIFEST } from "./shardManifest.js";
import { WRITTEN_RECORD } from "./writtenRecord.js";

/**
 * Every name plexus writes at the top level of a folder beside the contrast
 * folders: `run` and `merge` (output/writeResults.ts), the report
 * (report/writeReport.ts), a shard (shard.json) and `strength`
 * (strength/runStrength.ts), plus the record of written files. A contrast
 * named like one of these would mix its folder with them, so the design is
 * refused (compared without letter case, for case-insensitive file systems).
 * test/cli/outputNames.test.ts checks this list against what the writers write.
 */
export const RESERVED_TOP_LEVEL_NAMES: readonly string[] = [
  "subjects.tsv",
  "regions.tsv",
  "summary.json",
  "report.html",
  "methods.md",
  "tables.md",
  "tables.tex",
  "tables.docx",
  "tables",
  "figures",
  SHARD_MANIFEST,
  "strength_values.tsv",
  "results.md",
  FAMILY_NULL_FILE,
  WRITTEN_RECORD,
];

/** Names no Windows file system accepts for a file or folder, whatever the extension. */
const DEVICE_NAMES = /^(con|prn|aux|nul|com[0-9]|lpt[0-9])(\..*)?$/i;

/**
 * Why `name` cannot be the folder of a contrast, or undefined when it can:
 * names plexus writes itself, and names that are not a folder name on every
 * common file system. (Separators, control characters, `.`, `..`, a leading
 * dot and names that differ only in letter case are refused by the design
 * reader.)
 */
export function contrastFolderProblem(name: string): string | undefined {
  const lower = name.toLowerCase();
  if (RESERVED_TOP_LEVEL_NAMES.includes(lower)) return `plexus writes '${lower}' into the results folder itself`;
  if (DEVICE_NAMES.test(name)) return "Windows reserves this name for a device";
  if (/[. ]$/.test(name)) return "a folder name ending in '.' is not kept as written on Windows";
  return undefined;
}
