import type { InputRecord } from "../output/provenance.js";
import type { ResultsSummary } from "../output/report/loadResults.js";

/**
 * Whether a subnetwork is about to be tested on the data it was found in.
 * Selecting edges for their effect and then measuring that effect again in
 * the same participants is circular analysis ("double dipping";
 * Kriegeskorte et al. 2009, Nature Neuroscience 12:535): the estimate is
 * biased away from zero and its p-value is not valid. The evidence is the
 * connectome files (by SHA-256) and the participant IDs that the earlier
 * run recorded in its summary.json.
 */
export interface SampleOverlap {
  /** Connectome files (by content) used in both analyses. */
  sharedFiles: number;
  /** Participant IDs used in both analyses. */
  sharedParticipants: number;
  usedThere: number;
  usedHere: number;
}

export function sampleOverlap(summary: ResultsSummary, hereInputs: InputRecord[], hereIds: string[]): SampleOverlap {
  const thereFiles = new Set(summary.inputs.filter((i) => i.role === "connectome").map((i) => i.sha256));
  const hereFiles = new Set(hereInputs.filter((i) => i.role === "connectome").map((i) => i.sha256));
  let sharedFiles = 0;
  for (const hash of hereFiles) if (thereFiles.has(hash)) sharedFiles++;
  const thereIds = new Set(summary.subjects.used_ids ?? []);
  const sharedParticipants = hereIds.filter((id) => thereIds.has(id)).length;
  return { sharedFiles, sharedParticipants, usedThere: thereIds.size, usedHere: hereIds.length };
}

/** The warning to print, or undefined when the two samples share neither files nor participant IDs. */
export function circularityWarning(overlap: SampleOverlap, source: string): string | undefined {
  const valid =
    "A valid test needs participants the subnetwork was not selected in: an independent sample, " +
    "or cross-validation (find the subnetwork in training folds and test it only in the held-out participants).";
  if (overlap.sharedFiles > 0) {
    return (
      `the subnetwork from ${source} was found in these same data (${overlap.sharedFiles} connectome file(s) identical, ` +
      `${overlap.sharedParticipants} of ${overlap.usedHere} participants also used there). Testing it again on the same participants ` +
      `is circular (double dipping): its effect is inflated and its p-values are not valid. ${valid}`
    );
  }
  if (overlap.sharedParticipants > 0) {
    return (
      `${overlap.sharedParticipants} of the ${overlap.usedHere} participant IDs here were also used to find the subnetwork in ${source} ` +
      `(the connectome files differ). If they are the same people, testing the subnetwork on them is circular (double dipping). ${valid}`
    );
  }
  return undefined;
}
