import { familyNullCaption } from "./acrossContrastsText.js";
import { cohortTables, excludedTables, type CohortOptions } from "./cohortTable.js";
import { matrixFigure } from "./figures/matrixFigure.js";
import { networkFigure } from "./figures/networkFigure.js";
import { nullFigure } from "./figures/nullFigure.js";
import { robustnessFigure } from "./figures/robustnessFigure.js";
import { subnetworkDataFigures } from "./subnetworkDataFigures.js";
import { PRINT_WIDTHS, widthSuffix, type PrintWidth } from "./figures/printSize.js";
import type { LoadedResults } from "./loadResults.js";
import { methodsText, type MethodsText } from "./methodsText.js";
import { resultsText, type ResultsText } from "./resultsText.js";
import type { ReportTable, TsvTable } from "./reportTable.js";
import type { SignificantEdges } from "./significantEdges.js";
import { subnetworkTables } from "./subnetworkTables.js";

/**
 * Everything the report shows, built once from a loaded results folder and
 * shared by every writer (tables.md, tables.tex, report.html), so that table
 * numbers and contents agree across them. Pure: no I/O.
 */
export interface ReportContent {
  /** Tables in print order, numbered from 1; `contrast` is set for per-contrast tables. */
  tables: { number: number; table: ReportTable; contrast?: string }[];
  tsv: TsvTable[];
  contrasts: ContrastContent[];
  methods: MethodsText;
  /** The draft results paragraphs (results.md). */
  results: ResultsText;
  /** Excluded participants, for the report's warnings (always listed there in full). */
  excluded: ReportTable;
}

export interface ContrastContent {
  name: string;
  finding: SignificantEdges;
  /** Figures in print order. */
  figures: ReportFigure[];
}

/**
 * One figure, drawn at both print widths. Its files are `<file>-180mm.svg`,
 * `<file>-85mm.svg` and the PNG of each (see figureFiles); report.html shows
 * the two-column drawing.
 */
export interface ReportFigure {
  /** The path without width or extension, e.g. `figures/patient_gt_control-null`. */
  file: string;
  /** What the figure shows, one word: null, matrix, network, robustness, data, nodal. */
  kind: string;
  caption: string;
  svg: Record<PrintWidth, string>;
}

/** Draws a figure at both widths, or returns null when it has nothing to show. */
export function drawnFigure(file: string, kind: string, caption: string, draw: (width: PrintWidth) => string | null): ReportFigure | null {
  const double = draw("double");
  const single = draw("single");
  return double === null || single === null ? null : { file, kind, caption, svg: { double, single } };
}

/** The file names of a figure: each width as SVG and PNG. */
export function figureFileNames(figure: ReportFigure): { width: PrintWidth; svg: string; png: string }[] {
  return PRINT_WIDTHS.map((width) => ({ width, svg: `${figure.file}${widthSuffix(width)}.svg`, png: `${figure.file}${widthSuffix(width)}.png` }));
}

/** The excluded-participants table is printed in tables.md/.tex only up to this many rows. */
export const PRINTED_EXCLUDED_LIMIT = 20;

export function reportContent(results: LoadedResults, options: CohortOptions = {}): ReportContent {
  const cohort = cohortTables(results, options);
  const excluded = excludedTables(results);
  const subnetworks = subnetworkTables(results);
  const tables: ReportContent["tables"] = [];
  const add = (table: ReportTable | null, contrast?: string) => {
    if (table) tables.push({ number: tables.length + 1, table, contrast });
  };
  add(cohort.print);
  if (excluded.print.rows.length > 0 && excluded.print.rows.length <= PRINTED_EXCLUDED_LIMIT) add(excluded.print);
  add(subnetworks.subnetworks);
  for (const c of subnetworks.perContrast) {
    add(c.edges, c.name);
    add(c.hubs, c.name);
  }

  const { summary } = results;
  const alpha = summary.options.inference.alpha;
  const contrasts: ContrastContent[] = results.contrasts.map((contrast, k) => {
    const finding = subnetworks.perContrast[k].finding;
    const name = contrast.summary.name;
    const figures: ReportFigure[] = [];
    const add = (figure: ReportFigure | null) => {
      if (figure) figures.push(figure);
    };
    add(
      drawnFigure(
        `figures/${name}-null`,
        "null",
        `Permutation distribution of the largest component ${summary.options.inference.size} (grey bars), the critical value at α = ${alpha} (dashed line) and the observed components (solid lines, dark when p_FWE ≤ α).${familyNullCaption(summary)}`,
        (width) => nullFigure(contrast, summary, width),
      ),
    );
    add(
      drawnFigure(
        `figures/${name}-matrix`,
        "matrix",
        "The t-statistic of every edge (both triangles), regions grouped by hemisphere and system when the regions table gives them; the edges of the significant finding are outlined (while they are at most a quarter of the tested edges). Colour scale: cividis, dark blue (most negative) to yellow (most positive), lightness increasing throughout.",
        (width) => matrixFigure(contrast, results.regions, finding, results.summary.edge_rules?.dropped ?? 0, width),
      ),
    );
    add(
      drawnFigure(
        `figures/${name}-network`,
        "network",
        results.regions.every((r) => r.x !== undefined)
          ? `The significant edges on the region coordinates: a plan (seen from above, front at the top) and an elevation (seen from behind) at one scale, the participant's left on the left (L, R) in both; the grey outline is the rounded hull of all regions in that view and the dashed line the midline (x = 0). Edge colour: ${contrast.summary.statistic === "F" ? "F" : "t"} (cividis scale); dark dots: regions of the finding, named beside the plan (left-hemisphere regions on the left); grey dots: all other regions.`
          : `The significant edges on a circle of regions (no coordinates were given), grouped by hemisphere and system (grey arcs), the left hemisphere on the left half when the regions table says which; edge colour: ${contrast.summary.statistic === "F" ? "F" : "t"} (cividis scale); dark dots: regions of the finding, named beside the circle.`,
        (width) => networkFigure(contrast, results.regions, finding, alpha, width),
      ),
    );
    for (const plan of subnetworkDataFigures(contrast, summary)) add(drawnFigure(plan.file, plan.kind, plan.caption, plan.draw));
    add(
      drawnFigure(
        `figures/${name}-robustness`,
        "robustness",
        `Which edges stay in a significant subnetwork as the primary threshold changes (a sweep over the same relabelings): a filled square where the edge lies in a component with p_FWE ≤ ${alpha} at that threshold; the most robust edges first.`,
        (width) => robustnessFigure(contrast, width),
      ),
    );
    return { name, finding, figures };
  });

  return {
    tables,
    tsv: [...cohort.tsv, excluded.tsv, ...subnetworks.tsv],
    contrasts,
    methods: methodsText(results),
    results: resultsText(results),
    excluded: excluded.print,
  };
}
