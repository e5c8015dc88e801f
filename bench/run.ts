import { spawnSync } from "node:child_process";
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { CACHE, ensureContainerStacks, ensureLargeCohort, ensurePopulationCohort, ensureSimulatedCohort, writeBenchDesign } from "./cohorts.js";
import type { Measurement, Request } from "./scenario.js";

/**
 * npm run bench [-- --quick]: the permutation engine's speed against the
 * plain TypeScript kernel and against the BLAS floor (bench/floor.py), each
 * measured in this same run, plus input reading rates and a scaling table.
 * Every measurement runs in a child process (its own peak RSS). Output: a
 * markdown report on stdout, also saved as bench/.cache/last-run.md.
 */
const quick = process.argv.includes("--quick");
/** `--only a,b`: run only these parts (scenarios, population, reading, tables, scaling); all but population (an hour) by default. */
const onlyAt = process.argv.indexOf("--only");
const only = onlyAt >= 0 ? new Set((process.argv[onlyAt + 1] ?? "").split(",")) : undefined;
const runs = (part: string): boolean => (only === undefined ? part !== "population" : only.has(part));
const here = path.dirname(fileURLToPath(import.meta.url));
const scenarioScript = path.join(here, "scenario.js");
const floorScript = path.resolve(here, "../../floor.py");
const threads = Math.min(2, os.availableParallelism());
const log = (line: string): void => void process.stderr.write(`bench: ${line}\n`);

/** The faster of two runs (the scaling table subtracts two times, which doubles the noise of one). */
function fasterOfTwo(request: Request): Measurement {
  const first = child(request);
  const second = child(request);
  return (first.nullSeconds ?? first.seconds) <= (second.nullSeconds ?? second.seconds) ? first : second;
}

function child(request: Request, kernel: "wasm" | "typescript" = "wasm", screen: "on" | "off" = "on"): Measurement {
  const result = spawnSync(process.execPath, [scenarioScript, JSON.stringify(request)], {
    env: { ...process.env, PLEXUS_KERNEL: kernel, PLEXUS_SCREEN: screen },
    encoding: "utf8",
    maxBuffer: 1 << 20,
  });
  if (result.status !== 0) {
    throw new Error(`bench: ${JSON.stringify(request)} failed (exit ${result.status}):\n${result.stderr}`);
  }
  const lines = result.stdout.trim().split("\n");
  return JSON.parse(lines[lines.length - 1]) as Measurement;
}

interface Floor {
  seconds: number;
  cpuSeconds: number;
  gflops: number;
  coreType: string | null;
  blas: string;
  numpy: string;
}

function cpuFlags(): string {
  try {
    return readFileSync("/proc/cpuinfo", "utf8");
  } catch {
    return "";
  }
}

const avx512 = /\bavx512f\b/.test(cpuFlags());

/** The BLAS floor for K·c rows; undefined without python3 + numpy. */
function blasFloor(subjects: number, edges: number, rows: number): Floor | undefined {
  const env = { ...process.env };
  if (avx512) {
    // OpenBLAS does not detect its AVX-512 kernel on every such CPU by itself; pin it for this command only.
    env.OPENBLAS_CORETYPE = "SkylakeX";
    delete env.OPENBLAS_L2_SIZE;
  }
  const result = spawnSync("python3", [floorScript, "--subjects", String(subjects), "--edges", String(edges), "--rows", String(rows)], {
    env,
    encoding: "utf8",
  });
  if (result.error || result.status !== 0) {
    log(`no BLAS floor (python3 with numpy is needed): ${result.error?.message ?? result.stderr.trim().split("\n").pop()}`);
    return undefined;
  }
  return JSON.parse(result.stdout.trim()) as Floor;
}

