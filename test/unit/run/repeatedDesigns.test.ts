// `repeated:` designs checked against R (test/fixtures/r/repeated_paired.R and repeated_measures.R,
// which wrote the invented cohorts under test/fixtures/repeated/ and the expected values beside
// them): the paired-differences edge t against t.test(post, pre, paired = TRUE), the difference
// in change (group × time) against lm(diff ~ arm + age), the mean change with covariates against
// the intercept of lm on centred covariates, and the three-level within contrasts against
// lm(y ~ factor(person) + session). The refusals are the design's documented rules.
import { readFileSync, writeFileSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, describe, expect, it } from "vitest";
import { InputError } from "../../../src/errors.js";
import { fitAll, observeContrast } from "../../../src/run/analyzeContrasts.js";
import { prepareAnalysis } from "../../../src/run/prepareAnalysis.js";
import { expectClose } from "../../helpers/close.js";
import { scratchFolder } from "../permute/cohortFiles.js";

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), "../../..");
const PAIRED = join(ROOT, "test/fixtures/repeated/paired");
const MEASURES = join(ROOT, "test/fixtures/repeated/measures");
const scratch = scratchFolder("repeated");
afterAll(() => scratch.remove());

let designCount = 0;
function design(folder: string, lines: string[], participants = join(folder, "participants.tsv")): string {
  const file = join(scratch.dir, `design-${++designCount}.yaml`);
  writeFileSync(
    file,
    [`subjects: ${participants}`, `connectomes: ${join(folder, "matrices")}/{person}_{session}.tsv`, "repeated: { participant: person, within: session }", ...lines, "inference: { method: fdr }", ""].join("\n"),
  );
  return file;
}

function expected(folder: string): Record<string, number[]> {
  const [header, ...rows] = readFileSync(join(folder, "expected.tsv"), "utf8").trim().split("\n").map((line) => line.split("\t"));
  return Object.fromEntries(header.map((name, k) => [name, rows.map((row) => Number(row[k]))]));
}

function statistics(designFile: string) {
  const prepared = prepareAnalysis(designFile);
  const fit = fitAll(prepared);
  return { prepared, byName: Object.fromEntries(prepared.contrasts.map((c) => [c.name, observeContrast(prepared, fit, c).statistics])) };
}

function expectEdges(actual: ArrayLike<number>, reference: number[], label: string): void {
  expect(actual.length).toBe(reference.length);
  for (let e = 0; e < reference.length; e++) expectClose(actual[e], reference[e], { rel: 1e-10, abs: 1e-12, label: `${label}, edge ${e}` });
}

