import ttest2 from "@stdlib/stats-ttest2";
import { describe, expect, it } from "vitest";
import { edgeIndexOf } from "../../../src/edges/edgeIndex.js";
import { SITE_NAMES } from "../../../src/simulate/drawParticipants.js";
import type { SimulatedCohort, SimulationOptions } from "../../../src/simulate/simulateCohort.js";
import { simulateCohort } from "../../../src/simulate/simulateCohort.js";
import { simulationRandom } from "../../../src/simulate/simulationRandom.js";
import { expectClose } from "../../helpers/close.js";

const BASE: SimulationOptions = {
  regions: 20,
  patients: 12,
  controls: 10,
  kind: "correlation",
  effect: { regions: 5, size: 1.2 },
  covariates: true,
};

function simulate(options: Partial<SimulationOptions>, seed: number): SimulatedCohort {
  return simulateCohort({ ...BASE, ...options }, simulationRandom(seed));
}

/** Upper-triangle values of edge (i, j) across participants, on the model scale. */
function edgeValues(cohort: SimulatedCohort, i: number, j: number, rows: number[], toModel: (x: number) => number) {
  const n = cohort.regions.length;
  return rows.map((k) => toModel(cohort.matrices[k][i * n + j]));
}

function rowsOf(cohort: SimulatedCohort, group: string): number[] {
  const column = cohort.participants.header.indexOf("group");
  return cohort.participants.rows.flatMap((row, k) => (row[column] === group ? [k] : []));
}

/** Union–find over region indices; true when the edges join all their regions into one component. */
function edgesAreConnected(edges: Array<[number, number]>): boolean {
  const parent = new Map<number, number>();
  const find = (x: number): number => {
    if (!parent.has(x)) parent.set(x, x);
    let root = x;
    while (parent.get(root) !== root) root = parent.get(root) as number;
    parent.set(x, root);
    return root;
  };
  for (const [a, b] of edges) parent.set(find(a), find(b));
  const roots = new Set([...parent.keys()].map(find));
  return roots.size === 1;
}

describe("simulateCohort reproducibility", () => {
  it("simulateCohort(options, seedrandom(seed)) gives identical cohorts for the same seed", () => {
    const first = simulate({}, 7);
    const second = simulate({}, 7);
    expect(second.participants).toEqual(first.participants);
    expect(second.regions).toEqual(first.regions);
    expect(second.plantedEdges).toEqual(first.plantedEdges);
    expect(second.matrices.length).toBe(first.matrices.length);
    first.matrices.forEach((matrix, k) => expect(Array.from(second.matrices[k])).toEqual(Array.from(matrix)));
  });

  it("simulateCohort gives different matrices for different seeds", () => {
    const first = simulate({}, 7);
    const second = simulate({}, 8);
    expect(Array.from(second.matrices[0])).not.toEqual(Array.from(first.matrices[0]));
  });

  it("simulateCohort draws its randomness only from the generator passed in", () => {
    let calls = 0;
    const seeded = simulationRandom(3);
    simulateCohort(BASE, () => {
      calls++;
      return seeded();
    });
    expect(calls).toBeGreaterThan(BASE.regions * (BASE.regions - 1));
  });

  it("a planted effect changes no control's matrix and no non-planted edge (same random stream)", () => {
    const withEffect = simulate({}, 11);
    const without = simulate({ effect: null }, 11);
    expect(without.plantedEdges).toEqual([]);
    expect(without.participants).toEqual(withEffect.participants);
    const n = BASE.regions;
    const planted = new Set(withEffect.plantedEdges.map(([i, j]) => i * n + j));
    withEffect.matrices.forEach((matrix, k) => {
      for (let i = 0; i < n; i++) {
        for (let j = i + 1; j < n; j++) {
          if (!planted.has(i * n + j)) expect(without.matrices[k][i * n + j]).toBe(matrix[i * n + j]);
        }
      }
    });
  });
});

