// Freedman–Lane null distributions end to end: prepareAnalysis → setupNull → computeNullRange on
// tiny cohorts with continuous nuisance covariates, against a naive full refit written here from
// the definition (Freedman & Lane 1983, J. Bus. Econ. Stat. 1:292; Winkler, Ridgway, Webster,
// Smith & Nichols 2014, NeuroImage 92:381, Table 2): fit the reduced model Y = Zγ + ε with ml-matrix
// (Z = the design without the tested column), relabel its residuals (permute, or flip signs),
// add Zγ̂ back, refit the full model by least squares, and take the contrast's t at every edge.
// Each null row is then max t (upper tail), max −t (lower) or max |t| (both) — the maximum
// statistic of Westfall & Young (1993) — and the largest component's extent and mass found by
// breadth-first search (Zalesky, Fornito & Bullmore 2010, NeuroImage 53:1197).
// Tolerance: 1e-9 relative plus 1e-12 absolute for statistics and masses (two different, both
// stable, algebraic routes; common practice, as in freedmanLane.test.ts); extents exactly.
import { join } from "node:path";
import seedrandom from "seedrandom";
import { afterAll, describe, expect, it } from "vitest";
import { Matrix, QrDecomposition } from "ml-matrix";
import { computeNullRange } from "../../../src/permute/nullRange.js";
import { Relabeler } from "../../../src/permute/relabelings.js";
import { fitAll, observeContrast } from "../../../src/run/analyzeContrasts.js";
import { setupNull } from "../../../src/run/permutationInference.js";
import { prepareAnalysis } from "../../../src/run/prepareAnalysis.js";
import { expectClose } from "../../helpers/close.js";
import { bruteForceMaxima, normalDraw, olsContrastT, scratchFolder, writeDesign, writeTinyCohort } from "./cohortFiles.js";

const scratch = scratchFolder("freedman-lane-null");
afterAll(() => scratch.remove());
const TOLERANCE = { rel: 1e-9, abs: 1e-12 };

interface Cohort {
  dir: string;
  /** Design rows [1, patient, age, score] as the model `group + age + score` codes them. */
  design: number[][];
  /** data[s][e]. */
  data: number[][];
  regionCount: number;
}

/** A random cohort: age correlated with group (so the nuisance matters), a second covariate, and edge effects of both. */
function makeCohort(name: string, seed: string, subjects: number, regionCount: number): Cohort {
  const random = seedrandom(seed);
  const dir = join(scratch.dir, name);
  const E = (regionCount * (regionCount - 1)) / 2;
  const rows: string[][] = [];
  const design: number[][] = [];
  const data: number[][] = [];
  for (let s = 0; s < subjects; s++) {
    const patient = s % 2 === 0 ? 1 : 0;
    const age = Math.round(60 + 8 * normalDraw(random) + 5 * patient);
    const score = Math.round((10 + 3 * normalDraw(random)) * 100) / 100;
    rows.push([`sub-${String(s + 1).padStart(2, "0")}`, patient ? "patient" : "control", String(age), String(score)]);
    design.push([1, patient, age, score]);
    data.push(
      Array.from({ length: E }, (_, e) =>
        Math.round((normalDraw(random) + 0.04 * (age - 60) * (e % 3 === 0 ? 1 : 0) + (e < 6 ? 0.8 * patient : 0)) * 1e6) / 1e6,
      ),
    );
  }
  writeTinyCohort(dir, { columns: ["group", "age", "score"], rows, regionCount, edges: data.map((d) => Float64Array.from(d)) });
  return { dir, design, data, regionCount };
}

/** Least-squares fitted values of every edge on the columns `columns` of the design. */
function reducedFit(design: number[][], data: number[][], columns: number[]): { fitted: Matrix; residual: Matrix } {
  const z = new Matrix(design.map((row) => columns.map((j) => row[j])));
  const y = new Matrix(data);
  const fitted = z.mmul(new QrDecomposition(z).solve(y));
  return { fitted, residual: y.sub(fitted) };
}

