import type { Node, Pair, YAMLMap } from "yaml";
import { InputError } from "../../errors.js";
import { nearestName } from "../nearestName.js";
import { keyNames } from "./designKeys.js";
import { keyName, type DesignYaml } from "./designYaml.js";

/**
 * One mapping of a design file (the top level, `inference`, `inference.enhancement`)
 * checked against its key table: a key the table lacks is an error naming it, with
 * the nearest valid key or the list of them.
 */
export class DesignSection {
  private readonly values = new Map<string, Node | null>();

  constructor(
    readonly yaml: DesignYaml,
    map: YAMLMap,
    keys: object,
    private readonly prefix: string,
  ) {
    const allowed = keyNames(keys);
    for (const pair of map.items as Pair[]) {
      const keyNode = pair.key as Node | null;
      const name = keyName(keyNode);
      const full = this.path(name);
      if (!allowed.includes(name)) {
        const near = nearestName(name, allowed);
        throw new InputError(
          `unknown key '${full}'`,
          { file: yaml.file, line: yaml.lineOf(keyNode), key: full },
          near ? `did you mean '${prefix ? `${prefix}.` : ""}${near}'?` : `valid keys: ${allowed.join(", ")}`,
        );
      }
      this.values.set(name, (pair.value as Node | null) ?? null);
    }
  }

  /** The key path of `name` in this section (`inference.seed`). */
  path(name: string): string {
    return this.prefix ? `${this.prefix}.${name}` : name;
  }

  /** The value's node; undefined when the key is absent or has no node. */
  node(name: string): Node | undefined {
    return this.values.get(name) ?? undefined;
  }

  /** The value as plain data (a YAML null is null); undefined when the key is absent. */
  value(name: string): unknown {
    const node = this.node(name);
    return node === undefined ? undefined : node.toJSON();
  }

  /** The key's location, for an error about its value. */
  where(name: string) {
    const key = this.path(name);
    return { file: this.yaml.file, key, line: this.yaml.lines.get(key) };
  }
}
