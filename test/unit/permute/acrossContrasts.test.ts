// Error control across contrasts (`inference.across_contrasts: true`) end to end: runAnalysis on a
// tiny invented cohort (6 participants, so every one of the 6! = 720 relabelings is enumerated),
// against a brute force written here from the definitions:
// - Freedman & Lane (1983, J. Bus. Econ. Stat. 1:292; Winkler et al. 2014, NeuroImage 92:381,
//   Table 2) per contrast: fit the reduced model (the design without the tested column) with
//   ml-matrix, move the residual of participant s to participant π(s), add the reduced fit back,
//   refit the full model and take the contrast's t at every edge;
// - the largest component (breadth-first search; Zalesky, Fornito & Bullmore 2010) and the
//   largest t of every relabeling π, then the largest of those over the three contrasts for the
//   SAME π (the joint null of the maxima: Winkler, Webster, Brooks, Tracey, Smith & Nichols 2016,
//   Human Brain Mapping 37:1486; citation from memory);
// - p_FWE = b/M with M = 720 and b the relabelings whose joint maximum reaches the observed value
//   (Westfall & Young 1993; the identity is among the 720).
// Also: shards merged give the same bytes as one run, and the refusals name the design key.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import seedrandom from "seedrandom";
import { Matrix, QrDecomposition } from "ml-matrix";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { InputError } from "../../../src/errors.js";
import { mergeShards } from "../../../src/run/mergeShards.js";
import { prepareAnalysis } from "../../../src/run/prepareAnalysis.js";
import { runAnalysis } from "../../../src/run/runAnalysis.js";
import { expectClose } from "../../helpers/close.js";
import {
  allPermutations,
  bruteForceMaxima,
  normalDraw,
  olsContrastT,
  readNullRows,
  readTsv,
  scratchFolder,
  sortRows,
  writeDesign,
  writeTinyCohort,
  type NullRow,
} from "./cohortFiles.js";

const scratch = scratchFolder("across-contrasts");
afterAll(() => scratch.remove());
const quietLog = { info() {}, warn() {} };
const TOLERANCE = { rel: 1e-9, abs: 1e-12 };

const REGIONS = 5;
const THRESHOLD = 1.5;
const groups = ["patient", "control", "patient", "control", "control", "patient"];
const ages = [61, 58, 70, 66, 52, 64];
const design = groups.map((g, s) => [1, g === "patient" ? 1 : 0, ages[s]]);
const random = seedrandom("across-contrasts-cohort");
const E = (REGIONS * (REGIONS - 1)) / 2;
const data = design.map(([, patient, age]) =>
  Array.from({ length: E }, (_, e) => Math.round((normalDraw(random) + (e < 4 ? 1.5 * patient : 0) + 0.05 * (age - 62) * (e % 2)) * 1e6) / 1e6),
);
const contrasts = [
  { name: "patient_gt_control", expression: "group[patient] - group[control]", vector: [0, 1, 0], column: 1 },
  { name: "age_up", expression: "age", vector: [0, 0, 1], column: 2 },
  { name: "age_down", expression: "-age", vector: [0, 0, -1], column: 2 },
];

const dir = scratch.dir;
writeTinyCohort(dir, {
  columns: ["group", "age"],
  rows: groups.map((g, s) => [`sub-${s + 1}`, g, String(ages[s])]),
  regionCount: REGIONS,
  edges: data.map((d) => Float64Array.from(d)),
});
const body = (across: string, extra = "") => `model: group + age
levels:
  group: [control, patient]
contrasts:
${contrasts.map((c) => `  ${c.name}: ${c.expression}`).join("\n")}
inference:
  method: max-t
  threshold: ${THRESHOLD}
  size: extent
  tail: upper
  permutations: 1000
  seed: 3
${across}${extra}`;
const jointDesign = writeDesign(dir, "joint.yaml", body("  across_contrasts: true\n"));
const separateDesign = writeDesign(dir, "separate.yaml", body(""));