describe("simulateCohort shapes and validity", () => {
  it("writes one participant row and one N × N matrix per participant, ids sub-001 … in order", () => {
    const cohort = simulate({}, 1);
    expect(cohort.participants.header).toEqual(["participant_id", "group", "age", "sex", "recall_score", "site"]);
    expect(cohort.participants.rows).toHaveLength(22);
    expect(cohort.participants.rows.map((row) => row[0])).toEqual(
      Array.from({ length: 22 }, (_, k) => `sub-${String(k + 1).padStart(3, "0")}`),
    );
    expect(rowsOf(cohort, "patient")).toHaveLength(12);
    expect(rowsOf(cohort, "control")).toHaveLength(10);
    expect(cohort.matrices).toHaveLength(22);
    for (const matrix of cohort.matrices) expect(matrix.length).toBe(400);
    expect(cohort.regions).toHaveLength(20);
  });

  it("covariates: age 55–85, sex F/M, recall_score an integer 0–15 for patients and n/a for controls, every site holding both groups", () => {
    const cohort = simulate({ patients: 30, controls: 30 }, 2);
    const siteGroups = new Map<string, Set<string>>();
    for (const [, group, age, sex, score, site] of cohort.participants.rows) {
      expect(Number(age)).toBeGreaterThanOrEqual(55);
      expect(Number(age)).toBeLessThanOrEqual(85);
      expect(Number.isInteger(Number(age))).toBe(true);
      expect(["F", "M"]).toContain(sex);
      if (group === "control") expect(score).toBe("n/a");
      else expect(score).toMatch(/^(\d|1[0-5])$/);
      expect(SITE_NAMES as readonly string[]).toContain(site);
      siteGroups.set(site, (siteGroups.get(site) ?? new Set()).add(group));
    }
    expect(siteGroups.size).toBe(SITE_NAMES.length);
    for (const groups of siteGroups.values()) expect([...groups].sort()).toEqual(["control", "patient"]);
  });

  it("without covariates the table holds participant_id and group only", () => {
    const cohort = simulate({ covariates: false }, 2);
    expect(cohort.participants.header).toEqual(["participant_id", "group"]);
    for (const row of cohort.participants.rows) expect(row).toHaveLength(2);
  });

  it("regions have unique invented labels, coordinates in mm and a hemisphere matching the sign of x", () => {
    for (const regionCount of [2, 7, 20, 61]) {
      const cohort = simulate({ regions: regionCount, effect: null }, 5);
      const labels = cohort.regions.map((region) => region.label);
      expect(new Set(labels).size).toBe(regionCount);
      for (const region of cohort.regions) {
        expect(region.label).toMatch(/^[LR]-[a-z]+-\d{2}$/);
        expect(region.hemisphere).toBe((region.x as number) < 0 ? "left" : "right");
        expect(region.label[0]).toBe(region.hemisphere === "left" ? "L" : "R");
        for (const value of [region.x, region.y, region.z]) expect(Math.abs(value as number)).toBeLessThan(120);
        expect(region.system).toMatch(/^[a-z]+$/);
      }
    }
  });

  it("correlation matrices are symmetric with diagonal 1, |r| < 1 and at most 6 decimals", () => {
    const cohort = simulate({ regions: 30, patients: 20, controls: 20, effect: { regions: 6, size: 3 } }, 9);
    const n = 30;
    for (const matrix of cohort.matrices) {
      for (let i = 0; i < n; i++) {
        expect(matrix[i * n + i]).toBe(1);
        for (let j = i + 1; j < n; j++) {
          const r = matrix[i * n + j];
          expect(matrix[j * n + i]).toBe(r);
          expect(Math.abs(r)).toBeLessThan(1);
          expect(Math.round(r * 1e6) / 1e6).toBe(r);
        }
      }
    }
  });

  it("count matrices are symmetric non-negative integers with diagonal 0, many zero edges, and no zero group mean on a planted edge", () => {
    const cohort = simulate({ regions: 30, kind: "counts" }, 9);
    const n = 30;
    let zeros = 0;
    let edges = 0;
    for (const matrix of cohort.matrices) {
      for (let i = 0; i < n; i++) {
        expect(matrix[i * n + i]).toBe(0);
        for (let j = i + 1; j < n; j++) {
          const count = matrix[i * n + j];
          expect(matrix[j * n + i]).toBe(count);
          expect(Number.isInteger(count) && count >= 0).toBe(true);
          edges++;
          if (count === 0) zeros++;
        }
      }
    }
    expect(zeros / edges).toBeGreaterThan(0.3);
    for (const [i, j] of cohort.plantedEdges) {
      const sum = cohort.matrices.reduce((total, matrix) => total + matrix[i * n + j], 0);
      expect(sum).toBeGreaterThan(0);
    }
  });
});

