import { InputError } from "../errors.js";
import { edgeIndexOf } from "../edges/edgeIndex.js";
import { nearestName } from "../io/nearestName.js";
import type { Region } from "../io/regions.js";
import { readTsv } from "../io/tsv.js";

/**
 * A chosen set of edges as a tab-separated file of region-label pairs with
 * the header `region_a region_b` (other columns are ignored), one edge a row,
 * in either order. Unknown labels, a region paired with itself, a pair listed
 * twice and a file without rows are errors naming the file, line and column.
 * Returns the edge indices in ascending order.
 */
export function readPairsFile(file: string, regions: Region[]): Uint32Array {
  const table = readTsv(file, "the edge list");
  const columnOf = (name: string) => {
    const index = table.header.indexOf(name);
    if (index < 0) {
      throw new InputError(
        `an edge list needs the columns region_a and region_b (found: ${table.header.join(", ")})`,
        { file, line: table.headerLine },
        "one edge per row: two region labels from the regions table",
      );
    }
    return index;
  };
  const columns = [columnOf("region_a"), columnOf("region_b")];
  if (table.rows.length === 0) throw new InputError("the edge list has no rows", { file, line: table.headerLine });
  const labels = regions.map((r) => r.label);
  const indexOfLabel = new Map(labels.map((label, i) => [label, i]));
  const lineOfEdge = new Map<number, number>();
  table.rows.forEach((row, r) => {
    const line = table.lines[r];
    const [a, b] = columns.map((column) => {
      const label = row[column];
      const index = indexOfLabel.get(label);
      if (index === undefined) {
        const near = nearestName(label, labels);
        throw new InputError(
          `'${label}' is not a region label of the regions table`,
          { file, line, column: column + 1 },
          near ? `did you mean '${near}'?` : undefined,
        );
      }
      return index;
    });
    if (a === b) {
      throw new InputError(`the edge pairs region '${labels[a]}' with itself`, { file, line, column: columns[1] + 1 });
    }
    const edge = edgeIndexOf(regions.length, a, b);
    const earlier = lineOfEdge.get(edge);
    if (earlier !== undefined) {
      throw new InputError(`the edge ${labels[a]} – ${labels[b]} is listed twice (also on line ${earlier})`, { file, line });
    }
    lineOfEdge.set(edge, line);
  });
  return Uint32Array.from(lineOfEdge.keys()).sort();
}
