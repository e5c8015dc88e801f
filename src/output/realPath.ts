import { realpathSync } from "node:fs";
import path from "node:path";

/**
 * The absolute path with every symbolic link of its existing part resolved:
 * the deepest existing ancestor is resolved, the rest (not yet created) is
 * appended as written. Two paths naming the same place compare equal.
 */
export function realPath(target: string): string {
  const absolute = path.resolve(target);
  const rest: string[] = [];
  let existing = absolute;
  for (;;) {
    try {
      return path.join(realpathSync.native(existing), ...rest.reverse());
    } catch {
      const parent = path.dirname(existing);
      if (parent === existing) return absolute;
      rest.push(path.basename(existing));
      existing = parent;
    }
  }
}

/** True when `inner` is `outer` or lies below it (both real, absolute paths). */
export function isWithin(inner: string, outer: string): boolean {
  if (inner === outer) return true;
  const relative = path.relative(outer, inner);
  return relative !== "" && !relative.startsWith("..") && !path.isAbsolute(relative);
}
