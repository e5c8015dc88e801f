import { createHash } from "node:crypto";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import type { InputRecord } from "../output/provenance.js";
import { nullOptions } from "../output/summaryParts.js";
import { VERSION } from "../version.js";

/**
 * The fingerprint that ties a checkpoint or a shard to its run: the tool
 * version, the inputs' hashes and every option that changes the null.
 */
export function runFingerprint(prepared: PreparedAnalysis, inputs: InputRecord[]): string {
  const { inference } = prepared.design;
  const payload = {
    version: VERSION,
    inputs: inputs.map((i) => [i.role, i.sha256]),
    model: prepared.matrix.columns.map((c) => c.name),
    contrasts: prepared.contrasts.map((c) => [c.name, c.rows.map((r) => [...r])]),
    transform: prepared.design.transform,
    // The coverage rules and scaling change the data the null is drawn from (absent when not set, so older fingerprints stay).
    ...(prepared.design.scale !== "none" ? { scale: prepared.design.scale } : {}),
    ...(prepared.design.edges ? { edges: [prepared.design.edges.missing, prepared.design.edges.presentIn ?? null] } : {}),
    symmetrize: prepared.design.symmetrize,
    inference: nullOptions(inference),
  };
  return createHash("sha256").update(JSON.stringify(payload)).digest("hex");
}
