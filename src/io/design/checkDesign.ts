import { isMap, isScalar, isSeq } from "yaml";
import type { BlockPermutation, EnhancementSpec, FdrVariant, InferenceMethod, Scheme, SizeMeasure, Tail } from "../../common/inferenceOptions.js";
import { InputError } from "../../errors.js";
import { checkContrasts } from "./checkContrasts.js";
import { checkCohortTable, checkSelect } from "./checkSelection.js";
import { DesignSection } from "./designSection.js";
import { CONNECTOMES_KEYS, DESIGN_KEYS, EDGES_KEYS, ENHANCEMENT_KEYS, INFERENCE_KEYS, REPEATED_KEYS } from "./designKeys.js";
import type { CohortTableSpec, ContrastSpec, EdgeRulesSpec, RepeatedSpec, SelectionSpec } from "./designSpec.js";
import type { DesignYaml } from "./designYaml.js";

/** The inference options the file sets, each checked; an absent one is undefined (resolveDesign.ts fills it). */
export interface CheckedInference {
  method?: InferenceMethod;
  size?: SizeMeasure;
  tail?: Tail;
  fdr?: FdrVariant;
  scheme?: Scheme;
  blockPermutation?: BlockPermutation;
  thresholds?: number[];
  enhancement?: Partial<EnhancementSpec>;
  alpha?: number;
  permutations?: number;
  seed?: number;
  blocks?: string;
  acrossContrasts?: boolean;
}

/** The keys the file sets, each checked by its rule; an absent optional key is undefined. */
export interface CheckedDesign {
  contrasts: ContrastSpec[];
  missingValues?: string[];
  levels?: Record<string, string[]>;
  center?: string[];
  select?: SelectionSpec[];
  cohortTable?: CohortTableSpec;
  transform?: "none" | "fisher-z" | "log1p";
  scale?: "none" | "total";
  edges?: EdgeRulesSpec;
  symmetrize?: boolean;
  asymmetryTolerance?: number;
  inference?: CheckedInference;
  subjects: string;
  connectomes: string;
  connectomeVariable?: string;
  subjectsAxis?: "first" | "last";
  regions?: string;
  model: string;
  repeated?: RepeatedSpec;
}

/**
 * Checks every key of a design file against its rule (designKeys.ts has the table),
 * raising the first problem as an InputError at the key and its line. The keys are
 * checked in this order (so a file with several problems reports the same one first):
 * unknown keys, contrasts, missing_values, levels, center, select, cohort_table, transform, scale, edges, symmetrize,
 * asymmetry_tolerance, inference, then subjects, connectomes, regions, model and repeated.
 */
export function checkDesign(yaml: DesignYaml): CheckedDesign {
  const top = new DesignSection(yaml, yaml.root, DESIGN_KEYS, "");
  const contrasts = checkContrasts(top);
  const missingValues = checkMissingValues(top);
  const levels = checkLevels(top);
  const center = checkCenter(top);
  const select = checkSelect(top);
  const cohortTable = checkCohortTable(top);
  const transform = checkTransform(top);
  const scale = checkChoice(top, "scale", DESIGN_KEYS.scale);
  const edges = checkEdges(top);
  const symmetrize = checkSymmetrize(top);
  const asymmetryTolerance = checkNumber(top, "asymmetry_tolerance", DESIGN_KEYS.asymmetry_tolerance);
  const inference = checkInference(top);
  const subjects = checkText(top, "subjects");
  const { path: connectomes, variable: connectomeVariable, subjectsAxis } = checkConnectomes(top);
  const regions = top.value("regions") === undefined ? undefined : checkText(top, "regions");
  const model = checkModel(top);
  const repeated = checkRepeated(top);
  return { contrasts, missingValues, levels, center, select, cohortTable, transform, ...(scale !== undefined ? { scale } : {}), ...(edges ? { edges } : {}), symmetrize, asymmetryTolerance, inference, subjects, connectomes, connectomeVariable, subjectsAxis, regions, model, ...(repeated ? { repeated } : {}) };
}

