import { edgePairs, type EdgePairs } from "../edges/edgeIndex.js";
import { parseContrast, type Contrast } from "../model/contrast.js";
import { buildDesignMatrix, type DesignMatrix } from "../model/designMatrix.js";
import { formulaVariables, parseFormula } from "../model/formula.js";
import { codeVariable, type Variable } from "../model/variables.js";
import { simulateCohort, type SimulationOptions } from "../simulate/simulateCohort.js";

/** A simulated cohort held in memory, ready for the model: no files are written. */
export interface StudyCohort {
  matrix: DesignMatrix;
  contrast: Contrast;
  /** Edge-major data, data[e·S + s] (Fisher z for correlation cohorts). */
  data: Float64Array;
  pairs: EdgePairs;
  /** Edge indices of the planted effect. */
  planted: Set<number>;
  /** Exchangeability blocks from the `site` column, when present. */
  blocks?: Int32Array;
}

export interface StudyDesign {
  model: string;
  contrast: string;
  levels?: Record<string, string[]>;
}

/** Builds one cohort from the simulator and codes it with the same model code as `plexus run`. */
export function studyCohort(simulation: SimulationOptions, design: StudyDesign, random: () => number): StudyCohort {
  const cohort = simulateCohort(simulation, random);
  const { header, rows } = cohort.participants;
  const formula = parseFormula(design.model);
  const variables = new Map<string, Variable>();
  for (const name of formulaVariables(formula)) {
    const column = header.indexOf(name);
    variables.set(
      name,
      codeVariable(
        name,
        { values: rows.map((row) => row[column]), lines: rows.map((_, i) => i + 2), file: "simulated" },
        { levels: design.levels?.[name], center: false, levelsKey: { key: "levels" }, centerKey: { key: "center" } },
      ),
    );
  }
  const matrix = buildDesignMatrix(formula, variables, rows.length, { key: "model" });
  const contrast = parseContrast("study", design.contrast, matrix, { key: "contrast" });
  const n = simulation.regions;
  const pairs = edgePairs(n);
  const S = rows.length;
  const data = new Float64Array(new SharedArrayBuffer(S * pairs.edgeCount * 8));
  cohort.matrices.forEach((m, s) => {
    for (let e = 0; e < pairs.edgeCount; e++) {
      const value = m[pairs.regionA[e] * n + pairs.regionB[e]];
      data[e * S + s] = simulation.kind === "correlation" ? Math.atanh(value) : Math.log1p(value);
    }
  });
  const planted = new Set(cohort.plantedEdges.map(([i, j]) => pairs.regionA.findIndex((a, e) => a === i && pairs.regionB[e] === j)));
  const siteColumn = header.indexOf("site");
  let blocks: Int32Array | undefined;
  if (siteColumn >= 0) {
    const sites = rows.map((row) => row[siteColumn]);
    const labels = [...new Set(sites)];
    blocks = Int32Array.from(sites, (site) => labels.indexOf(site));
  }
  return { matrix, contrast, data, pairs, planted, blocks };
}
