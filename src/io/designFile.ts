import { checkDesign } from "./design/checkDesign.js";
import type { DesignSpec } from "./design/designSpec.js";
import { readDesignYaml } from "./design/designYaml.js";
import { resolveDesign } from "./design/resolveDesign.js";
import { DESIGN_FILE_LIMIT_BYTES, readTextInput } from "./readInputFile.js";

// The design file in three steps: reading the YAML with the line of every key
// (design/designYaml.ts), checking each key by its rule against the key table
// (design/checkDesign.ts, design/designKeys.ts) and applying the defaults
// (design/resolveDesign.ts).

export { designKeyLocation, type ContrastSpec, type DesignSpec } from "./design/designSpec.js";
export { DEFAULT_INFERENCE } from "./design/resolveDesign.js";
export {
  CONTRASTS_LIMIT,
  LEVELS_LIMIT,
  MISSING_VALUE_LENGTH_LIMIT,
  MISSING_VALUES_LIMIT,
  PERMUTATIONS_LIMIT,
  THRESHOLD_LIST_LIMIT,
} from "./design/designKeys.js";

/** Reads a design file from disk (a regular file, size-limited, strict UTF-8); see `parseDesign`. */
export function readDesign(file: string): DesignSpec {
  return parseDesign(
    readTextInput(file, { limitBytes: DESIGN_FILE_LIMIT_BYTES, what: "the design file", hint: "check the design file's path (relative to the current folder)" }),
    file,
  );
}

/** Parses design-file YAML (1.2 core schema, no custom tags) into a checked DesignSpec. */
export function parseDesign(text: string, file: string): DesignSpec {
  const yaml = readDesignYaml(text, file);
  return resolveDesign(checkDesign(yaml), file, yaml.lines);
}
