// `plexus extract` (and `plexus strength --from`) end to end through the CLI on simulated cohorts:
// a subnetwork is found by `plexus run` in one cohort, then its per-subject mean connectivity is
// extracted. The values are checked against a direct computation done here from the raw files:
// the component's edges read from edges.tsv (region labels and the component column), the
// matrices read as text and Fisher z-transformed with Math.atanh, and the mean over those cells
// per participant. Tolerance: relative 1e-12 plus absolute 1e-14 (a mean of a few dozen terms
// summed in another order; common practice).
// The double-dipping warning must appear when the subnetwork is tested on the data it came from
// (Kriegeskorte et al. 2009, Nature Neuroscience 12:535) and not for an independent sample.
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { expectAllClose } from "../helpers/close.js";
import { groupDesignLines, readFisherCohort, readRows, runCli, writeDesignFile, writeSimulatedCohort } from "../unit/strength/strengthTestFiles.js";

const DIRECT = { rel: 1e-12, abs: 1e-14 };
const REGIONS = 12;
let root = "";
const results = () => path.join(root, "discovery-results");

/** Writes a cohort (participant IDs with `prefix`) and a design for it; returns the design path. */
function cohortWithDesign(name: string, seed: number, prefix: string): string {
  writeSimulatedCohort(
    path.join(root, name),
    { regions: REGIONS, patients: 12, controls: 12, kind: "correlation", effect: { regions: 5, size: 2.5 }, covariates: true },
    seed,
    { prefix },
  );
  return writeDesignFile(
    path.join(root, `${name}.yaml`),
    groupDesignLines({
      cohort: name,
      regions: true,
      model: "group + age + sex",
      contrasts: ["patient_gt_control: group[patient] - group[control]"],
      inference: ["method: components", "threshold: 3", "permutations: 99", "seed: 5"],
    }),
  );
}

let discovery = "";
let replication = "";
let sameIds = "";

beforeAll(async () => {
  root = mkdtempSync(path.join(tmpdir(), "plexus-extract-cli-"));
  discovery = cohortWithDesign("discovery", 31, "sub");
  replication = cohortWithDesign("replication", 32, "rep");
  sameIds = cohortWithDesign("same-ids", 33, "sub");
  const run = await runCli(["run", discovery, "--out", results(), "--threads", "1", "--quiet"]);
  if (run.code !== 0) throw new Error(`plexus run failed: ${run.stderr}`);
});

afterAll(() => {
  if (root) rmSync(root, { recursive: true, force: true });
});

/** The edges of component `id` in a results folder's edges.tsv, as region-label pairs. */
function componentEdges(id: number): [string, string][] {
  const [header, ...rows] = readRows(path.join(results(), "patient_gt_control", "edges.tsv"));
  const c = header.indexOf("component");
  return rows.filter((r) => r[c] === String(id)).map((r) => [r[header.indexOf("region_a")], r[header.indexOf("region_b")]]);
}

/** Per participant (in table order), the mean atanh(r) over the given label pairs. */
function directMean(cohort: string, edges: [string, string][]): { ids: string[]; values: number[] } {
  const { rows, labels, matrices } = readFisherCohort(path.join(root, cohort));
  const values = matrices.map((m) => edges.reduce((sum, [a, b]) => sum + m[labels.indexOf(a)][labels.indexOf(b)], 0) / edges.length);
  return { ids: rows.map((r) => r[0]), values };
}

function significantComponents(): number[] {
  const [header, ...rows] = readRows(path.join(results(), "patient_gt_control", "components.tsv"));
  return rows.filter((r) => Number(r[header.indexOf("p_fwe")]) <= 0.05).map((r) => Number(r[0]));
}

