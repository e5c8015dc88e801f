import { describe, it } from "vitest";
import seedrandom from "seedrandom";
import { expectAllClose } from "../../helpers/close.js";
import { fitEdges } from "../../../src/edges/fitEdges.js";
import { contrastFStatistics } from "../../../src/edges/fStatistics.js";
import { partitionEffectRows, reducedResiduals } from "../../../src/permute/effectPartition.js";
import { permutedStatistics } from "../../../src/permute/permutedStatistics.js";

// Reference: a full refit of the Freedman–Lane permuted data (Freedman & Lane
// 1983; Winkler et al. 2014, Table 2) with the ordinary F statistic computed
// from the fitted coefficients (contrastFStatistics, itself checked against R
// and @stdlib/stats-anova1 in test/unit/edges/fStatistics.test.ts).

function normal(random: () => number): number {
  let u = 0;
  while (u === 0) u = random();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random());
}

describe("F contrasts: permuted F without refitting equals a full refit", () => {
  for (const scheme of ["permute", "sign-flip"] as const) {
    it(`three-level factor with a covariate, ${scheme}`, () => {
      const random = seedrandom(`f-null-${scheme}`);
      const S = 19;
      const E = 13;
      // Columns: intercept, site[b], site[c], age.
      const rows = Array.from({ length: S }, (_, s) => [1, s % 3 === 1 ? 1 : 0, s % 3 === 2 ? 1 : 0, 40 + 10 * normal(random)]);
      const p = 4;
      const design = Float64Array.from(rows.flat());
      const contrastRows = [Float64Array.from([0, 1, 0, 0]), Float64Array.from([0, 0, 1, 0])];
      const data = new Float64Array(S * E);
      for (let i = 0; i < data.length; i++) data[i] = normal(random) + 0.3 * (i % 5);
      const partition = partitionEffectRows(design, S, p, contrastRows);
      const reduced = reducedResiduals(data, S, E, partition.nuisanceBasis);
      const nuisance = scheme === "sign-flip" || !partition.constantInNuisance ? partition.nuisanceBasis : partition.nuisanceBasis.slice(1);
      const vectors = [...partition.effectBasis, ...nuisance];
      const batch = 4;
      const weights = new Float64Array(batch * vectors.length * S);
      const relabelings: number[][] = [];
      for (let b = 0; b < batch; b++) {
        const order = Array.from({ length: S }, (_, s) => s);
        const signs = new Array<number>(S).fill(1);
        if (scheme === "permute") {
          for (let i = S - 1; i > 0; i--) {
            const j = Math.floor(random() * (i + 1));
            [order[i], order[j]] = [order[j], order[i]];
          }
        } else {
          for (let s = 0; s < S; s++) signs[s] = random() < 0.5 ? -1 : 1;
        }
        relabelings.push(scheme === "permute" ? order : signs);
        vectors.forEach((v, j) => {
          for (let s = 0; s < S; s++) weights[(b * vectors.length + j) * S + s] = scheme === "permute" ? v[order[s]] : signs[s] * v[s];
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
          effectNorm2: 1,
          df: partition.df,
          effectVectors: partition.effectBasis.length,
        },
        weights,
        batch,
        vectors.length,
        out,
      );
      const expected = new Float64Array(batch * E);
      for (let b = 0; b < batch; b++) {
        const permuted = new Float64Array(S * E);
        for (let e = 0; e < E; e++) {
          const y = Array.from({ length: S }, (_, s) => data[e * S + s]);
          const fittedZ = new Array<number>(S).fill(0);
          for (const u of partition.nuisanceBasis) {
            const f = u.reduce((sum, v, s) => sum + v * y[s], 0);
            u.forEach((v, s) => (fittedZ[s] += f * v));
          }
          const residual = y.map((v, s) => v - fittedZ[s]);
          const r = relabelings[b];
          const inverse = new Array<number>(S);
          if (scheme === "permute") r.forEach((source, s) => (inverse[source] = s));
          for (let s = 0; s < S; s++) {
            permuted[e * S + s] = (scheme === "permute" ? residual[inverse[s]] : r[s] * residual[s]) + fittedZ[s];
          }
        }
        const refit = contrastFStatistics(fitEdges(design, S, p, permuted, E), contrastRows);
        expected.set(refit.statistic, b * E);
      }
      // Tolerance 1e-9 relative: two stable algebraic routes (common practice).
      expectAllClose(out, expected, { rel: 1e-9, abs: 1e-12, label: `F under ${scheme}` });
    });
  }
});