/** repeated: { participant: <column>, within: <column> }, two different column names. */
function checkRepeated(top: DesignSection): RepeatedSpec | undefined {
  const node = top.node("repeated");
  if (node === undefined) return undefined;
  const example = "e.g. `repeated: { participant: person, within: session }` (one row per scan)";
  if (!isMap(node)) throw new InputError("'repeated' must be a mapping naming the person's column and the within-person factor", top.where("repeated"), example);
  const section = new DesignSection(top.yaml, node, REPEATED_KEYS, "repeated");
  const column = (name: "participant" | "within"): string => {
    const value = section.value(name);
    if (value === undefined) throw new InputError(`'repeated' needs '${name}'`, top.where("repeated"), example);
    if (typeof value !== "string" || value.trim() === "") {
      throw new InputError(`'repeated.${name}' names a column of the participants table`, section.where(name), example);
    }
    return value.trim();
  };
  const participant = column("participant");
  const within = column("within");
  if (participant === within) {
    throw new InputError("'repeated.participant' and 'repeated.within' name the same column", section.where("within"), example);
  }
  return { participant, within };
}

/** connectomes: a path or template, or { path, variable, subjects_axis }. */
function checkConnectomes(top: DesignSection): { path: string; variable?: string; subjectsAxis?: "first" | "last" } {
  const node = top.node("connectomes");
  if (node === undefined || !isMap(node)) return { path: checkText(top, "connectomes") };
  const section = new DesignSection(top.yaml, node, CONNECTOMES_KEYS, "connectomes");
  const path = checkText(section, "path");
  const variable = section.value("variable") === undefined ? undefined : checkText(section, "variable");
  const subjectsAxis = checkChoice(section, "subjects_axis", CONNECTOMES_KEYS.subjects_axis);
  return { path, ...(variable !== undefined ? { variable } : {}), ...(subjectsAxis !== undefined ? { subjectsAxis } : {}) };
}

/** A number key: a finite number passing the table's test. */
function checkNumber(
  section: DesignSection,
  name: string,
  key: { test: (value: number) => boolean; rule: string; nullIsDefault?: boolean },
): number | undefined {
  const value = section.value(name);
  if (value === undefined || (value === null && key.nullIsDefault)) return undefined;
  if (typeof value !== "number" || !Number.isFinite(value) || !key.test(value)) {
    throw new InputError(`'${section.path(name)}' must be ${key.rule}; found '${section.yaml.written(section.node(name))}'`, section.where(name));
  }
  return value;
}

/** A choice: one of the table's words (a YAML null is the default where the key table says `nullIsDefault`). */
function checkChoice<T extends string>(section: DesignSection, name: string, key: { allowed: readonly T[]; nullIsDefault?: boolean }): T | undefined {
  const value = section.value(name);
  if (value === undefined || (value === null && key.nullIsDefault)) return undefined;
  if (typeof value !== "string" || !key.allowed.includes(value as T)) {
    throw new InputError(`'${section.path(name)}' must be one of ${key.allowed.join(", ")}; found '${String(value)}'`, section.where(name));
  }
  return value as T;
}

/** subjects, connectomes, regions, connectomes.path, connectomes.variable: a text that is not blank (trimmed). */
function checkText(top: DesignSection, name: string): string {
  const value = top.value(name);
  if (value === undefined) throw new InputError(`the design needs '${top.path(name)}'`, { file: top.yaml.file, key: top.path(name) });
  if (typeof value !== "string" || value.trim() === "") {
    throw new InputError(`'${top.path(name)}' must be a text value`, top.where(name));
  }
  return value.trim();
}

/** model: a formula; the number 1 (an intercept-only model) is read as the text "1". */
function checkModel(top: DesignSection): string {
  const value = top.value("model");
  if (value === undefined) throw new InputError("the design needs 'model', e.g. `model: group + age + sex`", { file: top.yaml.file, key: "model" });
  if (typeof value === "number") return String(value);
  return checkText(top, "model");
}

