import seedrandom from "seedrandom";
import { edgePairs } from "../edges/edgeIndex.js";
import { fitEdges } from "../edges/fitEdges.js";
import type { PreparedAnalysis } from "../output/preparedAnalysis.js";
import { buildNullContext, sharedFloat64 } from "../permute/nullContext.js";
import { computeNullRange } from "../permute/nullRange.js";
import { observeContrastOn } from "./analyzeContrasts.js";
import { engineChunkSize, needsPermutations, shardRange } from "./permutationInference.js";
import { DEFAULT_CHUNK_SIZE } from "./runAnalysis.js";
import { quantizedResident, screenMemory } from "../permute/kernels/wasmKernel.js";

/**
 * How long a run will take on this machine, from a short calibration: the
 * design's own model, contrasts and inference on invented data of the same
 * participants and a slice of the edges (about CALIBRATION_BYTES of data),
 * timed through the same fit, residualisation and permutation kernels the run
 * uses, then scaled to all edges, every relabeling and the threads. The
 * per-relabeling cost of the kernels is linear in the edges (bench/README.md,
 * the scaling table), so the slice predicts the whole.
 */
export interface RunEstimate {
  /** The fit, the observed statistics and the residualisation of every contrast. */
  fitSeconds: number;
  /** Starting the worker threads, writing the results folder, its figures and the report (a fixed allowance). */
  writeSeconds: number;
  /** Each permutation contrast: relabelings, seconds per relabeling on one thread, and the contrast's wall time. */
  contrasts: { name: string; relabelings: number; secondsPerRelabeling: number; seconds: number }[];
  threads: number;
  totalSeconds: number;
}

/**
 * Bytes of invented edge data in the larger calibration slice: well beyond the processor's caches, so the
 * kernels stream from memory as they do on a large cohort (a slice held in cache ran 3 times faster than the
 * run it was to predict, for 10,000 participants).
 */
const CALIBRATION_BYTES = 192e6;
/**
 * What every run adds whatever its size: worker threads started, the results folder, its print figures (PNG
 * at 300 dpi, drawn on the thread pool) and the report written. About 1.3–2 s for the demo cohort and for
 * 135 participants at 90 regions on the project's 2-core machine (a shard writes no report: under a second).
 */
const WRITE_SECONDS = 2;
const WRITE_SHARD_SECONDS = 0.5;
/** Relabelings timed per contrast: two of the kernels' batches. */
const CALIBRATION_RELABELINGS = 128;
/**
 * When a whole chunk of the run would take at most this long on the slice, a whole chunk is timed instead:
 * each chunk prepares its screen once (bounds, tables) and the two-level path's subset tables serve a
 * batch of up to 512 relabelings, so 128 relabelings alone overstate the time of a small cohort's
 * relabeling about twofold (200 participants, `model: group`).
 */
const CHUNK_CALIBRATION_SECONDS = 2;

export function estimateRun(prepared: PreparedAnalysis, options: { threads: number; shard?: { index: number; count: number } }): RunEstimate {
  const S = prepared.matrix.rows;
  const E = prepared.connectomes.edgeCount;
  // Two slices, the second about twice the first: each cost is a + b·edges (a: per relabeling, building its
  // vectors; b: the products), so the two times give both parts and the whole cohort's time.
  const small = timeSlice(prepared, calibrationRegions(S, E, CALIBRATION_BYTES / 2));
  const large = timeSlice(prepared, calibrationRegions(S, E, CALIBRATION_BYTES));
  const extrapolate = (t1: number, t2: number): number => {
    if (large.edges === small.edges) return t2 * (E / large.edges);
    const perEdge = Math.max(0, (t2 - t1) / (large.edges - small.edges));
    return Math.max(0, t2 - perEdge * large.edges) + perEdge * E;
  };
  const contrasts: RunEstimate["contrasts"] = large.contrasts.map((c, k) => {
    const { from, to } = shardRange(c.count, options.shard);
    const relabelings = to - from;
    const secondsPerRelabeling = extrapolate(small.contrasts[k].secondsPerRelabeling, c.secondsPerRelabeling);
    const chunk = engineChunkSize(relabelings, { threads: options.threads, chunkSize: DEFAULT_CHUNK_SIZE, shard: options.shard });
    // Threads take chunks as they finish: the run lasts as many rounds of chunks as the threads need.
    const rounds = Math.ceil(Math.ceil(relabelings / chunk) / Math.max(1, options.threads));
    return { name: c.name, relabelings, secondsPerRelabeling, seconds: Math.min(relabelings, rounds * chunk) * secondsPerRelabeling };
  });
  const fitSeconds = extrapolate(small.fitSeconds, large.fitSeconds);
  const writeSeconds = options.shard ? WRITE_SHARD_SECONDS : WRITE_SECONDS;
  const totalSeconds = fitSeconds + writeSeconds + contrasts.reduce((sum, c) => sum + c.seconds, 0);
  return { fitSeconds, writeSeconds, contrasts, threads: options.threads, totalSeconds };
}