function machine(): string[] {
  const lscpu = spawnSync("lscpu", [], { encoding: "utf8" }).stdout ?? "";
  const field = (name: string): string => new RegExp(`^${name}:\\s*(.+)$`, "m").exec(lscpu)?.[1]?.trim() ?? "?";
  return [
    `- CPU: ${field("Model name")} (${field("Vendor ID")}, family ${field("CPU family")} model ${field("Model")}), ${field("CPU\\(s\\)")} logical CPUs, ${field("Core\\(s\\) per socket")} cores per socket; L2 ${field("L2 cache")}; AVX-512: ${avx512 ? "yes" : "no"}`,
    `- Memory: ${(os.totalmem() / 2 ** 30).toFixed(1)} GiB; Node ${process.version} (V8 ${process.versions.v8}); ${threads} worker thread(s)`,
    `- Load average at the start: ${os.loadavg().map((x) => x.toFixed(2)).join(", ")} (the machine is shared: compare ratios measured in this run)`,
  ];
}

const fixed = (x: number | undefined, digits = 2): string => (x === undefined || !Number.isFinite(x) ? "–" : x.toFixed(digits));
const flopsOf = (m: Measurement): number => 2 * m.subjects! * m.edges! * m.vectors! * m.permutations!;

interface ScenarioRow {
  name: string;
  fast: Measurement;
  /** The SIMD kernel in double precision throughout (no single-precision screen). */
  unscreened?: Measurement;
  reference?: Measurement;
  floor?: Floor;
}

function scenarioTables(rows: ScenarioRow[]): string[] {
  const speed = [
    "| scenario | S | E | c | K | wall s (inputs read) | permutations: wall s | CPU s | permutations/s | GFLOP/s end to end | GFLOP/s permutations | peak RSS MB |",
    "|---|---|---|---|---|---|---|---|---|---|---|---|",
  ];
  const ratios = [
    "| scenario | TypeScript kernel: permutations wall s (CPU s) | SIMD without the screen: permutations wall s | SIMD ÷ TypeScript speed-up, wall (CPU) | BLAS floor wall s (CPU s), GFLOP/s | end to end ÷ floor | permutations ÷ floor, wall (CPU) | null rows identical to TypeScript kernel (screened, unscreened) |",
    "|---|---|---|---|---|---|---|---|",
  ];
  for (const { name, fast, unscreened, reference, floor } of rows) {
    const flops = flopsOf(fast);
    speed.push(
      `| ${name} | ${fast.subjects} | ${fast.edges} | ${fast.vectors} | ${fast.permutations} | ${fixed(fast.seconds, 1)} | ${fixed(fast.nullSeconds, 1)} | ${fixed(fast.nullCpuSeconds, 1)} | ${fixed(fast.permutations! / fast.nullSeconds!, 0)} | ${fixed(flops / fast.seconds / 1e9, 1)} | ${fixed(flops / fast.nullSeconds! / 1e9, 1)} | ${fixed(fast.peakRssMegabytes, 0)} |`,
    );
    const ts = reference ? `${fixed(reference.nullSeconds, 1)} (${fixed(reference.nullCpuSeconds, 1)})` : "–";
    const speedUp = reference ? `${fixed(reference.nullSeconds! / fast.nullSeconds!, 1)} (${fixed(reference.nullCpuSeconds! / fast.nullCpuSeconds!, 1)})` : "–";
    const floorText = floor ? `${fixed(floor.seconds, 2)} (${fixed(floor.cpuSeconds, 2)}), ${fixed(floor.gflops, 0)}` : "–";
    const overFloor = floor ? `${fixed(fast.nullSeconds! / floor.seconds, 1)} (${fixed(fast.nullCpuSeconds! / floor.cpuSeconds, 1)})` : "–";
    const agree = (m: Measurement | undefined): string => (!reference || !m ? "–" : reference.nullHash === m.nullHash ? "yes" : "**NO**");
    const plain = unscreened ? fixed(unscreened.nullSeconds, 1) : "–";
    ratios.push(
      `| ${name} | ${ts} | ${plain} | ${speedUp} | ${floorText} | ${floor ? fixed(fast.seconds / floor.seconds, 1) : "–"} | ${overFloor} | ${agree(fast)}, ${agree(unscreened)} |`,
    );
  }
  return [...speed, "", ...ratios];
}