/** Naive Freedman–Lane t of one contrast for relabeling π (participant s's residual moves to π[s]). */
function freedmanLaneT(contrast: (typeof contrasts)[number], pi: number[]): Float64Array {
  const columns = [0, 1, 2].filter((j) => j !== contrast.column);
  const z = new Matrix(design.map((row) => columns.map((j) => row[j])));
  const y = new Matrix(data);
  const fitted = z.mmul(new QrDecomposition(z).solve(y));
  const residual = y.sub(fitted);
  const yStar: number[][] = design.map(() => new Array<number>(E));
  pi.forEach((to, s) => {
    for (let e = 0; e < E; e++) yStar[to][e] = residual.get(s, e) + fitted.get(to, e);
  });
  return olsContrastT(design, yStar, contrast.vector);
}

const relabelings = allPermutations(6);
// Per relabeling π: each contrast's maxima, and the joint maxima over the three contrasts for that same π.
const perContrast = relabelings.map((pi) => contrasts.map((c) => bruteForceMaxima(freedmanLaneT(c, pi), REGIONS, THRESHOLD, "upper")));
const joint: NullRow[] = perContrast.map((rows) => ({
  maxExtent: Math.max(...rows.map((r) => r.maxExtent)),
  maxMass: Math.max(...rows.map((r) => r.maxMass)),
  maxStatistic: Math.max(...rows.map((r) => r.maxStatistic)),
}));
const observedT = contrasts.map((c) => olsContrastT(design, data, c.vector));

const out = (name: string) => join(dir, name);
beforeAll(async () => {
  await runAnalysis({ designFile: jointDesign, out: out("joint"), threads: 1, quiet: true }, quietLog);
  await runAnalysis({ designFile: separateDesign, out: out("separate"), threads: 1, quiet: true }, quietLog);
});

