import type { Tail } from "../common/inferenceOptions.js";
import { labelComponents, type ComponentSummary } from "./components.js";

/** The signs a tail looks at: upper → +, lower → −, both → each separately. */
export function signsOfTail(tail: Tail): (1 | -1)[] {
  return tail === "both" ? [1, -1] : tail === "lower" ? [-1] : [1];
}

/**
 * Observed supra-threshold components for a tail, components of each sign
 * labelled separately (never mixing positive and negative edges) and then
 * numbered together: largest first by the size measure, ties by extent, then
 * by the lowest edge index.
 */
export function observedComponents(
  statistic: ArrayLike<number>,
  regionA: Uint32Array,
  regionB: Uint32Array,
  regionCount: number,
  threshold: number,
  tail: Tail,
  size: "extent" | "mass",
): { labels: Int32Array; components: ComponentSummary[] } {
  const perSign = signsOfTail(tail).map((sign) =>
    labelComponents(statistic, regionA, regionB, regionCount, threshold, sign, size),
  );
  const all = perSign.flatMap((result, which) => result.components.map((c) => ({ which, c })));
  all.sort(({ c: a }, { c: b }) => {
    const bySize = size === "mass" ? b.mass - a.mass : b.extent - a.extent;
    return bySize || b.extent - a.extent || a.firstEdge - b.firstEdge;
  });
  const renumber = perSign.map(() => new Map<number, number>());
  const components = all.map(({ which, c }, k) => {
    renumber[which].set(c.id, k + 1);
    return { ...c, id: k + 1 };
  });
  const labels = new Int32Array(statistic.length);
  perSign.forEach((result, which) => {
    for (let e = 0; e < labels.length; e++) {
      const id = result.labels[e];
      if (id > 0) labels[e] = renumber[which].get(id)!;
    }
  });
  return { labels, components };
}
