// The one-way layers of plexus as rules (dependency-cruiser; `npm run layers`, part of `npm test`).
// Data flow down one way: inputs (io/) → model/ → edge statistics (edges/) → network measures
// (network/: components, enhancement) → permutation engine (permute/) → inference/ → outputs (output/, the report in output/report/), with run/ (the pipeline), the command line
// (cli/) and the public API (index.ts) on top. common/ holds what several layers share and imports
// nothing of theirs. Each "never" of the layering is one named rule, so a future import that breaks
// a layer fails the test command with the rule's name.
const NUMERICS = "^src/(model|edges|network|permute|inference|statistics|parallel)/";

/** @type {import('dependency-cruiser').IConfiguration} */
module.exports = {
  forbidden: [
    {
      name: "no-import-cycles",
      comment: "Files never import each other in a loop, inside a folder or across folders.",
      severity: "error",
      from: { path: "^src/" },
      to: { circular: true },
    },
    {
      name: "numerics-never-import-inputs",
      comment: "The model, edge statistics, permutation engine, inference and distributions know no reader: shared types live in common/.",
      severity: "error",
      from: { path: NUMERICS },
      to: { path: "^src/io/" },
    },
    {
      name: "numerics-never-import-the-command-line",
      severity: "error",
      from: { path: NUMERICS },
      to: { path: "^src/cli/" },
    },
    {
      name: "numerics-never-import-the-pipeline",
      severity: "error",
      from: { path: NUMERICS },
      to: { path: "^src/(run|strength|power|errorRateStudy|simulate)/" },
    },
    {
      name: "numerics-never-import-outputs",
      severity: "error",
      from: { path: NUMERICS },
      to: { path: "^src/output/" },
    },
    {
      name: "model-never-imports-later-numerics",
      comment: "Inside the numerics, too, data flow one way: model → edges → network → permute → inference.",
      severity: "error",
      from: { path: "^src/model/" },
      to: { path: "^src/(edges|network|permute|inference)/" },
    },
    {
      name: "edge-statistics-never-import-later-numerics",
      severity: "error",
      from: { path: "^src/edges/" },
      to: { path: "^src/(network|permute|inference)/" },
    },
    {
      name: "network-measures-never-import-the-permutation-engine-or-inference",
      severity: "error",
      from: { path: "^src/network/" },
      to: { path: "^src/(permute|inference)/" },
    },
    {
      name: "permutation-engine-never-imports-inference",
      comment: "The engine draws null rows; p-values from them are inference's. Components and enhancement, which both use, live in network/.",
      severity: "error",
      from: { path: "^src/permute/" },
      to: { path: "^src/inference/" },
    },
    {
      name: "outputs-never-import-the-pipeline",
      comment: "Writers take what they write as parameters; they never reach up into run/.",
      severity: "error",
      from: { path: "^src/output/" },
      to: { path: "^src/(run|cli|strength|power)/" },
    },
    {
      name: "inputs-never-import-outputs",
      severity: "error",
      from: { path: "^src/io/" },
      to: { path: "^src/(output|run|cli|strength|power)/" },
    },
    {
      name: "only-the-command-line-imports-the-command-line",
      comment: "Progress and the terminal come in as parameters; the library and the public API never load the CLI.",
      severity: "error",
      from: { path: "^src/", pathNot: "^src/cli/" },
      to: { path: "^src/cli/" },
    },
    {
      name: "common-stays-neutral",
      comment: "common/ is below every layer: it imports only itself and errors.ts.",
      severity: "error",
      from: { path: "^src/common/" },
      to: { path: "^src/", pathNot: "^src/(common/|errors\\.ts$)" },
    },
  ],
  options: {
    doNotFollow: { path: "node_modules" },
    parser: "swc",
    tsPreCompilationDeps: true,
    tsConfig: { fileName: "tsconfig.json" },
  },
};