async function main(): Promise<void> {
  mkdirSync(CACHE, { recursive: true });
  const report: string[] = [`# plexus benchmark${quick ? " (--quick)" : ""}`, "", ...machine(), ""];
  const kA = quick ? 500 : 5000;
  const kC = quick ? 100 : 1000;

  if (runs("scenarios")) await scenarios(report, kA, kC);
  if (runs("population")) population(report);
  if (runs("reading")) reading(report, kA);
  if (runs("tables")) subsetTables(report);
  if (runs("scaling")) scaling(report);
  report.push("", `Command: \`npm run bench${process.argv.slice(2).length ? ` -- ${process.argv.slice(2).join(" ")}` : ""}\``, "");
  const markdown = report.join("\n");
  process.stdout.write(markdown);
  writeFileSync(path.join(CACHE, only ? `last-run-${[...only].join("-")}.md` : "last-run.md"), markdown);
}

async function scenarios(report: string[], kA: number, kC: number): Promise<void> {
  const text = ensureSimulatedCohort("tsv", log);
  const npy = ensureSimulatedCohort("npy", log);
  const designA = writeBenchDesign(text, `scenario-a-${kA}`, { model: "group + age + sex", permutations: kA, connectomes: "connectomes/{participant_id}.tsv", transform: "fisher-z" });
  const designB = writeBenchDesign(text, `scenario-b-${kA}`, { model: "group", permutations: kA, connectomes: "connectomes/{participant_id}.tsv", transform: "fisher-z" });
  const designANpy = writeBenchDesign(npy, `scenario-a-npy-${kA}`, { model: "group + age + sex", permutations: kA, connectomes: "connectomes.npy", transform: "fisher-z" });
  const designBNpy = writeBenchDesign(npy, `scenario-b-npy-${kA}`, { model: "group", permutations: kA, connectomes: "connectomes.npy", transform: "fisher-z" });

  // Scenarios A and B: end to end (inputs read), the SIMD kernel and the TypeScript kernel, and the BLAS floor.
  const rows: ScenarioRow[] = [];
  for (const [name, design] of [
    ["A: group + age + sex", designA],
    ["B: group", designB],
  ] as const) {
    log(`${name}: SIMD kernel`);
    const fast = child({ kind: "analysis", name: `fast-${name[0]}`, design, threads });
    log(`${name}: SIMD kernel without the screen`);
    const unscreened = child({ kind: "analysis", name: `unscreened-${name[0]}`, design, threads }, "wasm", "off");
    log(`${name}: TypeScript kernel`);
    const reference = child({ kind: "analysis", name: `reference-${name[0]}`, design, threads }, "typescript");
    log(`${name}: BLAS floor`);
    const floor = blasFloor(fast.subjects!, fast.edges!, fast.vectors! * fast.permutations!);
    rows.push({ name, fast, unscreened, reference, floor });
  }

  // Scenarios A and B once more with their input as a .npy stack: the same permutations, no text to parse.
  log("A from the .npy stack: SIMD kernel");
  const aNpy = child({ kind: "analysis", name: "fast-A-npy", design: designANpy, threads });
  log("B from the .npy stack: SIMD kernel");
  const bNpy = child({ kind: "analysis", name: "fast-B-npy", design: designBNpy, threads });
  rows.push({ name: "A: group + age + sex, input from the .npy stack", fast: aNpy, floor: rows[0].floor });
  rows.push({ name: "B: group, input from the .npy stack", fast: bNpy, floor: rows[1].floor });

  // Scenario C: scale and memory. End to end from the .npy stack; where that fails (the
  // reader's limits), the permutation engine alone on invented data of the same shape.
  const large = ensureLargeCohort(log);
  const designC = writeBenchDesign(large, `scenario-c-${kC}`, { model: "group + age + sex", permutations: kC, connectomes: "connectomes.npy" });
  log("C: SIMD kernel");
  const notes: string[] = [];
  let c: Measurement;
  let cName = "C: 1,000 regions, 500 subjects";
  try {
    c = child({ kind: "analysis", name: "fast-C", design: designC, threads });
  } catch (error) {
    const reason = (error instanceof Error ? error.message : String(error)).split("\n").find((line) => /Error:/.test(line)) ?? "failed";
    notes.push(`Scenario C end to end did not complete: ${reason.trim()}. The row shows the permutation engine alone on invented data of the same shape (residuals built in shared memory, no file read).`);
    log("C: end to end failed; timing the permutation engine alone");
    c = child({ kind: "null", subjects: 500, regions: 1000, covariates: true, permutations: kC, threads });
    cName += " (engine only)";
  }
  log("C: BLAS floor");
  rows.push({ name: cName, fast: c, floor: blasFloor(c.subjects!, c.edges!, c.vectors! * c.permutations!) });
  const rawBytes = (c.subjects! * c.edges! * 8) / 1e6;

  report.push("## Scenarios (threads: " + threads + ")", "", ...scenarioTables(rows), "");
  report.push(
    ...notes.map((note) => `${note}\n`),
    `Scenario C: the raw data S·E·8 is ${fixed(rawBytes, 0)} MB; the memory bound 1.5 × raw + 300 MB is ${fixed(1.5 * rawBytes + 300, 0)} MB; peak RSS ${fixed(c.peakRssMegabytes, 0)} MB.`,
    "",
  );
  const floorInfo = rows.find((r) => r.floor)?.floor;
  if (floorInfo) {
    report.push(`BLAS floor: numpy ${floorInfo.numpy}, ${floorInfo.blas}, OpenBLAS core type ${floorInfo.coreType ?? "?"}${avx512 ? " (pinned with OPENBLAS_CORETYPE=SkylakeX)" : ""}.`, "");
  }
  log("A and B: plexus check's estimates");
  const estimates = [
    ["A", designA, rows[0].fast],
    ["B", designB, rows[1].fast],
    ["A from the .npy stack", designANpy, rows[2].fast],
    ["B from the .npy stack", designBNpy, rows[3].fast],
  ] as const;
  report.push("`plexus check`'s estimate of each run (inputs read, then calibrated) against the run measured above:", "", "| scenario | estimate s | measured s | estimate ÷ measured |", "|---|---|---|---|");
  for (const [name, design, measured] of estimates) {
    const estimate = child({ kind: "estimate", design, threads });
    report.push(`| ${name} | ${fixed(estimate.estimateSeconds, 1)} | ${fixed(measured.seconds, 1)} | ${fixed(estimate.estimateSeconds! / measured.seconds, 2)} |`);
  }
  report.push("");
}

