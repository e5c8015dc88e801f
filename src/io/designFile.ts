import path from "node:path";
import { LineCounter, parseDocument, isMap, isScalar, isSeq, type Node, type Pair } from "yaml";
import { InputError } from "../errors.js";
import { nearestName } from "./nearestName.js";
import { DEFAULT_MISSING_VALUES } from "./participants.js";
import { DESIGN_FILE_LIMIT_BYTES, readTextInput } from "./readInputFile.js";
import type { BlockPermutation, FdrVariant, InferenceMethod, InferenceSpec, Scheme, SizeMeasure, Tail } from "../common/inferenceOptions.js";


export interface ContrastSpec {
  name: string;
  /**
   * An expression such as `group[patient] - group[control]`, a numeric vector
   * over the design columns, or a list of rows (expressions or vectors) for an F contrast.
   */
  expression: string | number[] | (string | number[])[];
  /** Design key, e.g. `contrasts.patient_gt_control`, and its line, for errors. */
  key: string;
  line?: number;
}

/** A design file read and checked for shape; columns and files are checked later against the data. */
export interface DesignSpec {
  file: string;
  baseDir: string;
  subjects: string;
  connectomes: string;
  regions?: string;
  model: string;
  /** Cell texts of the participants table read as missing (`missing_values`). */
  missingValues: string[];
  levels: Record<string, string[]>;
  center: string[];
  contrasts: ContrastSpec[];
  transform: "none" | "fisher-z";
  symmetrize: boolean;
  asymmetryTolerance: number;
  inference: InferenceSpec;
  /** 1-based line of each key path (`inference.threshold`), for located errors later. */
  lines: Map<string, number>;
}

const TOP_KEYS = [
  "subjects",
  "connectomes",
  "regions",
  "model",
  "missing_values",
  "levels",
  "center",
  "contrasts",
  "transform",
  "symmetrize",
  "asymmetry_tolerance",
  "inference",
] as const;
const INFERENCE_KEYS = [
  "method",
  "threshold",
  "size",
  "permutations",
  "seed",
  "alpha",
  "blocks",
  "block_permutation",
  "tail",
  "fdr",
  "scheme",
  "enhancement",
] as const;
const ENHANCEMENT_KEYS = ["extent_exponent", "height_exponent", "step"] as const;

/** At most this many missing-value codes, each at most this many characters. */
export const MISSING_VALUES_LIMIT = 100;
export const MISSING_VALUE_LENGTH_LIMIT = 100;
/** At most this many thresholds in a sweep. */
export const THRESHOLD_LIST_LIMIT = 20;
/** At most this many permutations. */
export const PERMUTATIONS_LIMIT = 10_000_000;
/** At most this many contrasts (each has its own permutations). */
export const CONTRASTS_LIMIT = 1000;
/** At most this many levels listed for one factor. */
export const LEVELS_LIMIT = 10_000;

export const DEFAULT_INFERENCE: InferenceSpec = {
  method: "components",
  thresholds: [3],
  enhancement: { extentExponent: 0.5, heightExponent: 2, step: 0.1 },
  size: "extent",
  permutations: 5000,
  seed: 1,
  alpha: 0.05,
  blockPermutation: "within",
  tail: "upper",
  fdr: "bh",
  scheme: "auto",
};


/** Reads a design file from disk; see `parseDesign`. */
export function readDesign(file: string): DesignSpec {
  return parseDesign(
    readTextInput(file, { limitBytes: DESIGN_FILE_LIMIT_BYTES, what: "the design file", hint: "check the design file's path (relative to the current folder)" }),
    file,
  );
}

