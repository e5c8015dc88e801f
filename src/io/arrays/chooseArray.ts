import { basename } from "node:path";
import { InputError, type InputLocation } from "../../errors.js";
import { printable } from "../printable.js";
import type { ArrayContainer, ArrayEntry } from "./arrayContainer.js";

export type SubjectsAxis = "first" | "last";

/** What the design says of the array to read: `connectomes: { path, variable, subjects_axis }`. */
export interface ArrayChoice {
  variable?: string;
  subjectsAxis?: SubjectsAxis;
}

const ONE_MATRIX_HINT = "a file holding one participant's matrix is named for each participant with a path template, e.g. connectomes: conn/{participant_id}.pconn.nii (or .npz, .mat, …)";
/** An example of the mapping form for this file (its own name and, where known, the variable). */
function mappingExample(file: string, keys: string): string {
  return `connectomes: { path: ${printable(basename(file))}, ${keys} }`;
}

/** "conn (90 × 90 × 40 float64)"; "/group (group)" for an entry without a shape. */
export function describeEntry(entry: ArrayEntry): string {
  const name = entry.name === "" ? "the array" : printable(entry.name);
  return `${name} (${entry.shape.length > 0 ? `${entry.shape.join(" × ")} ` : ""}${entry.type})`;
}

function listEntries(container: ArrayContainer): string {
  if (container.entries.length === 0) return "it holds no array";
  const shown = container.entries.slice(0, 20).map(describeEntry).join(", ");
  const more = container.entries.length > 20 ? `, and ${container.entries.length - 20} more` : "";
  return `it holds ${shown}${more}`;
}

/** HDF5 paths are from the root: `conn` and `/conn` name the same entry. */
const withoutRootSlash = (name: string): string => name.replace(/^\//, "");

function named(container: ArrayContainer, file: string, variable: string): ArrayEntry {
  const entry =
    container.entries.find((e) => e.name === variable) ??
    (variable === "" ? undefined : container.entries.find((e) => e.name !== "" && withoutRootSlash(e.name) === withoutRootSlash(variable)));
  if (!entry) {
    throw new InputError(`this ${container.format} file has no variable '${printable(variable)}'; ${listEntries(container)}`, { file, key: "connectomes.variable" });
  }
  if (!entry.numeric) {
    throw new InputError(`variable ${describeEntry(entry)} is not a numeric array`, { file, key: "connectomes.variable" });
  }
  return entry;
}

function onlySuitable(container: ArrayContainer, file: string, suitable: (entry: ArrayEntry) => boolean, what: string): ArrayEntry {
  const candidates = container.entries.filter((e) => e.numeric && suitable(e));
  if (candidates.length === 1) return candidates[0];
  if (candidates.length === 0) {
    const oneMatrix = what.startsWith("stack") && container.entries.some((e) => e.numeric && isSquare(e));
    throw new InputError(`this ${container.format} file holds no ${what}; ${listEntries(container)}`, { file, key: "connectomes" }, oneMatrix ? ONE_MATRIX_HINT : undefined);
  }
  throw new InputError(
    `this ${container.format} file holds ${candidates.length} arrays that could be the ${what}: ${candidates.map(describeEntry).join(", ")}`,
    { file, key: "connectomes" },
    `name one with variable, e.g. ${mappingExample(file, `variable: ${printable(candidates[0].name)}`)}`,
  );
}

const isSquare = (e: ArrayEntry): boolean => e.shape.length === 2 && e.shape[0] === e.shape[1];
const isStack = (e: ArrayEntry): boolean => e.shape.length === 3 && (e.shape[0] === e.shape[1] || e.shape[1] === e.shape[2]);

/** One participant's N × N matrix in a container: the named variable, or the only square matrix it holds. */
export function chooseMatrix(container: ArrayContainer, file: string, choice: ArrayChoice): ArrayEntry {
  const entry = choice.variable !== undefined ? named(container, file, choice.variable) : onlySuitable(container, file, isSquare, "square matrix");
  if (!isSquare(entry)) {
    throw new InputError(`expected one participant's square matrix (N × N), found ${describeEntry(entry)}`, { file, key: "connectomes" });
  }
  return entry;
}

/**
 * The stack of every participant's matrix in one container, and which axis
 * runs over participants: S × N × N ("first") or N × N × S ("last"). The
 * shape decides when S ≠ N; when it cannot, `subjects_axis` must.
 */
export function chooseStack(container: ArrayContainer, file: string, choice: ArrayChoice): { entry: ArrayEntry; axis: SubjectsAxis } {
  const entry = choice.variable !== undefined ? named(container, file, choice.variable) : onlySuitable(container, file, isStack, "stack of square matrices (S × N × N or N × N × S)");
  const where: InputLocation = { file, key: "connectomes" };
  const { shape } = entry;
  if (shape.length !== 3) {
    throw new InputError(`expected a stack of every participant's matrix (S × N × N or N × N × S), found ${describeEntry(entry)}`, where);
  }
  const first = shape[1] === shape[2];
  const last = shape[0] === shape[1];
  if (choice.subjectsAxis === "first" && !first) {
    throw new InputError(`subjects_axis: first needs S × N × N, but ${describeEntry(entry)} is not square in its last two axes`, { file, key: "connectomes.subjects_axis" });
  }
  if (choice.subjectsAxis === "last" && !last) {
    throw new InputError(`subjects_axis: last needs N × N × S, but ${describeEntry(entry)} is not square in its first two axes`, { file, key: "connectomes.subjects_axis" });
  }
  if (choice.subjectsAxis) return { entry, axis: choice.subjectsAxis };
  if (first && last) {
    throw new InputError(
      `${describeEntry(entry)} has as many participants as regions, so the shape cannot tell which axis runs over participants`,
      where,
      `say which with subjects_axis: first (S × N × N) or last (N × N × S), e.g. ${mappingExample(file, `${entry.name !== "" ? `variable: ${printable(entry.name)}, ` : ""}subjects_axis: last`)}`,
    );
  }
  if (!first && !last) {
    throw new InputError(`expected a stack of square matrices (S × N × N or N × N × S), found ${describeEntry(entry)}`, where);
  }
  return { entry, axis: first ? "first" : "last" };
}