/**
 * Scenario D: population-scale cohorts from float32 .npy stacks, `group + age + sex + site` (21 sites).
 * The reference kernel (TypeScript, double precision) computes the first relabelings again on its own,
 * and their null rows must equal the fast run's, bit for bit. The BLAS floor is timed on a tenth of the
 * rows and scaled (the product is linear in its rows), so the bench stays within the hour.
 */
function population(report: string[]): void {
  const cases = [
    { subjects: 10_000, regions: 333, permutations: quick ? 200 : 5000 },
    { subjects: 2000, regions: 1000, permutations: quick ? 50 : 500 },
  ];
  const prefix = 24;
  report.push(
    "## Scenario D: population scale (float32 .npy stacks, `group + age + sex + site`, 21 sites, components by extent)",
    "",
    "| cohort | S | E | c | K | wall s end to end | permutations wall s (CPU s) | check's estimate s (÷ measured) | BLAS floor s (scaled from K/10) | permutations ÷ floor | end to end ÷ floor | peak RSS MB | bound 1.3 × S·E·8 + 500 MB | first " + prefix + " null rows = TypeScript kernel's |",
    "|---|---|---|---|---|---|---|---|---|---|---|---|---|---|",
  );
  for (const { subjects, regions, permutations } of cases) {
    const folder = ensurePopulationCohort(subjects, regions, log);
    const name = `${subjects} × ${regions}`;
    const model = "group + age + sex + site";
    const design = writeBenchDesign(folder, `scenario-d-${permutations}`, { model, permutations, connectomes: "connectomes.npy" });
    const referenceDesign = writeBenchDesign(folder, `scenario-d-reference-${prefix}`, { model, permutations: prefix, connectomes: "connectomes.npy" });
    log(`D ${name}: plexus check's estimate`);
    const estimate = child({ kind: "estimate", design, threads });
    log(`D ${name}: SIMD kernel, ${permutations} relabelings`);
    const fast = child({ kind: "analysis", name: `fast-D-${subjects}`, design, threads, prefixRows: prefix });
    log(`D ${name}: TypeScript kernel, the first ${prefix} relabelings`);
    const reference = child({ kind: "analysis", name: `reference-D-${subjects}`, design: referenceDesign, threads }, "typescript");
    log(`D ${name}: BLAS floor`);
    const tenth = blasFloor(fast.subjects!, fast.edges!, Math.ceil((fast.vectors! * fast.permutations!) / 10));
    const floorSeconds = tenth ? tenth.seconds * 10 : undefined;
    const dataMb = (fast.subjects! * fast.edges! * 8) / 2 ** 20;
    report.push(
      `| ${name} | ${fast.subjects} | ${fast.edges} | ${fast.vectors} | ${fast.permutations} | ${fixed(fast.seconds, 0)} | ${fixed(fast.nullSeconds, 0)} (${fixed(fast.nullCpuSeconds, 0)}) | ${fixed(estimate.estimateSeconds, 0)} (${fixed(estimate.estimateSeconds! / fast.seconds, 2)}) | ${fixed(floorSeconds, 0)} | ${floorSeconds ? fixed(fast.nullSeconds! / floorSeconds, 2) : "–"} | ${floorSeconds ? fixed(fast.seconds / floorSeconds, 2) : "–"} | ${fixed(fast.peakRssMegabytes, 0)} | ${fixed(1.3 * dataMb + 500, 0)} | ${reference.nullHash === fast.prefixHash ? "yes" : "**NO**"} |`,
    );
  }
  report.push("", "MB here are MiB (2^20 bytes), as the kernel reports peak RSS.", "");
}

