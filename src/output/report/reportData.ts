import { regionOrder } from "./figures/regionOrder.js";
import type { LoadedResults } from "./loadResults.js";
import type { ReportContent } from "./reportContent.js";

/**
 * The data report.html's script reads: region labels, the matrix drawing order,
 * every edge's pair, and per contrast each edge's statistic, estimate, p and q
 * (four significant digits; null where there is none) and the significant
 * subnetworks with their edges. Columns rather than records keep it small.
 */
export interface ReportData {
  regions: string[];
  /** order[p]: the region drawn at position p of the matrix figure. */
  order: number[];
  a: number[];
  b: number[];
  contrasts: {
    name: string;
    statistic: "t" | "F";
    t: (number | null)[];
    estimate: (number | null)[];
    p: (number | null)[];
    q: (number | null)[];
    subnetworks: { id: number; sign: 1 | -1; extent: number; nodes: number; p: number; edges: number[] }[];
  }[];
}

export function reportData(results: LoadedResults, content: ReportContent): ReportData {
  const first = results.contrasts[0]?.edges;
  return {
    regions: results.regions.map((r) => r.label),
    order: regionOrder(results.regions).order,
    a: first ? Array.from(first.regionA) : [],
    b: first ? Array.from(first.regionB) : [],
    contrasts: results.contrasts.map((contrast, k) => {
      const { edges } = contrast;
      const finding = content.contrasts[k].finding;
      return {
        name: contrast.summary.name,
        statistic: contrast.summary.statistic === "F" ? "F" : "t",
        t: rounded(edges.statistic),
        estimate: rounded(edges.estimate),
        p: rounded(edges.pUncorrected),
        q: rounded(edges.qFdr),
        subnetworks:
          finding.kind === "components"
            ? finding.components.map((c) => ({
                id: c.id,
                sign: c.sign,
                extent: c.extent,
                nodes: c.nodes,
                p: c.pFwe,
                edges: finding.edges.filter((e) => edges.component[e] === c.id),
              }))
            : [],
      };
    }),
  };
}

function rounded(values: Float64Array): (number | null)[] {
  return Array.from(values, (v) => (Number.isFinite(v) ? Number(v.toPrecision(4)) : null));
}

/**
 * JSON for the content of a <script type="application/json"> element: < > & and the
 * two line separators become \u escapes, so no text in it (a region label such as
 * "</script><script>…") can end the element or start markup; JSON.parse reads it back unchanged.
 */
export function scriptJson(value: unknown): string {
  return JSON.stringify(value).replace(/[<>&\u2028\u2029]/g, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, "0")}`);
}