describe("across_contrasts on 3 contrasts, all 720 relabelings (exact)", () => {
  it("is exact with 720 relabelings shared by every contrast; summary.json records the family", () => {
    expect(relabelings.length).toBe(720); // 6!, by the definition of a factorial
    const summary = JSON.parse(readFileSync(join(out("joint"), "summary.json"), "utf8"));
    expect(summary.options.inference.across_contrasts).toBe(true);
    expect(summary.across_contrasts.contrasts).toEqual(contrasts.map((c) => c.name));
    expect(summary.across_contrasts.null_file).toBe("null_across_contrasts.tsv");
    expect(summary.across_contrasts.mode).toBe("exact");
    expect(summary.across_contrasts.permutations).toBe(720);
    for (const c of summary.contrasts) {
      expect([c.mode, c.permutations, c.p_fwe_null, c.corrected_across_contrasts]).toEqual(["exact", 720, "null_across_contrasts.tsv", true]);
      expect(c.critical_statistic).toBe(summary.across_contrasts.critical_statistic);
    }
    const separate = JSON.parse(readFileSync(join(out("separate"), "summary.json"), "utf8"));
    expect(separate.options.inference.across_contrasts).toBe(false);
    expect(separate.across_contrasts).toBeNull();
    expect(separate.contrasts.map((c: { p_fwe_null: string }) => c.p_fwe_null)).toEqual(contrasts.map((c) => `${c.name}/null.tsv`));
  });

  it("each contrast's own null.tsv equals its brute-force Freedman–Lane null (as a multiset)", () => {
    contrasts.forEach((c, j) => {
      const actual = sortRows(readNullRows(join(out("joint"), c.name, "null.tsv")).map((r) => r.row));
      const expected = sortRows(perContrast.map((rows) => rows[j]));
      actual.forEach((row, i) => {
        expect(row.maxExtent, `${c.name} sorted row ${i + 1}: extent`).toBe(expected[i].maxExtent);
        expectClose(row.maxStatistic, expected[i].maxStatistic, { ...TOLERANCE, label: `${c.name} sorted row ${i + 1}: max t` });
      });
    });
  });

  it("null_across_contrasts.tsv equals the joint maxima over the same relabelings (as a multiset), row by row the max of the three null.tsv", () => {
    const family = readNullRows(join(out("joint"), "null_across_contrasts.tsv")).map((r) => r.row);
    expect(family.length).toBe(720);
    const own = contrasts.map((c) => readNullRows(join(out("joint"), c.name, "null.tsv")).map((r) => r.row));
    family.forEach((row, k) => {
      expect(row.maxExtent).toBe(Math.max(...own.map((rows) => rows[k].maxExtent)));
      expect(row.maxStatistic).toBe(Math.max(...own.map((rows) => rows[k].maxStatistic)));
    });
    const actual = sortRows(family);
    const expected = sortRows(joint);
    actual.forEach((row, i) => {
      expect(row.maxExtent, `sorted joint row ${i + 1}: extent`).toBe(expected[i].maxExtent);
      expectClose(row.maxStatistic, expected[i].maxStatistic, { ...TOLERANCE, label: `sorted joint row ${i + 1}: max t` });
      expectClose(row.maxMass, expected[i].maxMass, { ...TOLERANCE, label: `sorted joint row ${i + 1}: max mass` });
    });
  });

  it("every edge's p_fwe = b/720 with b counted over the joint maxima, and every component's likewise", () => {
    contrasts.forEach((c, j) => {
      const [header, ...edges] = readTsv(join(out("joint"), c.name, "edges.tsv"));
      edges.forEach((edge, e) => {
        const t = observedT[j][e];
        expectClose(Number(edge[header.indexOf("statistic")]), t, { ...TOLERANCE, label: `${c.name} edge ${e + 1}: t` });
        const b = joint.filter((row) => row.maxStatistic >= t - 1e-9 * Math.abs(t)).length;
        expect(Number(edge[header.indexOf("p_fwe")]), `${c.name} edge ${e + 1} (t = ${t})`).toBe(b / 720);
      });
      const [componentHeader, ...components] = readTsv(join(out("joint"), c.name, "components.tsv"));
      for (const component of components) {
        const extent = Number(component[componentHeader.indexOf("extent")]);
        const b = joint.filter((row) => row.maxExtent >= extent).length;
        expect(Number(component[componentHeader.indexOf("p_fwe")]), `${c.name} component of extent ${extent}`).toBe(b / 720);
      }
    });
    // The cohort has supra-threshold components to check (the planted group effect, the age effect).
    expect(contrasts.some((c) => readTsv(join(out("joint"), c.name, "components.tsv")).length > 1)).toBe(true);
  });

  it("without the option, each contrast's p_fwe comes from its own brute-force null (and is never above the joint one)", () => {
    contrasts.forEach((c, j) => {
      const [header, ...edges] = readTsv(join(out("separate"), c.name, "edges.tsv"));
      const [, ...jointEdges] = readTsv(join(out("joint"), c.name, "edges.tsv"));
      const p = header.indexOf("p_fwe");
      edges.forEach((edge, e) => {
        const t = observedT[j][e];
        const b = perContrast.filter((rows) => rows[j].maxStatistic >= t - 1e-9 * Math.abs(t)).length;
        expect(Number(edge[p]), `${c.name} edge ${e + 1}`).toBe(b / 720);
        expect(Number(edge[p])).toBeLessThanOrEqual(Number(jointEdges[e][p]));
      });
    });
  });

  it("the methods text, the subnetwork table's note and the report's row say how the contrasts were handled, with and without the option", () => {
    const jointMethods = readFileSync(join(out("joint"), "methods.md"), "utf8");
    expect(jointMethods).toContain("family-wise corrected across the three contrasts and the network");
    expect(jointMethods).toContain("Winkler AM, Webster MA, Brooks JC, Tracey I, Smith SM, Nichols TE (2016)");
    const separateMethods = readFileSync(join(out("separate"), "methods.md"), "utf8");
    expect(separateMethods).toContain("Each of the three contrasts was tested at α = 0.05 on its own, without correction across contrasts.");
    expect(readFileSync(join(out("joint"), "report.html"), "utf8")).toContain("<dt>Across contrasts</dt>");
    expect(readFileSync(join(out("joint"), "tables.md"), "utf8")).toContain("p_FWE is corrected across the 3 contrasts as well as the network");
    expect(readFileSync(join(out("separate"), "tables.md"), "utf8")).toContain("not across the 3 contrasts");
    expect(readFileSync(join(out("separate"), "report.html"), "utf8")).toContain("no correction: each of the 3 contrasts tested at α = 0.05 on its own");
  });
});