function reading(report: string[], kA: number): void {
  const npy = ensureSimulatedCohort("npy", log);
  const text = ensureSimulatedCohort("tsv", log);
  const designA = writeBenchDesign(text, `scenario-a-${kA}`, { model: "group + age + sex", permutations: kA, connectomes: "connectomes/{participant_id}.tsv", transform: "fisher-z" });
  const designNpy = writeBenchDesign(npy, "read-npy", { model: "group", permutations: 100, connectomes: "connectomes.npy", transform: "fisher-z" });
  const containerWriters = ensureContainerStacks(npy, log);

  log("input reading rates");
  const textRead = child({ kind: "read", design: designA });
  const npyRead = child({ kind: "read", design: designNpy });
  const oneMatrix = child({ kind: "matrixText" });
  const containerRows: string[] = [];
  if (containerWriters) {
    for (const [what, file] of [
      [".mat stack 400 × 400 × 200, MATLAB level 5, participants on the last axis (scipy.io.savemat)", "connectomes.mat"],
      ["HDF5 stack 200 × 400 × 400 at /conn (h5py)", "connectomes.h5"],
    ] as const) {
      const design = writeBenchDesign(npy, `read-${path.extname(file).slice(1)}`, { model: "group", permutations: 100, connectomes: file, transform: "fisher-z" });
      const read = child({ kind: "read", design });
      containerRows.push(`| ${what} (design read, participants, stack, checks) | ${fixed(read.megabytes, 0)} | ${fixed(read.seconds, 2)} | ${fixed(read.megabytesPerSecond, 0)} |`);
    }
  }
  report.push(
    "## Input reading",
    "",
    "| input | MB | seconds | MB/s |",
    "|---|---|---|---|",
    `| 200 text matrices 400 × 400 (design read, participants, matrices, checks) | ${fixed(textRead.megabytes, 0)} | ${fixed(textRead.seconds, 2)} | ${fixed(textRead.megabytesPerSecond, 0)} |`,
    `| one 400 × 400 text matrix of full-precision values, parse only (bench/readMatrixText.ts) | ${fixed(oneMatrix.megabytes, 1)} | ${fixed(oneMatrix.seconds, 3)} | ${fixed(oneMatrix.megabytesPerSecond, 0)} |`,
    `| .npy stack 200 × 400 × 400 (design read, participants, stack, checks) | ${fixed(npyRead.megabytes, 0)} | ${fixed(npyRead.seconds, 2)} | ${fixed(npyRead.megabytesPerSecond, 0)} |`,
    ...containerRows,
    "",
    ...(containerWriters ? [`The .mat and HDF5 stacks hold the .npy stack's values, written by ${Object.entries(containerWriters).map(([k, v]) => `${k} ${v}`).join(", ")}.`, ""] : []),
  );

}

