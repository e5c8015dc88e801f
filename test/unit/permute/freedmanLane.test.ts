import { describe, it } from "vitest";
import seedrandom from "seedrandom";
import { Matrix, solve } from "ml-matrix";
import { expectAllClose } from "../../helpers/close.js";
import { partitionEffect, reducedResiduals } from "../../../src/permute/effectPartition.js";
import { permutedStatistics } from "../../../src/permute/permutedStatistics.js";

// Reference: a naive full refit of the Freedman–Lane permuted data, done with
// ml-matrix's general solver (a general-purpose library), following the
// definition in Freedman & Lane (1983) and Winkler et al. (2014, Table 2):
// fit the reduced model Y = Zγ + ε, permute (or sign-flip) its residuals,
// add back Zγ̂, refit the full model and take the contrast's t.

function normal(random: () => number): number {
  let u = 0;
  while (u === 0) u = random();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random());
}

/** OLS by normal equations with ml-matrix (fine for these well-conditioned designs). */
function olsT(x: Matrix, y: number[], c: number[]): number {
  const xt = x.transpose();
  const xtxInv = solve(xt.mmul(x), Matrix.eye(x.columns));
  const beta = xtxInv.mmul(xt).mmul(Matrix.columnVector(y));
  const fitted = x.mmul(beta).to1DArray();
  let sse = 0;
  y.forEach((v, i) => (sse += (v - fitted[i]) ** 2));
  const df = x.rows - x.columns;
  const cv = Matrix.columnVector(c);
  const estimate = cv.transpose().mmul(beta).get(0, 0);
  const variance = cv.transpose().mmul(xtxInv).mmul(cv).get(0, 0);
  return estimate / Math.sqrt((sse / df) * variance);
}

function randomDesign(random: () => number, S: number, kind: "two-group" | "one-sample") {
  const rows: number[][] = [];
  for (let s = 0; s < S; s++) {
    if (kind === "one-sample") rows.push([1, normal(random)]);
    else rows.push([1, s % 2, 50 + 10 * normal(random), random() < 0.5 ? 1 : 0]);
  }
  return rows;
}

describe("Freedman–Lane statistics without refitting equal a naive full refit", () => {
  for (const kind of ["two-group", "one-sample"] as const) {
    for (const scheme of kind === "one-sample" ? (["sign-flip"] as const) : (["permute", "sign-flip"] as const)) {
      it(`${kind} design, ${scheme}`, () => {
        const random = seedrandom(`fl-${kind}-${scheme}`);
        const S = 17;
        const E = 23;
        const rows = randomDesign(random, S, kind);
        const p = rows[0].length;
        const design = Float64Array.from(rows.flat());
        const c = kind === "one-sample" ? [1, 0] : [0, 1, 0.5, 0];
        const data = new Float64Array(S * E);
        for (let i = 0; i < data.length; i++) data[i] = normal(random) + (i % 3);
        const partition = partitionEffect(design, S, p, c);
        const reduced = reducedResiduals(data, S, E, partition.nuisanceBasis);
        const usesConstant = scheme === "sign-flip" || !partition.constantInNuisance;
        const nuisance = usesConstant ? partition.nuisanceBasis : partition.nuisanceBasis.slice(1);
        const vectors = [partition.effect, ...nuisance];
        const batch = 5;
        const weights = new Float64Array(batch * vectors.length * S);
        const relabelings: number[][] = [];
        for (let b = 0; b < batch; b++) {
          const relabel = Array.from({ length: S }, (_, s) => s);
          const signs = new Array<number>(S).fill(1);
          if (scheme === "permute") {
            for (let i = S - 1; i > 0; i--) {
              const j = Math.floor(random() * (i + 1));
              [relabel[i], relabel[j]] = [relabel[j], relabel[i]];
            }
          } else {
            for (let s = 0; s < S; s++) signs[s] = random() < 0.5 ? -1 : 1;
          }
          relabelings.push(scheme === "permute" ? relabel : signs);
          vectors.forEach((v, j) => {
            for (let s = 0; s < S; s++) {
              weights[(b * vectors.length + j) * S + s] = scheme === "permute" ? v[relabel[s]] : signs[s] * v[s];
            }
          });
        }
        const out = new Float64Array(batch * E);
        permutedStatistics(
          {
            subjects: S,
            edges: E,
            residuals: reduced.residuals,
            sumSquares: reduced.sumSquares,
            valid: new Uint8Array(E).fill(1),
            effectNorm2: partition.effectNorm2,
            df: partition.df,
          },
          weights,
          batch,
          vectors.length,
          out,
        );
        // Naive: residuals of the reduced model by an explicit fit on Z = X N (N spans c's complement).
        const x = new Matrix(rows);
        const expected = new Float64Array(batch * E);
        for (let e = 0; e < E; e++) {
          const y = Array.from({ length: S }, (_, s) => data[e * S + s]); // edge-major
          const zBasis = partition.nuisanceBasis.map((u) => Array.from(u));
          const fittedZ = new Array<number>(S).fill(0);
          for (const u of zBasis) {
            const f = u.reduce((sum, v, s) => sum + v * y[s], 0);
            u.forEach((v, s) => (fittedZ[s] += f * v));
          }
          const residual = y.map((v, s) => v - fittedZ[s]);
          for (let b = 0; b < batch; b++) {
            const r = relabelings[b];
            // Design-row relabeling s ← r[s] equals residual relabeling by the inverse.
            const inverse = new Array<number>(S);
            if (scheme === "permute") r.forEach((source, s) => (inverse[source] = s));
            const yStar = residual.map((_, s) =>
              scheme === "permute" ? residual[inverse[s]] + fittedZ[s] : r[s] * residual[s] + fittedZ[s],
            );
            expected[b * E + e] = olsT(x, yStar, c);
          }
        }
        // Tolerance: 1e-9 relative (two different, both stable, algebraic routes; common practice).
        expectAllClose(out, expected, { rel: 1e-9, abs: 1e-12, label: `${kind}/${scheme} permuted t` });
      });
    }
  }
});
