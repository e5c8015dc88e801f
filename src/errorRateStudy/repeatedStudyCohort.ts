import { edgePairs } from "../edges/edgeIndex.js";
import { scanDifferences } from "../edges/scanDifferences.js";
import { changeDesign, mapContrastRow } from "../model/changeDesign.js";
import { parseContrast } from "../model/contrast.js";
import { buildDesignMatrix } from "../model/designMatrix.js";
import { formulaVariables, parseFormula } from "../model/formula.js";
import { personEffectsDesign } from "../model/personEffectsDesign.js";
import { codeVariable, type Variable } from "../model/variables.js";
import { normalSource } from "../simulate/normalSource.js";
import type { StudyCohort } from "./studyCohort.js";

/**
 * A null cohort with several scans per person, for the error-rate study of
 * `repeated:` designs: at every edge, scan value = the person's own level
 * (standard deviation `personSd`, shared by the person's scans: compound
 * symmetry) + scan noise (SD 1); no session or group effect. The cohort is
 * coded as `plexus run` codes it:
 *   - "paired-change": two sessions, the change model's intercept (sign flips);
 *   - "paired-gain": two sessions, group × time with age (Freedman–Lane on the differences);
 *   - "within": three sessions, person effects, session 3 − session 1 (permutation within each person);
 *   - "between": three sessions, group compared by exchanging whole people.
 */
export interface RepeatedStudyOptions {
  kind: "paired-change" | "paired-gain" | "within" | "between";
  people: number;
  regions: number;
  personSd: number;
}

export function repeatedStudyCohort(options: RepeatedStudyOptions, random: () => number): StudyCohort & { wholeBlocks: boolean } {
  const normal = normalSource(random);
  const sessions = options.kind.startsWith("paired") ? ["s1", "s2"] : ["s1", "s2", "s3"];
  const pairs = edgePairs(options.regions);
  const E = pairs.edgeCount;
  const people = options.people;
  const S = people * sessions.length;
  const long = new Float64Array(S * E);
  const person = new Int32Array(S);
  const rows: { session: string; group: string; age: string }[] = [];
  const ages = Array.from({ length: people }, () => String(20 + Math.floor(random() * 50)));
  for (let p = 0; p < people; p++) {
    const own = Array.from({ length: E }, () => options.personSd * normal());
    sessions.forEach((session, k) => {
      const s = p * sessions.length + k;
      person[s] = p;
      rows.push({ session, group: p % 2 === 0 ? "a" : "b", age: ages[p] });
      for (let e = 0; e < E; e++) long[e * S + s] = own[e] + normal();
    });
  }
  const model = options.kind === "paired-gain" ? "session + group + age" : options.kind === "between" ? "session + group" : "session";
  const contrast = options.kind === "paired-gain" || options.kind === "between" ? "group[b] - group[a]" : `session[${sessions[sessions.length - 1]}] - session[s1]`;
  const formula = parseFormula(model);
  const variables = new Map<string, Variable>();
  for (const name of formulaVariables(formula)) {
    variables.set(
      name,
      codeVariable(
        name,
        { values: rows.map((row) => row[name as "session" | "group" | "age"]), lines: rows.map((_, i) => i + 2), file: "simulated" },
        { levels: name === "session" ? sessions : undefined, center: false, levelsKey: { key: "levels" }, centerKey: { key: "center" } },
      ),
    );
  }
  const longMatrix = buildDesignMatrix(formula, variables, S, { key: "model" });
  const onLong = parseContrast("study", contrast, longMatrix, { key: "contrast" });
  const labels = Array.from({ length: people }, (_, p) => `p${p}`);
  if (options.kind.startsWith("paired")) {
    const first = Int32Array.from(labels, (_, p) => p * 2);
    const second = Int32Array.from(labels, (_, p) => p * 2 + 1);
    const fitted = changeDesign(longMatrix, first, second, "session", ["s1", "s2"], { key: "model" });
    const { vector } = mapContrastRow(onLong.vector, fitted.target, fitted.matrix.cols);
    const data = scanDifferences(long, S, E, first, second, new Float64Array(new SharedArrayBuffer(people * E * 8)));
    return { matrix: fitted.matrix, contrast: parseContrast("study", Array.from(vector), fitted.matrix, { key: "contrast" }), data, pairs, planted: new Set(), wholeBlocks: false };
  }
  const data = new Float64Array(new SharedArrayBuffer(S * E * 8));
  data.set(long);
  if (options.kind === "between") return { matrix: longMatrix, contrast: onLong, data, pairs, planted: new Set(), blocks: person, wholeBlocks: true };
  const fitted = personEffectsDesign(longMatrix, person, labels, "person", { key: "model" });
  const { vector } = mapContrastRow(onLong.vector, fitted.target, fitted.matrix.cols);
  return { matrix: fitted.matrix, contrast: parseContrast("study", Array.from(vector), fitted.matrix, { key: "contrast" }), data, pairs, planted: new Set(), blocks: person, wholeBlocks: false };
}