describe("simulateCohort planted subnetwork", () => {
  it("plants every edge (i < j) among effect.regions regions, and the planted edges are connected (union–find)", () => {
    for (const [regions, seed] of [
      [2, 1],
      [5, 2],
      [9, 3],
      [20, 4],
    ] as const) {
      const cohort = simulate({ effect: { regions, size: 1 } }, seed);
      expect(cohort.plantedEdges).toHaveLength((regions * (regions - 1)) / 2);
      for (const [i, j] of cohort.plantedEdges) expect(i).toBeLessThan(j);
      const indices = cohort.plantedEdges.map(([i, j]) => edgeIndexOf(BASE.regions, i, j));
      expect(indices).toEqual([...indices].sort((a, b) => a - b));
      expect(new Set(cohort.plantedEdges.flat()).size).toBe(regions);
      expect(edgesAreConnected(cohort.plantedEdges)).toBe(true);
    }
  });

  // Reference: Welch's unequal-variance t test from @stdlib/stats-ttest2 (a general-purpose
  // statistics library). With equal group sizes n, Cohen's d with pooled SD √((s₁² + s₂²)/2)
  // equals t · √(1/n + 1/n) exactly (algebra of the two formulas).
  const cases = [
    { kind: "correlation" as const, size: 1.2, toModel: Math.atanh, scale: "Fisher z" },
    { kind: "correlation" as const, size: -0.8, toModel: Math.atanh, scale: "Fisher z" },
    { kind: "counts" as const, size: 1.2, toModel: Math.log1p, scale: "log1p(count)" },
  ];
  for (const { kind, size, toModel, scale } of cases) {
    it(`${kind}: patients minus controls on planted edges is d ≈ ${size} on the ${scale} scale (Welch t, @stdlib/stats-ttest2)`, () => {
      const n = 400;
      const cohort = simulate(
        { regions: 16, patients: n, controls: n, kind, effect: { regions: 5, size }, covariates: false },
        2026,
      );
      const patients = rowsOf(cohort, "patient");
      const controls = rowsOf(cohort, "control");
      const plantedDs: number[] = [];
      for (const [i, j] of cohort.plantedEdges) {
        const result = ttest2(edgeValues(cohort, i, j, patients, toModel), edgeValues(cohort, i, j, controls, toModel), {
          variance: "unequal",
        });
        expect(Math.sign(result.statistic)).toBe(Math.sign(size));
        expect(result.pValue).toBeLessThan(1e-6);
        plantedDs.push(result.statistic * Math.sqrt(2 / n));
      }
      const meanD = plantedDs.reduce((a, b) => a + b, 0) / plantedDs.length;
      // Tolerance 0.15: about three standard errors of a d estimated from 400 + 400
      // (SE ≈ √(2/400 + d²/1600) ≈ 0.08 per edge; common practice, no source).
      expectClose(meanD, size, { abs: 0.15, label: `mean Cohen's d over planted ${kind} edges`, inputs: { plantedDs } });

      const planted = new Set(cohort.plantedEdges.map(([i, j]) => `${i},${j}`));
      const nullDs: number[] = [];
      for (let i = 0; i < 16; i++) {
        for (let j = i + 1; j < 16; j++) {
          if (planted.has(`${i},${j}`)) continue;
          const a = edgeValues(cohort, i, j, patients, toModel);
          const b = edgeValues(cohort, i, j, controls, toModel);
          if (new Set([...a, ...b]).size < 2) continue; // an absent count edge: zero in everyone
          nullDs.push(ttest2(a, b, { variance: "unequal" }).statistic * Math.sqrt(2 / n));
        }
      }
      const meanNull = nullDs.reduce((x, y) => x + y, 0) / nullDs.length;
      // Tolerance 0.1 on the mean d of unplanted edges (common practice, no source).
      expectClose(meanNull, 0, { abs: 0.1, label: `mean Cohen's d over unplanted ${kind} edges`, inputs: { count: nullDs.length } });
    });
  }

  it("within patients, planted edges rise with severity, so they fall as recall_score rises (size > 0)", () => {
    const cohort = simulate({ regions: 16, patients: 300, controls: 10, effect: { regions: 4, size: 1.2 } }, 4);
    const patients = rowsOf(cohort, "patient");
    const score = patients.map((k) => Number(cohort.participants.rows[k][4]));
    const strength = patients.map((k) => {
      const values = cohort.plantedEdges.map(([i, j]) => Math.atanh(cohort.matrices[k][i * 16 + j]));
      return values.reduce((a, b) => a + b, 0) / values.length;
    });
    const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
    const ms = mean(score);
    const mt = mean(strength);
    const covariance = mean(score.map((s, k) => (s - ms) * (strength[k] - mt)));
    expect(covariance).toBeLessThan(0);
  });
});
