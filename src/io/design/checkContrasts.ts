import { isMap, isScalar, isSeq, type Node, type Pair } from "yaml";
import { InputError } from "../../errors.js";
import { DESIGN_KEYS } from "./designKeys.js";
import type { DesignSection } from "./designSection.js";
import type { ContrastSpec } from "./designSpec.js";
import { keyName } from "./designYaml.js";

/** `contrasts`: a mapping of folder-safe names to an expression, a vector, or rows of an F contrast. */
export function checkContrasts(top: DesignSection): ContrastSpec[] {
  const { file, lineOf } = top.yaml;
  const contrasts: ContrastSpec[] = [];
  const contrastNode = top.node("contrasts");
  if (contrastNode === undefined) {
    throw new InputError("the design needs at least one contrast under 'contrasts'", { file, key: "contrasts" });
  }
  if (!isMap(contrastNode)) throw new InputError("'contrasts' must map names to contrasts", top.where("contrasts"));
  for (const pair of contrastNode.items as Pair[]) {
    const keyNode = pair.key as Node;
    const name = keyName(keyNode);
    const key = `contrasts.${name}`;
    const line = lineOf(keyNode);
    if (!/^[A-Za-z0-9][A-Za-z0-9_.-]*$/.test(name) || name.length > 100) {
      throw new InputError(
        `contrast name '${name}' is not usable as a folder name`,
        { file, line, key },
        "use letters, digits, '_', '-' and '.', starting with a letter or digit",
      );
    }
    contrasts.push({ name, expression: contrastExpression(pair.value as Node | null, { file, line, key }), key, line });
  }
  if (contrasts.length === 0) throw new InputError("'contrasts' lists no contrast", top.where("contrasts"));
  const limit = DESIGN_KEYS.contrasts.limit;
  if (contrasts.length > limit) {
    throw new InputError(`'contrasts' lists ${contrasts.length} contrasts, more than the limit of ${limit}`, top.where("contrasts"));
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
  return contrasts;
}

/** One contrast's value: an expression (text or number), one vector, or a list of rows. */
function contrastExpression(valueNode: Node | null, at: { file: string; line: number | undefined; key: string }): ContrastSpec["expression"] {
  if (isSeq(valueNode)) {
    const values = valueNode.toJSON() as unknown[];
    const isVector = (v: unknown): v is number[] =>
      Array.isArray(v) && v.length > 0 && v.every((x) => typeof x === "number" && Number.isFinite(x));
    if (values.length > 0 && values.every((v) => typeof v === "number" && Number.isFinite(v))) {
      return values as number[];
    }
    if (values.length > 0 && values.every((v) => isVector(v) || (typeof v === "string" && v.trim() !== ""))) {
      return values as (string | number[])[];
    }
    throw new InputError(
      "a contrast list is either one vector of finite numbers (one per design column) or a list of rows (expressions or vectors) for an F contrast",
      at,
    );
  }
  if (isScalar(valueNode) && (typeof valueNode.value === "string" || typeof valueNode.value === "number")) {
    return String(valueNode.value);
  }
  throw new InputError("a contrast is an expression such as `group[patient] - group[control]` or a list of numbers", at);
}