describe("plexus extract", () => {
  it("the discovery run finds a significant component (precondition)", () => {
    expect(significantComponents()).toContain(1);
  });

  it("writes each significant component's mean connectivity with participant_id, the model columns and then every other participants column; warns of double dipping on the same data", async () => {
    const out = path.join(root, "values.tsv");
    const result = await runCli(["extract", discovery, "--from", path.join(results(), "patient_gt_control"), "--out", out]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stderr).toContain("circular (double dipping)");
    expect(result.stderr).toContain("an independent sample");
    expect(result.stderr).toContain("cross-validation");
    const [header, ...rows] = readRows(out);
    const ids = significantComponents();
    expect(header).toEqual(["participant_id", "group", "age", "sex", ...ids.map((id) => `component_${id}`), "recall_score", "site"]);
    for (const id of ids) {
      const edges = componentEdges(id);
      expect(edges.length).toBeGreaterThan(0);
      const direct = directMean("discovery", edges);
      expect(rows.map((r) => r[0])).toEqual(direct.ids);
      const k = header.indexOf(`component_${id}`);
      expectAllClose(
        rows.map((r) => Number(r[k])),
        direct.values,
        { ...DIRECT, label: `component ${id}: extracted values vs the mean of atanh(r) over its edges in edges.tsv`, inputs: { edges } },
      );
    }
    const participants = readRows(path.join(root, "discovery", "participants.tsv"));
    expect(rows.map((r) => r.slice(1, 4))).toEqual(participants.slice(1).map((r) => r.slice(1, 4)));
    // The columns not in the model, in the table's order, as the table holds them (controls' n/a kept).
    expect(participants[0]).toEqual(["participant_id", "group", "age", "sex", "recall_score", "site"]);
    expect(rows.map((r) => r.slice(-2))).toEqual(participants.slice(1).map((r) => r.slice(4, 6)));
    expect(readFileSync(out, "utf8").endsWith("\n")).toBe(true);
  });

  it("an independent sample (other files, other participants): no warning, values from that sample", async () => {
    const out = path.join(root, "replication.tsv");
    const result = await runCli(["extract", replication, "--from", path.join(results(), "patient_gt_control"), "--component", "1", "--out", out]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stderr).not.toContain("warning");
    const [header, ...rows] = readRows(out);
    expect(header).toEqual(["participant_id", "group", "age", "sex", "component_1", "recall_score", "site"]);
    const direct = directMean("replication", componentEdges(1));
    expect(rows.map((r) => r[0])).toEqual(direct.ids);
    expectAllClose(rows.map((r) => Number(r[4])), direct.values, { ...DIRECT, label: "component 1 in the replication sample" });
  });

  it("other files but the same participant IDs: a warning that names the shared IDs", async () => {
    const result = await runCli(["extract", sameIds, "--from", path.join(results(), "patient_gt_control"), "--component", "1", "--out", path.join(root, "same-ids.tsv")]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stderr).toContain("24 of the 24 participant IDs");
    expect(result.stderr).toContain("double dipping");
  });

  it("strength --from tests the subnetwork and records the caution in results.md and summary.json", async () => {
    const out = path.join(root, "strength-from");
    const result = await runCli(["strength", discovery, "--from", path.join(results(), "patient_gt_control"), "--out", out, "-q", "-t", "1"]);
    expect(result.code, result.stderr).toBe(0);
    expect(result.stderr).toContain("double dipping");
    expect(readFileSync(path.join(out, "results.md"), "utf8")).toContain("**Caution.**");
    // The methods and the draft results say it too, with the reference.
    const methods = readFileSync(path.join(out, "methods.md"), "utf8");
    expect(methods).toContain("so testing the subnetworks again here is circular: their effects are inflated and their p-values are not valid (Kriegeskorte et al. 2009)");
    expect(methods).toContain("Kriegeskorte N, Simmons WK, Bellgowan PSF, Baker CI (2009). Circular analysis in systems neuroscience: the dangers of double dipping. Nature Neuroscience 12:535–540.");
    expect(readFileSync(path.join(out, "results.md"), "utf8")).toContain("The subnetworks were found in data that overlap these: their effects here are inflated");
    const summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
    expect(summary.subnetwork_source.shared_connectome_files).toBe(24);
    expect(summary.warnings.some((w: string) => w.includes("double dipping"))).toBe(true);
    const extracted = readRows(path.join(root, "values.tsv"));
    const values = readRows(path.join(out, "strength_values.tsv"));
    // The same means, whichever command computed them.
    expect(values.map((r) => r.slice(-1)[0]).slice(1)).toEqual(extracted.slice(1).map((r) => r[extracted[0].indexOf(values[0].slice(-1)[0])]));
  });

  describe("user mistakes exit with code 2 and name the option", () => {
    const cases: [string, () => string[], string][] = [
      ["no edge set chosen", () => [], "--from"],
      ["a whole results folder instead of a contrast folder", () => ["--from", results()], "--from"],
      ["a contrast the results folder lacks", () => ["--from", path.join(results(), "no_such_contrast")], "--from"],
      ["a component that does not exist", () => ["--from", path.join(results(), "patient_gt_control"), "--component", "99"], "--component"],
      ["--component without --from", () => ["--system", "amber", "--component", "1"], "--component"],
    ];
    for (const [what, flags, named] of cases) {
      it(what, async () => {
        const out = path.join(root, "mistake.tsv");
        const result = await runCli(["extract", discovery, "--out", out, ...flags()]);
        expect(result.code, result.stderr).toBe(2);
        expect(result.stderr).toContain(named);
        expect(result.stderr).not.toContain("    at ");
        expect(existsSync(out)).toBe(false);
      });
    }

    it("an existing output file: refused without --force; with --force replaced only when plexus wrote it, unchanged", async () => {
      const out = path.join(root, "existing.tsv");
      writeFileSync(out, "keep\n");
      const from = path.join(results(), "patient_gt_control");
      const refused = await runCli(["extract", discovery, "--from", from, "--out", out, "-q"]);
      expect(refused.code).toBe(2);
      expect(refused.stderr).toContain("--out");
      expect(readFileSync(out, "utf8")).toBe("keep\n");
      // A file of the user's own is never replaced, even with --force.
      const notOurs = await runCli(["extract", discovery, "--from", from, "--out", out, "-q", "--force"]);
      expect(notOurs.code, notOurs.stderr).toBe(2);
      expect(notOurs.stderr).toContain("not written by plexus");
      expect(readFileSync(out, "utf8")).toBe("keep\n");
      // A file plexus wrote is replaced with --force.
      const ours = path.join(root, "ours.tsv");
      expect((await runCli(["extract", discovery, "--from", from, "--out", ours, "-q"])).code).toBe(0);
      const forced = await runCli(["extract", discovery, "--from", from, "--out", ours, "-q", "--force"]);
      expect(forced.code, forced.stderr).toBe(0);
      expect(readFileSync(ours, "utf8").startsWith("participant_id\t")).toBe(true);
      // Once changed by hand, it is the user's: --force refuses it.
      writeFileSync(ours, `${readFileSync(ours, "utf8")}# my note\n`);
      const changed = await runCli(["extract", discovery, "--from", from, "--out", ours, "-q", "--force"]);
      expect(changed.code, changed.stderr).toBe(2);
      expect(changed.stderr).toContain("changed since plexus wrote it");
      expect(readFileSync(ours, "utf8")).toContain("# my note");
    });
  });
});
