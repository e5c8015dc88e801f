import { InputError } from "../errors.js";
import { isWithin, realPath } from "./realPath.js";

/** What a command reads, for the check that its output cannot overwrite or sit among it. */
export interface GuardedInputs {
  /** Files read: the design, the tables, every matrix file (or the .npy stack), an edge list. */
  files: string[];
  /**
   * Folders read as a whole or holding per-participant matrices: the output
   * may be neither one of them, nor inside one, nor around one.
   */
  folders: string[];
}

/**
 * Refuses an output path that is an input, holds an input at any depth, or
 * lies inside an input folder (a folder of per-participant matrices, a shard
 * folder, a results folder read). Paths are compared after resolving symbolic
 * links, so a link cannot hide an input. Nothing is read or written.
 */
export function refuseInputOverlap(out: string, inputs: GuardedInputs, option = "--out"): void {
  const target = realPath(out);
  const problems: string[] = [];
  const contained: string[] = [];
  const containedFolders: string[] = [];
  for (const file of inputs.files) {
    const real = realPath(file);
    if (real === target) problems.push(`is an input of this analysis (${file})`);
    else if (isWithin(real, target)) contained.push(file);
  }
  for (const folder of inputs.folders) {
    const real = realPath(folder);
    if (real === target) problems.push(`is an input folder of this analysis (${folder})`);
    else if (isWithin(target, real)) problems.push(`lies inside an input folder (${folder})`);
    else if (isWithin(real, target)) containedFolders.push(folder);
  }
  const files = [...new Set(contained)];
  const folders = [...new Set(containedFolders)];
  if (files.length > 0 || folders.length > 0) {
    const counted = [
      ...(files.length > 0 ? [files.length === 1 ? "an input file" : `${files.length} input files`] : []),
      ...(folders.length > 0 ? [folders.length === 1 ? "an input folder" : `${folders.length} input folders`] : []),
    ];
    problems.push(`contains ${counted.join(" and ")} of this analysis (e.g. ${files[0] ?? folders[0]})`);
  }
  if (problems.length === 0) return;
  throw new InputError(
    `the output ${out} ${problems[0]}; plexus never writes over or among its inputs, with or without --force`,
    { key: option },
    "choose a path that is not an input, holds none and is not inside a folder of inputs (e.g. results/ beside the design file)",
  );
}