describe("repeated, two levels: paired differences", () => {
  const r = expected(PAIRED);

  it("tests the change by the paired t of each edge (R t.test(post, pre, paired = TRUE))", () => {
    const { prepared, byName } = statistics(design(PAIRED, ["model: session", "levels: { session: [pre, post] }", "contrasts:", "  change: session[post] - session[pre]"]));
    expectEdges(byName.change.statistic, r.t_paired, "paired t vs R t.test");
    expectEdges(byName.change.estimate, r.estimate_paired, "mean difference vs R t.test estimate");
    expect(byName.change.df).toBe(r.df_paired[0]);
    expect(prepared.excluded).toEqual([{ id: "p9-pre", line: 18, reason: "no post scan" }]);
    expect(prepared.repeated).toMatchObject({ design: "paired differences", people: 8, scans: 16, difference: "post - pre" });
    expect(prepared.matrix.rows).toBe(8);
  });

  it("reads the contrast by its levels, whatever the level order (R t.test)", () => {
    // Levels given in reverse (post, pre): the fitted difference is pre − post, and the contrast still means post − pre.
    const { byName } = statistics(design(PAIRED, ["model: session", "levels: { session: [post, pre] }", "contrasts:", "  change: session[post] - session[pre]", "  loss: session[pre] - session[post]"]));
    expectEdges(byName.change.statistic, r.t_paired, "paired t vs R t.test (reversed level order)");
    expectEdges(byName.loss.statistic, r.t_paired.map((t) => -t), "reversed contrast vs −(R t.test)");
  });

  it("tests the difference in change with covariates (R lm(diff ~ arm + age)) and the mean change at the covariates' means", () => {
    const lines = ["levels: { session: [pre, post], arm: [waitlist, treated] }", "contrasts:", "  gain: arm[treated] - arm[waitlist]", "  change: session[post] - session[pre]"];
    const { prepared, byName } = statistics(design(PAIRED, ["model: session + arm + age", ...lines]));
    expectEdges(byName.gain.statistic, r.t_gain, "group × time t vs R lm armtreated");
    expectEdges(byName.gain.estimate, r.estimate_gain, "group × time estimate vs R lm");
    expect(byName.gain.df).toBe(r.df_gain[0]);
    expectEdges(byName.change.statistic, r.t_change_adjusted, "mean change t vs R lm intercept (centred covariates)");
    expectEdges(byName.change.estimate, r.estimate_change_adjusted, "mean change vs R lm intercept (centred covariates)");
    expect(prepared.matrix.columns.map((c) => c.name)).toEqual(["session[post] - session[pre]", "arm[treated]", "age"]);
    // The interaction written out names the same change-model term (R lm armtreated).
    const interaction = statistics(design(PAIRED, ["model: session * arm + age", "levels: { session: [pre, post], arm: [waitlist, treated] }", "contrasts:", "  gain: session[post]:arm[treated]"]));
    expectEdges(interaction.byName.gain.statistic, r.t_gain, "session:arm interaction t vs R lm armtreated");
  });

  it("refuses the mean level over scans, a column that changes between a person's scans, two scans at one level, and blocks", () => {
    const refused = (lines: string[], participants?: string) => {
      try {
        prepareAnalysis(design(PAIRED, lines, participants));
      } catch (error) {
        expect(error).toBeInstanceOf(InputError);
        return error as InputError;
      }
      throw new Error("expected an InputError");
    };
    // Text levels without an order under levels: would make the change's direction alphabetical (post before pre).
    const unordered = refused(["model: session", "contrasts:", "  c: session[post] - session[pre]"]);
    expect(unordered.location.key).toBe("levels");
    expect(unordered.message).toMatch(/need an order under 'levels:'/);
    expect(refused(["model: session", "levels: { session: [pre, post] }", "contrasts:", "  level: intercept"]).message).toMatch(/removes/);
    expect(refused(["model: arm", "contrasts:", "  a: arm[treated] - arm[waitlist]"]).location.key).toBe("model");
    const blocked = join(scratch.dir, "blocked.yaml");
    writeFileSync(blocked, readFileSync(design(PAIRED, ["model: session", "contrasts:", "  c: session[post] - session[pre]"]), "utf8").replace("inference: { method: fdr }", "inference: { method: fdr, blocks: arm }"));
    expect(() => prepareAnalysis(blocked)).toThrow(/'inference.blocks' cannot be combined with 'repeated'/);
    // age differs between the two scans of p1
    const table = readFileSync(join(PAIRED, "participants.tsv"), "utf8").replace("p1-post\tp1\tpost\ttreated\t31", "p1-post\tp1\tpost\ttreated\t32");
    const changed = join(scratch.dir, "participants-age.tsv");
    writeFileSync(changed, table);
    const error = refused(["model: session + age", "levels: { session: [pre, post] }", "contrasts:", "  c: session[post] - session[pre]"], changed);
    expect(error.message).toMatch(/'age' differs between the two scans of person 'p1'/);
    // two scans of p2 at pre
    const twice = join(scratch.dir, "participants-twice.tsv");
    writeFileSync(twice, readFileSync(join(PAIRED, "participants.tsv"), "utf8").replace("p2-post\tp2\tpost", "p2-post\tp2\tpre"));
    expect(refused(["model: session", "levels: { session: [pre, post] }", "contrasts:", "  c: session[post] - session[pre]"], twice).message).toMatch(/two scans at session 'pre'/);
  });
});