const cohorts = [makeCohort("a", "fl-null-a", 14, 7), makeCohort("b", "fl-null-b", 17, 6), makeCohort("c", "fl-null-c", 12, 8)];
const contrasts = [
  { name: "patient_gt_control", expression: "group[patient] - group[control]", vector: [0, 1, 0, 0], column: 1 },
  { name: "age_slope", expression: "age", vector: [0, 0, 1, 0], column: 2 },
  { name: "control_gt_patient", expression: "group[control] - group[patient]", vector: [0, -1, 0, 0], column: 1 },
];

describe("computeNullRange rows equal a naive Freedman–Lane refit (model group + age + score)", () => {
  for (const [index, cohort] of cohorts.entries()) {
    for (const scheme of ["permute", "sign-flip"] as const) {
      for (const tail of ["upper", "lower", "both"] as const) {
        it(`cohort ${index + 1} (S = ${cohort.design.length}, ${cohort.regionCount} regions), ${scheme}, tail ${tail}`, () => {
          const threshold = 1.2;
          const K = 40;
          const designFile = writeDesign(
            cohort.dir,
            `design-${scheme}-${tail}.yaml`,
            `model: group + age + score
levels:
  group: [control, patient]
contrasts:
${contrasts.map((c) => `  ${c.name}: ${c.expression}`).join("\n")}
inference:
  threshold: ${threshold}
  tail: ${tail}
  permutations: ${K}
  seed: ${11 + index}
  scheme: ${scheme}
`,
          );
          const prepared = prepareAnalysis(designFile);
          // The design matrix is the one the naive refit uses (columns intercept, patient, age, score).
          expect(prepared.matrix.cols).toBe(4);
          const values = Array.from(prepared.matrix.values);
          expect(values).toEqual(cohort.design.flat());
          const fit = fitAll(prepared);
          for (const contrast of contrasts) {
            const observed = observeContrast(prepared, fit, prepared.contrasts.find((c) => c.name === contrast.name)!);
            expect(Array.from(observed.contrast.vector)).toEqual(contrast.vector);
            const setup = setupNull(prepared, observed);
            expect(setup.scheme).toBe(scheme);
            const { plan } = setup.context;
            expect(plan.exact).toBe(false);
            const rows = computeNullRange(setup.context, 1, K + 1);
            // Naive Freedman–Lane: reduced model without the tested column.
            const nuisanceColumns = [0, 1, 2, 3].filter((j) => j !== contrast.column);
            const { fitted, residual } = reducedFit(cohort.design, cohort.data, nuisanceColumns);
            const S = cohort.design.length;
            const E = cohort.data[0].length;
            const relabeler = new Relabeler(plan);
            const permutation = new Int32Array(S);
            const signs = new Float64Array(S);
            for (let k = 1; k <= K; k++) {
              const yStar: number[][] = Array.from({ length: S }, () => new Array<number>(E));
              if (scheme === "permute") {
                relabeler.permutation(k, permutation);
                // Subject s takes the design row of permutation[s]: equivalently, the residual of
                // subject s moves to subject permutation[s] (Y*[π(s)] = R[s] + Zγ̂[π(s)]).
                for (let s = 0; s < S; s++) {
                  const to = permutation[s];
                  for (let e = 0; e < E; e++) yStar[s][e] = residual.get(to, e) + fitted.get(s, e);
                }
              } else {
                relabeler.signs(k, signs);
                for (let s = 0; s < S; s++) for (let e = 0; e < E; e++) yStar[s][e] = signs[s] * residual.get(s, e) + fitted.get(s, e);
              }
              const t = olsContrastT(cohort.design, yStar, contrast.vector);
              const expected = bruteForceMaxima(t, cohort.regionCount, threshold, tail);
              const label = `${contrast.name}, relabeling ${k}`;
              const inputs = { k, relabeling: scheme === "permute" ? Array.from(permutation) : Array.from(signs) };
              expectClose(rows.maxStatistic[k - 1], expected.maxStatistic, { ...TOLERANCE, label: `${label}: max_statistic`, inputs });
              expectClose(rows.maxMass[k - 1], expected.maxMass, { ...TOLERANCE, label: `${label}: max_mass`, inputs });
              expect(rows.maxExtent[k - 1], `${label}: max_extent`).toBe(expected.maxExtent);
            }
          }
        });
      }
    }
  }
});
