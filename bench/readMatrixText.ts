import { Buffer } from "node:buffer";
import { parseMatrixText } from "../src/io/matrixText.js";

/** Text-matrix reading rate on a 400 × 400 matrix of full-precision values (target ≥ 100 MB/s). */
export function benchReadMatrixText(): { megabytesPerSecond: number; megabytes: number } {
  // Deterministic values: a linear congruential sequence (no global randomness).
  let state = 12345;
  const next = (): number => {
    state = (state * 1103515245 + 12345) % 2147483648;
    return state / 2147483648 - 0.5;
  };
  const rows: string[] = [];
  for (let i = 0; i < 400; i++) {
    const row: string[] = [];
    for (let j = 0; j < 400; j++) row.push(String(next()));
    rows.push(row.join("\t"));
  }
  // A flat string, as readFileSync returns it (a joined string is a rope in V8).
  const text = Buffer.from(rows.join("\n") + "\n").toString("utf8");
  let best = Infinity;
  for (let run = 0; run < 12; run++) {
    const start = performance.now();
    parseMatrixText(text, "bench.tsv");
    best = Math.min(best, performance.now() - start);
  }
  return { megabytesPerSecond: text.length / 1e6 / (best / 1000), megabytes: text.length / 1e6 };
}
