import { existsSync } from "node:fs";
import path from "node:path";
import { InputError } from "../errors.js";
import { edgeCountFor, edgeIndexOf, type EdgePairs } from "../edges/edgeIndex.js";
import { nearestName } from "../io/nearestName.js";
import type { Region } from "../io/regions.js";
import { edgesBetweenSystems, edgesWithinSystem, systemNames, type EdgeSet } from "./edgeSets.js";
import { readPairsFile } from "./readPairsFile.js";
import { OPTION, type EdgeSelection } from "./strengthOptions.js";
import { readSubnetworks, type SubnetworkSource } from "./subnetworksFromResults.js";

/**
 * Turns the chosen options into named edge sets on this design's regions:
 * within each system, between two systems, from an edge list, then the
 * components of an earlier run, in that order. A system the regions table
 * does not name, a set without edges and a name used twice are errors
 * naming the option.
 */
export interface SelectedEdgeSets {
  sets: EdgeSet[];
  /** The earlier run's subnetworks, when --from was given. */
  source?: SubnetworkSource;
  /** Files read, for provenance. */
  files: { role: string; path: string }[];
}

function checkSystem(name: string, known: string[], key: string): void {
  if (known.length === 0) {
    throw new InputError(
      "the regions have no systems",
      { key },
      "name each region's system in a `system` column of the regions table (the design's `regions:` file)",
    );
  }
  if (!known.includes(name)) {
    const near = nearestName(name, known);
    throw new InputError(`no region belongs to the system '${name}'`, { key }, near ? `did you mean '${near}'?` : `systems: ${known.join(", ")}`);
  }
}

/**
 * Edges named in the full edge order (an edge list, a results folder's component)
 * as indices of the analysed edges `pairs`: the same when every edge is analysed;
 * with coverage rules (`edges:` in the design), the edges left out are left out
 * of the set too, as the strength measures see the kept edges only.
 */
function analysedEdges(full: Uint32Array, pairs: EdgePairs): Uint32Array {
  if (pairs.edgeCount === edgeCountFor(pairs.regionCount)) return full;
  const analysed = new Int32Array(edgeCountFor(pairs.regionCount)).fill(-1);
  for (let k = 0; k < pairs.edgeCount; k++) analysed[edgeIndexOf(pairs.regionCount, pairs.regionA[k], pairs.regionB[k])] = k;
  return Uint32Array.from(Array.from(full, (e) => analysed[e]).filter((k) => k >= 0)).sort();
}

export function selectEdgeSets(selection: EdgeSelection, regions: Region[], pairs: EdgePairs): SelectedEdgeSets {
  const sets: EdgeSet[] = [];
  const files: SelectedEdgeSets["files"] = [];
  // A set named in the full edge order (an edge list, a results folder's components), mapped to the analysed edges.
  const keptOf = (set: EdgeSet): EdgeSet => {
    const edges = analysedEdges(set.edges, pairs);
    if (edges.length === set.edges.length) return set;
    return { ...set, edges, description: `${set.description} (${edges.length} of its ${set.edges.length} edges analysed: the edge rules left out the others)` };
  };
  const known = systemNames(regions);
  const add = (set: EdgeSet, key: string) => {
    if (set.edges.length === 0) {
      throw new InputError(`${set.description} has no edges`, { key }, "a system needs at least two regions for an edge within it");
    }
    if (sets.some((s) => s.name === set.name)) throw new InputError(`${set.name} is chosen twice`, { key });
    sets.push(set);
  };
  for (const system of selection.systems ?? []) {
    checkSystem(system, known, OPTION.system);
    add(
      { name: `within_${system}`, description: `the edges within ${system}`, edges: edgesWithinSystem(regions, pairs, system) },
      OPTION.system,
    );
  }
  if (selection.between) {
    const [a, b] = selection.between;
    checkSystem(a, known, OPTION.between);
    checkSystem(b, known, OPTION.between);
    if (a === b) {
      throw new InputError(`--between needs two different systems, found '${a}' twice`, { key: OPTION.between }, `for the edges within one system use --system ${a}`);
    }
    add(
      { name: `between_${a}_${b}`, description: `the edges between ${a} and ${b}`, edges: edgesBetweenSystems(regions, pairs, a, b) },
      OPTION.between,
    );
  }
  if (selection.pairs) {
    const file = path.resolve(selection.pairs);
    if (!existsSync(file)) {
      throw new InputError(`the edge list ${selection.pairs} does not exist`, { key: OPTION.pairs }, "give a TSV with columns region_a and region_b");
    }
    add(
      keptOf({
        name: `pairs_${path.basename(file, path.extname(file))}`,
        description: `the edges listed in ${selection.pairs}`,
        edges: readPairsFile(selection.pairs, regions),
      }),
      OPTION.pairs,
    );
    files.push({ role: "edge_list", path: file });
  }
  let source: SubnetworkSource | undefined;
  if (selection.from) {
    source = readSubnetworks(selection.from, regions, {
      components: selection.components,
      fromOption: OPTION.from,
      componentOption: OPTION.component,
    });
    for (const set of source.sets) add(keptOf(set), OPTION.from);
    files.push(...source.files);
  }
  return { sets, source, files };
}
