// What a `repeated:` design adds to the results folder, on the invented cohorts of
// test/fixtures/repeated/ (R-made; the statistics themselves are checked against R in
// repeatedDesigns.test.ts): summary.json's `repeated` block, the methods text naming scans,
// people and the design, Table 1 with one row per person (people counted by hand from the
// participants table), the report's row and the excluded scan's reason.
import { readFileSync, writeFileSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, describe, expect, it } from "vitest";
import { runAnalysis } from "../../../src/run/runAnalysis.js";
import { scratchFolder } from "../permute/cohortFiles.js";

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), "../../..");
const scratch = scratchFolder("repeated-outputs");
afterAll(() => scratch.remove());

async function run(folder: string, lines: string[]): Promise<string> {
  const designFile = join(scratch.dir, `${folder.replace(/\W/g, "_")}.yaml`);
  const data = join(ROOT, "test/fixtures/repeated", folder);
  writeFileSync(
    designFile,
    [`subjects: ${data}/participants.tsv`, `connectomes: ${data}/matrices/{person}_{session}.tsv`, "repeated: { participant: person, within: session }", ...lines, ""].join("\n"),
  );
  const out = join(scratch.dir, `out-${folder}`);
  await runAnalysis({ designFile, out, quiet: true, threads: 1 }, { info: () => {}, warn: () => {} });
  return out;
}

const read = (out: string, file: string) => readFileSync(join(out, file), "utf8");

describe("repeated designs in the results folder", () => {
  it("paired differences: summary, methods, Table 1 by person, report", async () => {
    const out = await run("paired", [
      "model: session + arm + age",
      "levels: { session: [pre, post], arm: [waitlist, treated] }",
      "contrasts:",
      "  change: session[post] - session[pre]",
      "  gain: arm[treated] - arm[waitlist]",
      "inference: { threshold: 2, permutations: 99, seed: 5 }",
    ]);
    const summary = JSON.parse(read(out, "summary.json"));
    expect(summary.repeated).toMatchObject({ participant: "person", within: "session", levels: ["pre", "post"], design: "paired differences", people: 8, scans: 16, difference: "post - pre" });
    expect(Object.keys(summary.repeated.centred)).toEqual(["arm[treated]", "age"]);
    expect(summary.subjects.excluded).toEqual([{ participant_id: "p9-pre", line: 18, reason: "no post scan" }]);
    expect(summary.contrasts.map((c: { scheme: string }) => c.scheme)).toEqual(["sign-flip", "permute"]);
    const methods = read(out, "methods.md");
    expect(methods).toContain("Connectivity matrices of 16 scans from 8 participants were analysed (1 of the 17 scans listed was excluded");
    expect(methods).toContain("paired differences");
    expect(methods).toContain("differences in change (group × time)");
    // Table 1 describes people: by arm (not by session), 4 + 4 people (participants.tsv: p1..p8 alternate treated, waitlist).
    const cohort = read(out, "tables/cohort.tsv").trim().split("\n").map((l) => l.split("\t"));
    expect(cohort.filter((row) => row[0] === "participants").map((row) => [row[2], row[3]])).toEqual([["waitlist", "4"], ["treated", "4"]]);
    expect(cohort.some((row) => row[0] === "session" || row[0] === "person")).toBe(false);
    expect(read(out, "tables.md")).toContain("Participant characteristics by arm");
    expect(read(out, "report.html")).toContain("Repeated scans");
    const subjects = read(out, "subjects.tsv").split("\n")[0].split("\t");
    expect(subjects.slice(0, 3)).toEqual(["participant_id", "person", "session"]);
  });

  it("repeated measures: blocks per person, methods, one Table 1 row per person", async () => {
    const out = await run("measures", [
      "model: session",
      "levels: { session: [base, mid, end] }",
      "contrasts:",
      "  end: session[end] - session[base]",
      "inference: { threshold: 2, permutations: 99, seed: 5 }",
    ]);
    const summary = JSON.parse(read(out, "summary.json"));
    expect(summary.repeated).toMatchObject({ design: "repeated measures", people: 8, scans: 23 });
    expect(summary.contrasts[0]).toMatchObject({ scheme: "permute", exchangeability_blocks: { column: "person", count: 8, permutation: "within" } });
    const methods = read(out, "methods.md");
    expect(methods).toContain("Connectivity matrices of 23 scans from 8 participants were analysed");
    expect(methods).toContain("repeated-measures model");
    expect(methods).toContain("Winkler AM, Webster MA, Vidaurre D, Nichols TE, Smith SM (2015)");
    const cohort = read(out, "tables/cohort.tsv").trim().split("\n").map((l) => l.split("\t"));
    expect(cohort.find((row) => row[0] === "participants")?.[3]).toBe("8");
  });
});

describe("commands that take one matrix per person refuse a repeated design", () => {
  it("strength, extract and power --pilot exit 2 naming the key", async () => {
    const data = join(ROOT, "test/fixtures/repeated/paired");
    const designFile = join(scratch.dir, "refused.yaml");
    writeFileSync(
      designFile,
      [`subjects: ${data}/participants.tsv`, `connectomes: ${data}/matrices/{person}_{session}.tsv`, "repeated: { participant: person, within: session }", "model: session", "levels: { session: [pre, post] }", "contrasts:", "  c: session[post] - session[pre]", ""].join("\n"),
    );
    const { runCli } = await import("../strength/strengthTestFiles.js");
    const cases = [
      ["strength", designFile, "--out", join(scratch.dir, "s")],
      ["extract", designFile, "--from", join(scratch.dir, "nowhere", "c"), "--out", join(scratch.dir, "e.tsv")],
      ["power", "--pilot", designFile, "--out", join(scratch.dir, "p"), "--cohorts", "2"],
    ];
    for (const argv of cases) {
      const result = await runCli(argv);
      expect(result.code, `${argv[0]}: ${result.stderr}`).toBe(2);
      expect(result.stderr).toMatch(/does not support 'repeated'/);
      expect(result.stderr).toContain("key 'repeated'");
    }
  });
});

describe("the worked repeated designs", () => {
  it("designs/prepost-group-by-time.yaml and designs/three-sessions.yaml prepare on their invented cohorts", async () => {
    const { prepareAnalysis } = await import("../../../src/run/prepareAnalysis.js");
    const prepost = prepareAnalysis(join(ROOT, "designs", "prepost-group-by-time.yaml"));
    expect(prepost.repeated).toMatchObject({ design: "paired differences", people: 19, scans: 38, difference: "post - pre" });
    expect(prepost.excluded).toEqual([{ id: "p14-pre", line: 28, reason: "no post scan" }]);
    expect(prepost.contrasts.map((c) => [c.name, [...c.vector]])).toEqual([["change", [1, 0, 0]], ["treated_gain", [0, 1, 0]]]);
    const sessions = prepareAnalysis(join(ROOT, "designs", "three-sessions.yaml"));
    expect(sessions.repeated).toMatchObject({ design: "repeated measures", exchange: "within each person", people: 15, scans: 44 });
    expect(sessions.excluded.map((x) => [x.id, x.reason])).toEqual([["t12-baseline", "one scan only"]]);
  });
});
