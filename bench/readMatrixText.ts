import { Buffer } from "node:buffer";
import { parseMatrixBytes, type ParsedMatrixText } from "../src/io/matrixText.js";

/**
 * Text-matrix reading rate on a 400 × 400 matrix of full-precision values
 * (target ≥ 100 MB/s): the parse the loader runs, of a file's bytes as
 * TextFileReader.readBytes gives them, into the arrays of the previous matrix.
 */
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
  const bytes = Buffer.from(rows.join("\n") + "\n", "latin1");
  let previous: ParsedMatrixText | undefined;
  let best = Infinity;
  for (let run = 0; run < 12; run++) {
    const start = performance.now();
    previous = parseMatrixBytes(bytes, "bench.tsv", { allowNonFiniteDiagonal: true }, previous);
    best = Math.min(best, performance.now() - start);
  }
  return { megabytesPerSecond: bytes.length / 1e6 / (best / 1000), megabytes: bytes.length / 1e6 };
}
