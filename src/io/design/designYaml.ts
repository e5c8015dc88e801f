import { LineCounter, parseDocument, isMap, isScalar, type Node, type Pair, type YAMLMap } from "yaml";
import { InputError } from "../../errors.js";

/** A design file's YAML read, before any key is checked: its mapping, where each key stands, and the text as written. */
export interface DesignYaml {
  file: string;
  root: YAMLMap;
  /** 1-based line of every key path through nested mappings (`inference.threshold`). */
  lines: Map<string, number>;
  /** The line a node starts on. */
  lineOf(node: Node | null | undefined): number | undefined;
  /** A value as the file writes it (so `1e400` is shown as written, not as Infinity). */
  written(node: Node | null | undefined): string;
}

/** A mapping key's name as the design's key paths spell it. */
export function keyName(keyNode: Node | null): string {
  return isScalar(keyNode) ? String(keyNode.value) : String(keyNode);
}

/**
 * Parses design-file text as YAML 1.2 (core schema, no custom tags, unique keys;
 * a byte-order mark is dropped) whose top level is a mapping.
 */
export function readDesignYaml(text: string, file: string): DesignYaml {
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
  const lineOf = (node: Node | null | undefined) => lineAt(node?.range?.[0]);
  const lines = new Map<string, number>();
  const recordLines = (map: YAMLMap, prefix: string) => {
    for (const pair of map.items as Pair[]) {
      const keyNode = pair.key as Node | null;
      const path = prefix ? `${prefix}.${keyName(keyNode)}` : keyName(keyNode);
      const line = lineOf(keyNode);
      if (line !== undefined) lines.set(path, line);
      if (isMap(pair.value)) recordLines(pair.value, path);
    }
  };
  recordLines(root, "");
  return {
    file,
    root,
    lines,
    lineOf,
    written: (node) => {
      const range = node?.range;
      return range ? source.slice(range[0], range[1]).trim() : String(node ? node.toJSON() : node);
    },
  };
}