/** missing_values: [text, ...], or one text; numbers are taken as written (-999, 99.0). */
function checkMissingValues(top: DesignSection): string[] | undefined {
  const node = top.node("missing_values");
  if (node === undefined) return undefined;
  const { written } = top.yaml;
  const { limit, lengthLimit, default: defaults } = DESIGN_KEYS.missing_values;
  const entry = (item: unknown): string | undefined => {
    if (!isScalar(item)) return undefined;
    if (typeof item.value === "string") return item.value;
    if (typeof item.value === "number") return written(item);
    return undefined;
  };
  const list = isSeq(node) ? node.items.map(entry) : [entry(node)];
  if (
    list.length > limit ||
    !list.every((v): v is string => typeof v === "string" && v.length <= lengthLimit && v === v.trim() && !/[\t\r\n]/.test(v))
  ) {
    throw new InputError(
      `'missing_values' lists the cell texts read as missing: up to ${limit} texts or numbers without tabs or surrounding spaces, each up to ${lengthLimit} characters`,
      top.where("missing_values"),
      `e.g. missing_values: [n/a, NA, -999] (it replaces the default list [${defaults.map((v) => JSON.stringify(v)).join(", ")}]; an empty cell is always missing)`,
    );
  }
  return [...new Set(list as string[])];
}

/** levels: { factor: [level, ...] }, at least two different levels each (numbers kept as text). */
function checkLevels(top: DesignSection): Record<string, string[]> | undefined {
  const value = top.value("levels");
  if (value === undefined) return undefined;
  if (typeof value !== "object" || value === null || Array.isArray(value)) {
    throw new InputError("'levels' maps a factor column to its level order, e.g. { group: [control, patient] }", top.where("levels"));
  }
  const limit = DESIGN_KEYS.levels.limit;
  const levels: Record<string, string[]> = {};
  for (const [factor, list] of Object.entries(value)) {
    if (
      !Array.isArray(list) ||
      list.length < 2 ||
      list.length > limit ||
      !list.every((v) => typeof v === "string" || (typeof v === "number" && Number.isFinite(v)))
    ) {
      throw new InputError(
        `levels of '${factor}' must be a list of at least two level names (at most ${limit.toLocaleString("en-US")}; texts or finite numbers)`,
        top.where("levels"),
      );
    }
    const names = list.map(String);
    if (new Set(names).size !== names.length) {
      throw new InputError(`levels of '${factor}' repeat a level`, top.where("levels"));
    }
    levels[factor] = names;
  }
  return levels;
}

/** center: one column name or a list of them. */
function checkCenter(top: DesignSection): string[] | undefined {
  const value = top.value("center");
  if (value === undefined) return undefined;
  if (typeof value === "string") return [value];
  if (Array.isArray(value) && value.every((v) => typeof v === "string")) return value as string[];
  throw new InputError("'center' lists numeric columns to centre, e.g. [age]", top.where("center"));
}

/** transform: none, fisher-z or log1p. */
function checkTransform(top: DesignSection): "none" | "fisher-z" | "log1p" | undefined {
  const value = top.value("transform");
  const { allowed, nullIsDefault } = DESIGN_KEYS.transform;
  if (value === undefined || (value === null && nullIsDefault)) return undefined;
  if (!allowed.includes(value as (typeof allowed)[number])) {
    throw new InputError(`'transform' must be ${allowed.slice(0, -1).join(", ")} or ${allowed[allowed.length - 1]}, found '${String(value)}'`, top.where("transform"));
  }
  return value as (typeof allowed)[number];
}

/** edges: { missing: error | drop, present_in: a fraction in (0, 1] }. */
function checkEdges(top: DesignSection): EdgeRulesSpec | undefined {
  const node = top.node("edges");
  if (node === undefined) return undefined;
  if (!isMap(node)) {
    throw new InputError("'edges' must be a mapping of coverage rules", top.where("edges"), "e.g. edges: { missing: drop, present_in: 0.75 }");
  }
  const section = new DesignSection(top.yaml, node, EDGES_KEYS, "edges");
  const missing = checkChoice(section, "missing", EDGES_KEYS.missing) ?? EDGES_KEYS.missing.default;
  const value = section.value("present_in");
  if (value === undefined) return { missing };
  if (typeof value !== "number" || !Number.isFinite(value) || !(value > 0 && value <= 1)) {
    throw new InputError(
      `'edges.present_in' must be a fraction in (0, 1]; found '${section.yaml.written(section.node("present_in"))}'`,
      section.where("present_in"),
      "e.g. present_in: 0.75 keeps the edges non-zero in at least 75% of the analysed participants",
    );
  }
  return { missing, presentIn: value };
}

