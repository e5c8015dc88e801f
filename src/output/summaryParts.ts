import path from "node:path";
import type { PreparedAnalysis } from "../run/prepareAnalysis.js";
import type { InputRecord } from "./provenance.js";

/** summary.json's `inputs`: every input with its role and SHA-256, paths relative to the design file's folder. */
export function inputsSummary(inputs: InputRecord[], designFile: string): { role: string; path: string; sha256: string }[] {
  const designDir = path.dirname(path.resolve(designFile));
  return inputs.map((input) => ({
    role: input.role,
    path: path.relative(designDir, input.path) || path.basename(input.path),
    sha256: input.sha256,
  }));
}

/** summary.json's `subjects`: those in the table, those used, and those left out with line and reason. */
export function subjectsSummary(prepared: PreparedAnalysis): Record<string, unknown> {
  return {
    in_table: prepared.participants.ids.length,
    used: prepared.kept.length,
    used_ids: prepared.kept.map((k) => k.id),
    excluded: prepared.excluded.map((x) => ({ participant_id: x.id, line: x.line, reason: x.reason })),
  };
}