interface SliceTimes {
  edges: number;
  fitSeconds: number;
  contrasts: { name: string; count: number; secondsPerRelabeling: number }[];
}

/** The fit, observation, residualisation and a batch of relabelings of every contrast, timed on invented data of `regions` regions. */
function timeSlice(prepared: PreparedAnalysis, regions: number): SliceTimes {
  const { matrix } = prepared;
  const S = matrix.rows;
  const pairs = edgePairs(regions);
  const edges = pairs.edgeCount;
  const data = sharedFloat64(S * edges);
  const fill = (): void => {
    const random = seedrandom("plexus-calibration");
    for (let k = 0; k < data.length; k++) data[k] = random() - 0.5;
  };
  fill();
  let fitSeconds = 0;
  let start = performance.now();
  const fit = fitEdges(matrix.values, S, matrix.cols, data, edges);
  fitSeconds += (performance.now() - start) / 1000;
  const contrasts: SliceTimes["contrasts"] = [];
  for (const contrast of prepared.contrasts) {
    start = performance.now();
    const observed = observeContrastOn(fit, contrast, pairs, prepared.design.inference);
    fitSeconds += (performance.now() - start) / 1000;
    if (!needsPermutations(prepared)) continue;
    if (contrasts.length > 0) fill(); // the previous contrast's residuals overwrote the data
    start = performance.now();
    const setup = buildNullContext({
      matrix,
      contrast: contrast.vector,
      contrastRows: contrast.kind === "F" ? contrast.rows : undefined,
      data,
      inPlace: true,
      edges,
      pairs,
      observed: observed.statistics.statistic,
      inference: prepared.design.inference,
      blocks: prepared.blocks?.codes,
      where: { file: prepared.design.file },
    });
    fitSeconds += (performance.now() - start) / 1000;
    const count = setup.context.plan.count;
    // The run keeps integer residuals resident only up to a size (wasmKernel.ts); beyond it each batch
    // converts them block by block, and so must the calibration.
    const resident = screenMemory.residentBytes;
    if (!quantizedResident(S, prepared.connectomes.edgeCount)) screenMemory.residentBytes = 0;
    const timeRelabelings = (n: number): number => {
      const begin = performance.now();
      computeNullRange(setup.context, 2, 2 + n);
      return (performance.now() - begin) / 1000 / n;
    };
    try {
      const timed = Math.min(CALIBRATION_RELABELINGS, Math.max(1, count - 1));
      let secondsPerRelabeling = timeRelabelings(timed);
      const chunk = Math.min(engineChunkSize(count, { threads: 1, chunkSize: DEFAULT_CHUNK_SIZE }), Math.max(1, count - 1));
      if (chunk > timed && secondsPerRelabeling * chunk <= CHUNK_CALIBRATION_SECONDS) secondsPerRelabeling = timeRelabelings(chunk);
      contrasts.push({ name: contrast.name, count, secondsPerRelabeling });
    } finally {
      screenMemory.residentBytes = resident;
    }
  }
  return { edges, fitSeconds, contrasts };
}

/** The regions of a calibration slice: about `bytes` of data, at least 12 regions, never more edges than the cohort's. */
function calibrationRegions(subjects: number, edges: number, bytes: number): number {
  const wanted = Math.min(edges, Math.max(66, Math.floor(bytes / (8 * subjects))));
  let n = 2;
  while ((n * (n - 1)) / 2 < wanted) n++;
  return n;
}

/** "40 s", "12 min", "2.5 h". */
export function formatDuration(seconds: number): string {
  if (seconds < 1) return "under 1 s";
  if (seconds < 90) return `${Math.round(seconds)} s`;
  if (seconds < 5400) return `${Math.round(seconds / 60)} min`;
  return `${(seconds / 3600).toFixed(1)} h`;
}