/** symmetrize: true or false. */
function checkSymmetrize(top: DesignSection): boolean | undefined {
  const value = top.value("symmetrize");
  if (value === undefined || (value === null && DESIGN_KEYS.symmetrize.nullIsDefault)) return undefined;
  if (typeof value !== "boolean") throw new InputError("'symmetrize' must be true or false", top.where("symmetrize"));
  return value;
}

/** inference: a mapping of the options in INFERENCE_KEYS. */
function checkInference(top: DesignSection): CheckedInference | undefined {
  const node = top.node("inference");
  if (node === undefined) return undefined;
  if (!isMap(node)) throw new InputError("'inference' must be a mapping of options", top.where("inference"));
  const section = new DesignSection(top.yaml, node, INFERENCE_KEYS, "inference");
  const checked: CheckedInference = {
    method: checkChoice(section, "method", INFERENCE_KEYS.method),
    size: checkChoice(section, "size", INFERENCE_KEYS.size),
    tail: checkChoice(section, "tail", INFERENCE_KEYS.tail),
    fdr: checkChoice(section, "fdr", INFERENCE_KEYS.fdr),
    scheme: checkChoice(section, "scheme", INFERENCE_KEYS.scheme),
    blockPermutation: checkChoice(section, "block_permutation", INFERENCE_KEYS.block_permutation),
    thresholds: checkThresholds(section),
    enhancement: checkEnhancement(section),
    alpha: checkNumber(section, "alpha", INFERENCE_KEYS.alpha),
    permutations: checkNumber(section, "permutations", INFERENCE_KEYS.permutations),
    seed: checkNumber(section, "seed", INFERENCE_KEYS.seed),
    blocks: checkBlocks(section),
    acrossContrasts: checkAcrossContrasts(section),
  };
  return checked;
}

/** inference.across_contrasts: true or false. */
function checkAcrossContrasts(section: DesignSection): boolean | undefined {
  const value = section.value("across_contrasts");
  if (value === undefined || (value === null && INFERENCE_KEYS.across_contrasts.nullIsDefault)) return undefined;
  if (typeof value !== "boolean") throw new InputError("'inference.across_contrasts' must be true or false", section.where("across_contrasts"));
  return value;
}

/** inference.threshold: one positive number, or a sweep of different ones (the first is the primary). */
function checkThresholds(section: DesignSection): number[] | undefined {
  const value = section.value("threshold");
  const key = INFERENCE_KEYS.threshold;
  if (Array.isArray(value)) {
    if (
      value.length === 0 ||
      value.length > key.limit ||
      !value.every((v) => typeof v === "number" && Number.isFinite(v) && key.test(v)) ||
      new Set(value).size !== value.length
    ) {
      throw new InputError(
        `'inference.threshold' as a list needs 1 to ${key.limit} different positive finite numbers, e.g. [2.5, 3.0, 3.5]`,
        section.where("threshold"),
      );
    }
    return value as number[];
  }
  const one = checkNumber(section, "threshold", key);
  return one === undefined ? undefined : [one];
}

/** inference.enhancement: a mapping of the parameters in ENHANCEMENT_KEYS. */
function checkEnhancement(inference: DesignSection): Partial<EnhancementSpec> | undefined {
  const node = inference.node("enhancement");
  if (node === undefined) return undefined;
  if (!isMap(node)) throw new InputError("'inference.enhancement' must be a mapping", inference.where("enhancement"));
  const section = new DesignSection(inference.yaml, node, ENHANCEMENT_KEYS, "inference.enhancement");
  return {
    extentExponent: checkNumber(section, "extent_exponent", ENHANCEMENT_KEYS.extent_exponent),
    heightExponent: checkNumber(section, "height_exponent", ENHANCEMENT_KEYS.height_exponent),
    step: checkNumber(section, "step", ENHANCEMENT_KEYS.step),
  };
}

/** inference.blocks: a column of the participants table (trimmed). */
function checkBlocks(section: DesignSection): string | undefined {
  const value = section.value("blocks");
  if (value === undefined) return undefined;
  if (typeof value !== "string" || value.trim() === "") {
    throw new InputError("'inference.blocks' names a column of the participants table", section.where("blocks"));
  }
  return value.trim();
}
