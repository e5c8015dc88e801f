import { WasmPermutationKernel, groupChunkSize } from "../src/permute/kernels/wasmKernel.js";

/**
 * The two-level screen's kernel alone (groupTableScreenBlock), one core:
 * milliseconds per relabeling for each number of subjects per subset-table
 * chunk, on invented residuals of scenario B's shape (S = 200, E = 79,800,
 * groups of 100, a batch of 512), with bounds that list about 0.3 % of the
 * pairs as a threshold of t = 3 does. The fastest of five runs per chunk size.
 */
export function benchGroupTables(): { chunkSize: number; msPerRelabeling: number; chosen: boolean }[] {
  const S = 200;
  const E = 79_800;
  const G = 100;
  const batch = 512;
  // Deterministic values: a linear congruential sequence (no global randomness).
  let state = 2024;
  const next = (): number => {
    state = (state * 1103515245 + 12345) % 2147483648;
    return state / 2147483648;
  };
  const residuals = Float64Array.from({ length: S * E }, () => next() - 0.5);
  const data = { subjects: S, edges: E, residuals, sumSquares: new Float64Array(E).fill(1), valid: new Uint8Array(E).fill(1), effectNorm2: 50, df: S - 2 };
  const kernel = WasmPermutationKernel.create();
  if (!kernel) throw new Error("no WebAssembly SIMD in this Node");
  // A group sum of 100 uniform(−½, ½) values has standard deviation √(100/12) ≈ 2.89; ±3 of those lists ~0.3 %.
  const bound = 3 * Math.sqrt(G / 12);
  const screen = kernel.prepareGroupScreen(data, batch, G, { sLo: new Float32Array(E).fill(-bound), sHi: new Float32Array(E).fill(bound) }, 4096);
  if (!screen) throw new Error("WebAssembly memory refused");
  for (let b = 0; b < batch; b++) {
    const subjects = Array.from({ length: S }, (_, s) => s);
    for (let i = S - 1; i > 0; i--) {
      const j = Math.floor(next() * (i + 1));
      [subjects[i], subjects[j]] = [subjects[j], subjects[i]];
    }
    screen.members.set(subjects.slice(0, G).sort((x, y) => x - y), b * G);
  }
  const chosen = groupChunkSize(S, batch);
  const out: { chunkSize: number; msPerRelabeling: number; chosen: boolean }[] = [];
  for (let chunkSize = 2; chunkSize <= 8; chunkSize++) {
    let best = Infinity;
    for (let run = 0; run < 5; run++) {
      const start = performance.now();
      screen.run(batch, chunkSize);
      best = Math.min(best, performance.now() - start);
    }
    out.push({ chunkSize, msPerRelabeling: best / batch, chosen: chunkSize === chosen });
  }
  return out;
}