describe("repeated, three levels: person effects, relabelings within each person", () => {
  const r = expected(MEASURES);
  const lines = ["model: session", "levels: { session: [base, mid, end] }", "contrasts:", "  end: session[end] - session[base]", "  end_mid: session[end] - session[mid]"];

  it("tests within-person contrasts as lm(y ~ factor(person) + session) does (R)", () => {
    const { prepared, byName } = statistics(design(MEASURES, lines));
    expectEdges(byName.end.statistic, r.t_end, "session end − base t vs R lm");
    expectEdges(byName.end.estimate, r.estimate_end, "session end − base estimate vs R lm");
    expectEdges(byName.end_mid.statistic, r.t_end_mid, "session end − mid t vs R coef/vcov");
    expectEdges(byName.end_mid.estimate, r.estimate_end_mid, "session end − mid estimate vs R coef/vcov");
    expect(byName.end.df).toBe(r.df[0]);
    expect(prepared.excluded).toEqual([{ id: "p9-base", line: 25, reason: "one scan only" }]);
    expect(prepared.repeated).toMatchObject({ design: "repeated measures", people: 8, scans: 23 });
    expect(prepared.blocks?.column).toBe("person");
    expect(new Set(prepared.blocks?.codes).size).toBe(8);
  });

  it("tests a session × group interaction within people, as lm(y ~ factor(person) + session + mid_b + end_b) does (R)", () => {
    const { prepared, byName } = statistics(design(MEASURES, ["model: session * group", "levels: { session: [base, mid, end] }", "contrasts:", "  i: session[end]:group[b]"]));
    expectEdges(byName.i.statistic, r.t_interaction, "session end × group b t vs R lm with person effects");
    expectEdges(byName.i.estimate, r.estimate_interaction, "session end × group b estimate vs R lm");
    expect(prepared.warnings.some((w) => w.includes("absorb the between-person column group[b]"))).toBe(true);
    expect(prepared.repeated).toMatchObject({ exchange: "within each person", people: 8 });
  });

  it("tests a between-person contrast by exchanging whole people, as lm(y ~ session + group) on complete people (R)", () => {
    const { prepared, byName } = statistics(design(MEASURES, ["model: session + group", "levels: { session: [base, mid, end] }", "contrasts:", "  g: group[b] - group[a]"]));
    expectEdges(byName.g.statistic, r.t_group, "group b − a t vs R lm(y ~ session + group)");
    expectEdges(byName.g.estimate, r.estimate_group, "group b − a estimate vs R lm");
    expect(byName.g.df).toBe(r.df_group[0]);
    expect(prepared.repeated).toMatchObject({ design: "repeated measures", exchange: "whole people", people: 7, scans: 21 });
    expect(prepared.design.inference.blockPermutation).toBe("whole");
    expect(prepared.excluded.map((x) => [x.id, x.reason])).toEqual([["p8-base", "no end scan"], ["p8-mid", "no end scan"], ["p9-base", "one scan only"]]);
  });

  it("refuses a design mixing within-person and between-person contrasts, sign flips of single scans, and block_permutation", () => {
    const attempt = (extra: string[]) => () => prepareAnalysis(design(MEASURES, extra));
    expect(attempt(["model: session + group", "levels: { session: [base, mid, end] }", "contrasts:", "  g: group[b] - group[a]", "  e: session[end] - session[base]"])).toThrow(
      /need different models and relabelings/,
    );
    expect(attempt(["model: session + group", "levels: { session: [base, mid, end] }", "contrasts:", "  m: group[b] + session[end]"])).toThrow(/weights both/);
    const flips = join(scratch.dir, "flips.yaml");
    writeFileSync(flips, readFileSync(design(MEASURES, lines), "utf8").replace("inference: { method: fdr }", "inference: { scheme: sign-flip, permutations: 100 }"));
    expect(() => prepareAnalysis(flips)).toThrow(/signs cannot be flipped/);
    const whole = join(scratch.dir, "whole.yaml");
    writeFileSync(whole, readFileSync(design(MEASURES, lines), "utf8").replace("inference: { method: fdr }", "inference: { block_permutation: whole, permutations: 100 }"));
    expect(() => prepareAnalysis(whole)).toThrow(/'inference.block_permutation' cannot be combined with 'repeated'/);
  });
});
