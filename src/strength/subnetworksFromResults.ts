import { existsSync, statSync } from "node:fs";
import path from "node:path";
import { InputError } from "../errors.js";
import { edgeIndexOf } from "../edges/edgeIndex.js";
import type { Region } from "../io/regions.js";
import { loadResults, type ComponentRow, type LoadedResults } from "../output/report/loadResults.js";
import type { EdgeSet } from "./edgeSets.js";

/**
 * Subnetworks found by an earlier `plexus run`: the components of one
 * contrast folder (RESULTS_DIR/<contrast>), either those chosen by id or, by
 * default, every component with p_fwe ≤ the alpha of that run. Their edges
 * are mapped onto this design's regions by label.
 */
export interface SubnetworkSource {
  /** The contrast folder as the user gave it. */
  folder: string;
  resultsDir: string;
  contrast: string;
  results: LoadedResults;
  /** The alpha that defined "significant" in that run. */
  alpha: number;
  chosen: ComponentRow[];
  sets: EdgeSet[];
  /** Files read, for provenance. */
  files: { role: string; path: string }[];
}

export function readSubnetworks(
  folder: string,
  regions: Region[],
  options: { components?: number[]; fromOption: string; componentOption: string },
): SubnetworkSource {
  const at = { key: options.fromOption };
  if (!existsSync(folder) || !statSync(folder).isDirectory()) {
    throw new InputError(`'${folder}' is not a folder`, at, "give a contrast folder of a results folder, e.g. results/study/patient_gt_control");
  }
  if (existsSync(path.join(folder, "summary.json"))) {
    const results = loadResults(folder);
    throw new InputError(
      `'${folder}' is a whole results folder; give one of its contrast folders`,
      at,
      `e.g. ${results.summary.contrasts.map((c) => path.join(folder, c.name)).join(" or ")}`,
    );
  }
  const resolved = path.resolve(folder);
  const resultsDir = path.dirname(resolved);
  const contrast = path.basename(resolved);
  const results = loadResults(resultsDir);
  const found = results.contrasts.find((c) => c.summary.name === contrast);
  if (!found) {
    throw new InputError(
      `the results folder ${resultsDir} has no contrast '${contrast}'`,
      at,
      `its contrasts: ${results.summary.contrasts.map((c) => c.name).join(", ")}`,
    );
  }

  // Region k of that run → region index of this design, by label.
  const here = new Map(regions.map((r, i) => [r.label, i]));
  if (results.regions.length !== regions.length) {
    throw new InputError(
      `the results folder has ${results.regions.length} regions and this design's matrices have ${regions.length}`,
      at,
      "a subnetwork can only be carried over to data with the same regions",
    );
  }
  const mapped = results.regions.map((r) => {
    const index = here.get(r.label);
    if (index === undefined) {
      throw new InputError(`region '${r.label}' of ${path.join(resultsDir, "regions.tsv")} is not a region of this design`, at);
    }
    return index;
  });

  const alpha = results.summary.options.inference.alpha;
  const byId = new Map(found.components.map((c) => [c.id, c]));
  let chosen: ComponentRow[];
  if (options.components && options.components.length > 0) {
    chosen = options.components.map((id) => {
      const component = byId.get(id);
      if (!component) {
        throw new InputError(
          found.components.length === 0
            ? `${contrast} has no supra-threshold component`
            : `${contrast} has no component ${id} (it has ${found.components.length}: 1 to ${found.components.length})`,
          { key: options.componentOption },
        );
      }
      return component;
    });
  } else {
    if (found.components.length > 0 && found.components.every((c) => Number.isNaN(c.pFwe))) {
      throw new InputError(
        `the components of ${contrast} have no p_fwe (that run drew no permutations), so none is significant`,
        at,
        `choose components by id with ${options.componentOption} N`,
      );
    }
    chosen = found.components.filter((c) => c.pFwe <= alpha);
    if (chosen.length === 0) {
      const listing = found.components.map((c) => `${c.id} (p_fwe = ${c.pFwe})`).join(", ");
      throw new InputError(
        `no component of ${contrast} has p_fwe ≤ ${alpha}`,
        at,
        found.components.length > 0 ? `components: ${listing}; choose one with ${options.componentOption} N` : "there is no subnetwork to carry over",
      );
    }
  }

  const { edges } = found;
  const sets: EdgeSet[] = chosen.map((component) => {
    const list: number[] = [];
    for (let e = 0; e < edges.component.length; e++) {
      if (edges.component[e] === component.id) {
        list.push(edgeIndexOf(regions.length, mapped[edges.regionA[e]], mapped[edges.regionB[e]]));
      }
    }
    const p = Number.isFinite(component.pFwe) ? `, p_fwe = ${component.pFwe}` : "";
    return {
      name: `component_${component.id}`,
      description: `component ${component.id} of ${contrast} (${component.sign > 0 ? "positive" : "negative"}, ${list.length} edges${p})`,
      edges: Uint32Array.from(list).sort(),
    };
  });
  return {
    folder,
    resultsDir,
    contrast,
    results,
    alpha,
    chosen,
    sets,
    files: [
      { role: "subnetwork_summary", path: path.join(resultsDir, "summary.json") },
      { role: "subnetwork_edges", path: path.join(resolved, "edges.tsv") },
      { role: "subnetwork_components", path: path.join(resolved, "components.tsv") },
    ],
  };
}