describe("threshold-free inference across contrasts", () => {
  it("each edge's p_fwe = b/720 over the row-wise largest max_enhanced of the three contrasts' null.tsv", async () => {
    const design = writeDesign(dir, "free.yaml", body("  across_contrasts: true\n").replace("method: max-t", "method: threshold-free"));
    await runAnalysis({ designFile: design, out: out("free"), threads: 1, quiet: true }, quietLog);
    const column = (file: string) => {
      const [header, ...rows] = readTsv(file);
      return rows.map((row) => Number(row[header.indexOf("max_enhanced")]));
    };
    const own = contrasts.map((c) => column(join(out("free"), c.name, "null.tsv")));
    const family = column(join(out("free"), "null_across_contrasts.tsv"));
    family.forEach((value, k) => expect(value, `row ${k + 1}`).toBe(Math.max(...own.map((rows) => rows[k]))));
    let checked = 0;
    for (const c of contrasts) {
      const [header, ...edges] = readTsv(join(out("free"), c.name, "edges.tsv"));
      for (const edge of edges) {
        const enhanced = Number(edge[header.indexOf("enhanced")]);
        if (!(enhanced > 0)) continue;
        const b = own[0].filter((_, k) => Math.max(...own.map((rows) => rows[k])) >= enhanced - 1e-10 * enhanced).length;
        expect(Number(edge[header.indexOf("p_fwe")]), `${c.name}: enhanced ${enhanced}`).toBe(b / 720);
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(0);
    const summary = JSON.parse(readFileSync(join(out("free"), "summary.json"), "utf8"));
    expect(typeof summary.across_contrasts.critical_enhanced).toBe("number");
  });
});

describe("shards", () => {
  it("two shards merged give the same bytes as one run (null_across_contrasts.tsv, tables, summary.json)", async () => {
    for (const k of [1, 2]) {
      await runAnalysis({ designFile: jointDesign, out: out(`shard-${k}`), shard: { index: k, count: 2 }, threads: 1, quiet: true }, quietLog);
    }
    await mergeShards([out("shard-2"), out("shard-1")], { out: out("merged"), quiet: true }, quietLog);
    const files = ["null_across_contrasts.tsv", "methods.md", "tables.md", "tables.docx", ...contrasts.flatMap((c) => [`${c.name}/edges.tsv`, `${c.name}/components.tsv`, `${c.name}/null.tsv`])];
    for (const file of files) expect(readFileSync(join(out("merged"), file), "latin1"), file).toBe(readFileSync(join(out("joint"), file), "latin1"));
    const summary = (folder: string) => {
      const parsed = JSON.parse(readFileSync(join(folder, "summary.json"), "utf8"));
      delete parsed.command;
      return parsed;
    };
    expect(summary(out("merged"))).toEqual(summary(out("joint")));
  });
});

describe("refusals name inference.across_contrasts (exit 2)", () => {
  const refused = (name: string, text: string, pattern: RegExp) => {
    const file = writeDesign(dir, name, text);
    let error: unknown;
    try {
      prepareAnalysis(file);
    } catch (caught) {
      error = caught;
    }
    expect(error, name).toBeInstanceOf(InputError);
    expect((error as InputError).message).toMatch(pattern);
    expect(String((error as InputError).location?.key ?? JSON.stringify(error))).toContain("inference.across_contrasts");
  };

  it("method fdr draws no relabelings", () => {
    refused("fdr.yaml", body("  across_contrasts: true\n").replace("method: max-t", "method: fdr"), /method fdr draws no relabelings/);
  });

  it("an F contrast among the contrasts", () => {
    refused(
      "f.yaml",
      body("  across_contrasts: true\n").replace("  age_down: -age\n", "  age_down: -age\n  both: [\"group[patient] - group[control]\", age]\n"),
      /'both' is an F contrast/,
    );
  });

  it("contrasts that would be tested by different schemes (sign flips for the mean, permutation for a slope)", () => {
    const text = `model: 1 + age
contrasts:
  mean: [1, 0]
  age_up: age
inference:
  across_contrasts: true
`;
    refused("schemes.yaml", text, /'mean' would be tested by sign flips and 'age_up' by permutation/);
  });

  it("a value other than true or false", () => {
    refused("word.yaml", body("  across_contrasts: yes please\n"), /must be true or false/);
  });
});