/** The two-level screen's kernel alone, by subjects per subset-table chunk. */
function subsetTables(report: string[]): void {
  log("subset tables");
  const tables = child({ kind: "groupTables" }).groupTables ?? [];
  report.push(
    "## Two-level screen kernel (subset tables), one core",
    "",
    "S = 200, E = 79,800, a batch of 512 relabelings, about 0.3 % of pairs listed (bench/groupTables.ts); the engine's choice for this batch is marked.",
    "",
    "| subjects per chunk | ms per relabeling |",
    "|---|---|",
    ...tables.map((t) => `| ${t.chunkSize}${t.chosen ? " (chosen)" : ""} | ${fixed(t.msPerRelabeling, 3)} |`),
    "",
  );

}

/**
 * Scaling of the permutation engine alone, on invented data (c = 3). Each shape runs at two numbers of
 * relabelings, K and 3K: the difference gives the time per relabeling without the fixed cost of starting
 * (worker threads, the single-precision copy of the residuals each thread keeps), shown separately.
 */
function scaling(report: string[]): void {
  log("scaling table");
  const k1 = quick ? 200 : 1000;
  const base = { subjects: 200, regions: 400, covariates: true, threads };
  const shapes: { label: string; request: Omit<Extract<Request, { kind: "null" }>, "permutations"> }[] = [];
  for (const subjects of [100, 200, 400]) shapes.push({ label: `S = ${subjects}`, request: { kind: "null", ...base, subjects } });
  for (const regions of [200, 283]) shapes.push({ label: `regions = ${regions}`, request: { kind: "null", ...base, regions } });
  shapes.push({ label: "threads = 1", request: { kind: "null", ...base, threads: 1 } });
  report.push(
    "## Scaling (permutations alone, invented data, c = 3, SIMD kernel)",
    "",
    `Each shape at K = ${k1} and K = ${3 * k1} relabelings, the faster of two runs each: the marginal time per relabeling is the difference ÷ ${2 * k1}; the fixed cost is what remains at K = ${k1}.`,
    "",
    `| run | S | E | threads | wall s at K = ${k1} | wall s at K = ${3 * k1} | CPU s at K = ${3 * k1} | marginal ms per relabeling | marginal s per S·E·K × 10¹⁰ | fixed s |`,
    "|---|---|---|---|---|---|---|---|---|---|",
  );
  for (const { label, request } of shapes) {
    const small = fasterOfTwo({ ...request, permutations: k1 });
    const large = fasterOfTwo({ ...request, permutations: 3 * k1 });
    const marginal = (large.nullSeconds! - small.nullSeconds!) / (2 * k1);
    report.push(
      `| ${label} | ${large.subjects} | ${large.edges} | ${request.threads} | ${fixed(small.nullSeconds, 2)} | ${fixed(large.nullSeconds, 2)} | ${fixed(large.nullCpuSeconds, 2)} | ${fixed(marginal * 1000, 3)} | ${fixed((marginal / (large.subjects! * large.edges!)) * 1e10, 2)} | ${fixed(small.nullSeconds! - marginal * k1, 2)} |`,
    );
  }
}

main().catch((error: unknown) => {
  process.stderr.write(`${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
  process.exit(1);
});
