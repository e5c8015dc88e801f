// The permutation engine (src/permute/nullEngine.ts) when the per-chunk callback fails — as a
// checkpoint write does on a full disk: the run must reject with that error, with one thread or
// several, and not hang or escape as an uncaught exception. (Common practice; no published source.)
// Worker threads need the compiled worker in dist/ (npx tsc -p tsconfig.build.json).
import seedrandom from "seedrandom";
import { afterAll, describe, expect, it } from "vitest";
import { runNullEngine } from "../../../src/permute/nullEngine.js";
import { fitAll, observeContrast } from "../../../src/run/analyzeContrasts.js";
import { setupNull } from "../../../src/run/permutationInference.js";
import { prepareAnalysis } from "../../../src/run/prepareAnalysis.js";
import { normalDraw, scratchFolder, writeDesign, writeTinyCohort } from "./cohortFiles.js";

const scratch = scratchFolder("engine-failures");
afterAll(() => scratch.remove());

function nullContext() {
  const random = seedrandom("engine-failures");
  const groups = Array.from({ length: 12 }, (_, s) => (s % 2 ? "patient" : "control"));
  writeTinyCohort(scratch.dir, {
    columns: ["group"],
    rows: groups.map((g, s) => [`sub-${s + 1}`, g]),
    regionCount: 6,
    edges: groups.map(() => Float64Array.from({ length: 15 }, () => normalDraw(random))),
  });
  const prepared = prepareAnalysis(
    writeDesign(scratch.dir, "design.yaml", "model: group\ncontrasts:\n  effect: group[patient] - group[control]\ninference:\n  threshold: 1\n  permutations: 600\n"),
  );
  const observed = observeContrast(prepared, fitAll(prepared), prepared.contrasts[0]);
  return setupNull(prepared, observed).context;
}

/** Rejects after `ms` so that a hang fails the test instead of stalling the run. */
function within<T>(promise: Promise<T>, ms: number): Promise<T> {
  return Promise.race([
    promise,
    new Promise<T>((_, reject) => setTimeout(() => reject(new Error(`no answer within ${ms} ms (the engine hangs)`)), ms)),
  ]);
}

describe("runNullEngine rejects with the error of a failing onChunk", () => {
  const context = nullContext();
  for (const threads of [1, 2]) {
    it(`threads ${threads}`, async () => {
      let calls = 0;
      const run = runNullEngine(context, {
        threads,
        from: 1,
        to: 601,
        chunkSize: 100,
        onChunk: () => {
          calls++;
          throw new Error("ENOSPC: no space left on device (simulated checkpoint write)");
        },
      });
      await expect(within(run, 15_000)).rejects.toThrow("ENOSPC");
      expect(calls).toBeGreaterThanOrEqual(1);
    });
  }
});