/** Parses design-file YAML (1.2 core schema, no custom tags) into a checked DesignSpec. */
export function parseDesign(text: string, file: string): DesignSpec {
  const lineCounter = new LineCounter();
  const source = text.replace(/^\uFEFF/, "");
  const doc = parseDocument(source, {
    lineCounter,
    version: "1.2",
    schema: "core",
    customTags: [],
    resolveKnownTags: false, // else YAML 1.1 tags (!!binary, !!set, !!omap, !!timestamp) still resolve under the core schema
    uniqueKeys: true,
    prettyErrors: false,
  });
  const lineAt = (offset: number | undefined) => (offset === undefined ? undefined : lineCounter.linePos(offset).line);
  const problem = doc.errors[0];
  if (problem) {
    throw new InputError(`not valid YAML: ${problem.message.split("\n")[0]}`, {
      file,
      line: lineAt(problem.pos[0]),
    });
  }
  if (doc.warnings.length > 0 && doc.warnings.some((w) => w.code === "TAG_RESOLVE_FAILED")) {
    throw new InputError("custom YAML tags are not allowed in a design file", { file, line: lineAt(doc.warnings[0].pos[0]) });
  }
  const root = doc.contents;
  if (!isMap(root)) {
    throw new InputError("a design file is a YAML mapping of keys (subjects, connectomes, model, contrasts, …)", {
      file,
      line: 1,
    });
  }
  const lines = new Map<string, number>();
  /** A value as the file writes it (so `1e400` is shown as written, not as Infinity). */
  const written = (node: Node | null | undefined): string => {
    const range = node?.range;
    return range ? source.slice(range[0], range[1]).trim() : String(node ? node.toJSON() : node);
  };
  const where = (key: string) => ({ file, key, line: lines.get(key) });

  const checkKeys = (pairs: Pair[], allowed: readonly string[], prefix: string) => {
    const out = new Map<string, Node | null>();
    for (const pair of pairs) {
      const keyNode = pair.key as Node | null;
      const name = isScalar(keyNode) ? String(keyNode.value) : String(keyNode);
      const line = lineAt(keyNode?.range?.[0]);
      const full = prefix ? `${prefix}.${name}` : name;
      if (line !== undefined) lines.set(full, line);
      if (!allowed.includes(name)) {
        const near = nearestName(name, allowed);
        throw new InputError(
          `unknown key '${full}'`,
          { file, line, key: full },
          near ? `did you mean '${prefix ? `${prefix}.` : ""}${near}'?` : `valid keys: ${allowed.join(", ")}`,
        );
      }
      out.set(name, (pair.value as Node | null) ?? null);
    }
    return out;
  };

  const top = checkKeys(root.items as Pair[], TOP_KEYS, "");
  const plain = (name: string): unknown => {
    const node = top.get(name);
    return node === undefined || node === null ? undefined : (node as Node).toJSON();
  };
  const requireString = (name: string): string => {
    const value = plain(name);
    if (value === undefined) throw new InputError(`the design needs '${name}'`, { file, key: name });
    if (typeof value !== "string" || value.trim() === "") {
      throw new InputError(`'${name}' must be a text value`, where(name));
    }
    return value.trim();
  };
  const optionalString = (name: string): string | undefined =>
    plain(name) === undefined ? undefined : requireString(name);

  // Contrasts: a mapping name -> expression or numeric vector.
  const contrasts: ContrastSpec[] = [];
  const contrastNode = top.get("contrasts");
  if (contrastNode === undefined || contrastNode === null) {
    throw new InputError("the design needs at least one contrast under 'contrasts'", { file, key: "contrasts" });
  }
  if (!isMap(contrastNode)) throw new InputError("'contrasts' must map names to contrasts", where("contrasts"));
  for (const pair of contrastNode.items as Pair[]) {
    const keyNode = pair.key as Node;
    const name = isScalar(keyNode) ? String(keyNode.value) : String(keyNode);
    const key = `contrasts.${name}`;
    const line = lineAt(keyNode.range?.[0]);
    if (line !== undefined) lines.set(key, line);
    if (!/^[A-Za-z0-9][A-Za-z0-9_.-]*$/.test(name) || name.length > 100) {
      throw new InputError(
        `contrast name '${name}' is not usable as a folder name`,
        { file, line, key },
        "use letters, digits, '_', '-' and '.', starting with a letter or digit",
      );
    }
    const valueNode = pair.value as Node | null;
    let expression: ContrastSpec["expression"];
    if (isSeq(valueNode)) {
      const values = valueNode.toJSON() as unknown[];
      const isVector = (v: unknown): v is number[] =>
        Array.isArray(v) && v.length > 0 && v.every((x) => typeof x === "number" && Number.isFinite(x));
      if (values.length > 0 && values.every((v) => typeof v === "number" && Number.isFinite(v))) {
        expression = values as number[];
      } else if (values.length > 0 && values.every((v) => isVector(v) || (typeof v === "string" && v.trim() !== ""))) {
        expression = values as (string | number[])[];
      } else {
        throw new InputError(
          "a contrast list is either one vector of finite numbers (one per design column) or a list of rows (expressions or vectors) for an F contrast",
          { file, line, key },
        );
      }
    } else if (isScalar(valueNode) && (typeof valueNode.value === "string" || typeof valueNode.value === "number")) {
      expression = String(valueNode.value);
    } else {
      throw new InputError("a contrast is an expression such as `group[patient] - group[control]` or a list of numbers", {
        file,
        line,
        key,
      });
    }
    contrasts.push({ name, expression, key, line });
  }
  if (contrasts.length === 0) throw new InputError("'contrasts' lists no contrast", where("contrasts"));
  if (contrasts.length > CONTRASTS_LIMIT) {
    throw new InputError(`'contrasts' lists ${contrasts.length} contrasts, more than the limit of ${CONTRASTS_LIMIT}`, where("contrasts"));
  }
  const lowerNames = new Set<string>();
  for (const c of contrasts) {
    const lower = c.name.toLowerCase();
    if (lowerNames.has(lower)) {
      throw new InputError(`two contrasts differ only in letter case ('${c.name}'); their folders would collide`, {
        file,
        key: c.key,
        line: c.line,
      });
    }
    lowerNames.add(lower);
  }

  // missing_values: [text, ...], or one text; numbers are taken as written (-999, 99.0)
  let missingValues = [...DEFAULT_MISSING_VALUES];
  const missingNode = top.get("missing_values");
  if (missingNode !== undefined && missingNode !== null) {
    const entry = (node: unknown): string | undefined => {
      if (!isScalar(node)) return undefined;
      if (typeof node.value === "string") return node.value;
      if (typeof node.value === "number") return written(node);
      return undefined;
    };
    const list = isSeq(missingNode) ? missingNode.items.map(entry) : [entry(missingNode)];
    if (
      list.length > MISSING_VALUES_LIMIT ||
      !list.every((v): v is string => typeof v === "string" && v.length <= MISSING_VALUE_LENGTH_LIMIT && v === v.trim() && !/[\t\r\n]/.test(v))
    ) {
      throw new InputError(
        `'missing_values' lists the cell texts read as missing: up to ${MISSING_VALUES_LIMIT} texts or numbers without tabs or surrounding spaces, each up to ${MISSING_VALUE_LENGTH_LIMIT} characters`,
        where("missing_values"),
        `e.g. missing_values: [n/a, NA, -999] (it replaces the default list [${DEFAULT_MISSING_VALUES.map((v) => JSON.stringify(v)).join(", ")}]; an empty cell is always missing)`,
      );
    }
    missingValues = [...new Set(list as string[])];
  }

  // levels: { factor: [level, ...] }
  const levels: Record<string, string[]> = {};
  const levelsValue = plain("levels");
  if (levelsValue !== undefined) {
    if (typeof levelsValue !== "object" || levelsValue === null || Array.isArray(levelsValue)) {
      throw new InputError("'levels' maps a factor column to its level order, e.g. { group: [control, patient] }", where("levels"));
    }
    for (const [factor, list] of Object.entries(levelsValue)) {
      if (
        !Array.isArray(list) ||
        list.length < 2 ||
        list.length > LEVELS_LIMIT ||
        !list.every((v) => typeof v === "string" || (typeof v === "number" && Number.isFinite(v)))
      ) {
        throw new InputError(`levels of '${factor}' must be a list of at least two level names (at most ${LEVELS_LIMIT.toLocaleString("en-US")}; texts or finite numbers)`, where("levels"));
      }
      const names = list.map(String);
      if (new Set(names).size !== names.length) {
        throw new InputError(`levels of '${factor}' repeat a level`, where("levels"));
      }
      levels[factor] = names;
    }
  }

  const centerValue = plain("center");
  let center: string[] = [];
  if (centerValue !== undefined) {
    if (typeof centerValue === "string") center = [centerValue];
    else if (Array.isArray(centerValue) && centerValue.every((v) => typeof v === "string")) center = centerValue as string[];
    else throw new InputError("'center' lists numeric columns to centre, e.g. [age]", where("center"));
  }

  const transformValue = plain("transform") ?? "none";
  if (transformValue !== "none" && transformValue !== "fisher-z") {
    throw new InputError(`'transform' must be none or fisher-z, found '${String(transformValue)}'`, where("transform"));
  }
  const symmetrize = plain("symmetrize") ?? false;
  if (typeof symmetrize !== "boolean") throw new InputError("'symmetrize' must be true or false", where("symmetrize"));
  const tolerance = plain("asymmetry_tolerance") ?? 1e-6;
  if (typeof tolerance !== "number" || !Number.isFinite(tolerance) || !(tolerance >= 0)) {
    throw new InputError(`'asymmetry_tolerance' must be a finite number ≥ 0; found '${written(top.get("asymmetry_tolerance"))}'`, where("asymmetry_tolerance"));
  }

  // inference
  const inference: InferenceSpec = { ...DEFAULT_INFERENCE };
  const inferenceNode = top.get("inference");
  if (inferenceNode !== undefined && inferenceNode !== null) {
    if (!isMap(inferenceNode)) throw new InputError("'inference' must be a mapping of options", where("inference"));
    const opts = checkKeys(inferenceNode.items as Pair[], INFERENCE_KEYS, "inference");
    const get = (name: string): unknown => {
      const node = opts.get(name);
      return node === undefined || node === null ? undefined : (node as Node).toJSON();
    };
    const choice = <T extends string>(name: string, allowed: readonly T[]): T | undefined => {
      const value = get(name);
      if (value === undefined) return undefined;
      if (typeof value !== "string" || !allowed.includes(value as T)) {
        throw new InputError(`'inference.${name}' must be one of ${allowed.join(", ")}; found '${String(value)}'`, where(`inference.${name}`));
      }
      return value as T;
    };
    const number = (name: string, check: (v: number) => boolean, rule: string): number | undefined => {
      const value = get(name);
      if (value === undefined) return undefined;
      if (typeof value !== "number" || !Number.isFinite(value) || !check(value)) {
        throw new InputError(`'inference.${name}' must be ${rule}; found '${written(opts.get(name))}'`, where(`inference.${name}`));
      }
      return value;
    };
    inference.method = choice("method", ["components", "fdr", "max-t", "threshold-free"] as const) ?? inference.method;
    inference.size = choice("size", ["extent", "mass"] as const) ?? inference.size;
    inference.tail = choice("tail", ["upper", "lower", "both"] as const) ?? inference.tail;
    inference.fdr = choice("fdr", ["bh", "by"] as const) ?? inference.fdr;
    inference.scheme = choice("scheme", ["auto", "permute", "sign-flip"] as const) ?? inference.scheme;
    inference.blockPermutation = choice("block_permutation", ["within", "whole"] as const) ?? inference.blockPermutation;
    const thresholdValue = get("threshold");
    if (Array.isArray(thresholdValue)) {
      if (
        thresholdValue.length === 0 ||
        thresholdValue.length > THRESHOLD_LIST_LIMIT ||
        !thresholdValue.every((v) => typeof v === "number" && Number.isFinite(v) && v > 0) ||
        new Set(thresholdValue).size !== thresholdValue.length
      ) {
        throw new InputError(
          `'inference.threshold' as a list needs 1 to ${THRESHOLD_LIST_LIMIT} different positive finite numbers, e.g. [2.5, 3.0, 3.5]`,
          where("inference.threshold"),
        );
      }
      inference.thresholds = thresholdValue as number[];
    } else {
      inference.thresholds = [
        number("threshold", (v) => v > 0, "a positive number (the primary threshold on the statistic), or a list of them") ?? inference.thresholds[0],
      ];
    }
    const enhancementNode = opts.get("enhancement");
    if (enhancementNode !== undefined && enhancementNode !== null) {
      if (!isMap(enhancementNode)) throw new InputError("'inference.enhancement' must be a mapping", where("inference.enhancement"));
      const parameters = checkKeys(enhancementNode.items as Pair[], ENHANCEMENT_KEYS, "inference.enhancement");
      const read = (name: string, fallback: number, check: (v: number) => boolean, rule: string) => {
        const node = parameters.get(name);
        if (node === undefined || node === null) return fallback;
        const value = (node as Node).toJSON();
        if (typeof value !== "number" || !Number.isFinite(value) || !check(value)) {
          throw new InputError(`'inference.enhancement.${name}' must be ${rule}; found '${written(node)}'`, where(`inference.enhancement.${name}`));
        }
        return value;
      };
      inference.enhancement = {
        extentExponent: read("extent_exponent", inference.enhancement.extentExponent, (v) => v > 0 && v <= 10, "a number in (0, 10]"),
        heightExponent: read("height_exponent", inference.enhancement.heightExponent, (v) => v >= 0 && v <= 10, "a number in [0, 10]"),
        step: read("step", inference.enhancement.step, (v) => v > 0 && v <= 1, "a number in (0, 1]"),
      };
    }
    inference.alpha = number("alpha", (v) => v > 0 && v < 1, "between 0 and 1 (exclusive)") ?? inference.alpha;
    inference.permutations =
      number("permutations", (v) => Number.isInteger(v) && v >= 1 && v <= PERMUTATIONS_LIMIT, `a whole number from 1 to ${PERMUTATIONS_LIMIT.toLocaleString("en-US")}`) ??
      inference.permutations;
    inference.seed = number("seed", (v) => Number.isInteger(v) && v >= 0 && v <= Number.MAX_SAFE_INTEGER, "a whole number ≥ 0") ?? inference.seed;
    const blocks = get("blocks");
    if (blocks !== undefined) {
      if (typeof blocks !== "string" || blocks.trim() === "") {
        throw new InputError("'inference.blocks' names a column of the participants table", where("inference.blocks"));
      }
      inference.blocks = blocks.trim();
    }
  }

  const design: DesignSpec = {
    file,
    baseDir: path.dirname(path.resolve(file)),
    subjects: requireString("subjects"),
    connectomes: requireString("connectomes"),
    regions: optionalString("regions"),
    missingValues,
    model: (() => {
      const value = plain("model");
      if (value === undefined) throw new InputError("the design needs 'model', e.g. `model: group + age + sex`", { file, key: "model" });
      if (typeof value === "number") return String(value);
      return requireString("model");
    })(),
    levels,
    center,
    contrasts,
    transform: transformValue,
    symmetrize,
    asymmetryTolerance: tolerance,
    inference,
    lines,
  };
  return design;
}

/** The location of a design key, for errors raised after parsing. */
export function designKeyLocation(design: DesignSpec, key: string) {
  return { file: design.file, key, line: design.lines.get(key) };
}
