import type { Attribute, Dataset, Group, Metadata } from "h5wasm";
import { InputError } from "../../errors.js";
import { printable } from "../printable.js";
import { hdf5Call, type Hdf5Library } from "./hdf5Calls.js";
import type { Hdf5Entry, Hdf5Layout, Hdf5Listing } from "./hdf5Types.js";

// The arrays an HDF5 file holds, as the HDF5 worker lists them: every dataset
// by its full path with its stored shape (C order); MATLAB 7.3 variables (a
// `MATLAB_class` attribute) and GNU Octave's `save -hdf5` variables (a group
// with the attribute OCTAVE_NEW_FORMAT, holding `type` and `value`) in their
// writer's terms: the name alone, the dims reversed (both write column-major).

/** Objects visited at most (groups, datasets and links): a file with more is refused rather than walked for minutes. */
export const OBJECT_LIMIT = 10_000;

/** HDF5's datatype classes (H5T_class_t, H5Tpublic.h). */
const H5T = { integer: 0, float: 1, time: 2, string: 3, bitfield: 4, opaque: 5, compound: 6, reference: 7, enum: 8, vlen: 9, array: 10 } as const;

/** MATLAB classes whose arrays are numbers (logical read as 0/1). */
const MATLAB_NUMERIC = new Set(["double", "single", "int8", "uint8", "int16", "uint16", "int32", "uint32", "int64", "uint64", "logical"]);

type Attributes = Record<string, Attribute>;

/** Every entry of an open file, walked depth-first in the file's order. */
export function listObjects(library: Hdf5Library, root: Group, layout: Hdf5Layout): Hdf5Listing {
  const entries: Hdf5Entry[] = [];
  let visited = 0;
  let octave = false;
  const walk = (group: Group, groupPath: string): void => {
    const names = hdf5Call(library, `cannot list the group '${printable(groupPath)}'`, () => group.keys());
    for (const name of names) {
      if (++visited > OBJECT_LIMIT) {
        throw new InputError(
          `the file holds more than ${OBJECT_LIMIT} objects (groups, datasets and links); plexus looks through at most ${OBJECT_LIMIT}`,
          {},
          "save the connectivity arrays in a file of their own",
        );
      }
      const path = groupPath === "/" ? `/${name}` : `${groupPath}/${name}`;
      // MATLAB keeps the contents of cells, strings and objects under /#refs# and /#subsystem#: no variables there.
      if (layout === "mat73" && groupPath === "/" && name.startsWith("#")) continue;
      const object = hdf5Call(library, `cannot open '${printable(path)}'`, () => group.get(path));
      const kind = (object as { type?: string } | null)?.type;
      const variableName = groupPath === "/" ? name : path;
      if (kind === "Dataset") {
        const dataset = object as Dataset;
        const attributes = attributesOf(library, dataset, path);
        const matlabClass = layout === "mat73" ? textAttribute(library, attributes, "MATLAB_class", path) : undefined;
        entries.push(matlabClass !== undefined ? matlabDataset(library, dataset, variableName, matlabClass, attributes) : plainDataset(library, dataset, path));
      } else if (kind === "Group") {
        const subgroup = object as Group;
        const attributes = attributesOf(library, subgroup, path);
        const matlabClass = layout === "mat73" ? textAttribute(library, attributes, "MATLAB_class", path) : undefined;
        if (matlabClass !== undefined) {
          entries.push(matlabGroup(library, subgroup, variableName, matlabClass, attributes));
        } else if (layout === "hdf5" && "OCTAVE_NEW_FORMAT" in attributes) {
          octave = true;
          entries.push(octaveVariable(library, subgroup, variableName));
        } else {
          entries.push({ name: path, shape: [], type: "group", numeric: false });
          walk(subgroup, path);
        }
      } else if (kind === "ExternalLink") {
        entries.push({ name: path, shape: [], type: "link to another file", numeric: false });
      }
      // Broken soft links and named datatypes hold no array.
    }
  };
  walk(root, "/");
  const format = layout === "mat73" ? "MATLAB 7.3 .mat" : octave ? "HDF5 (GNU Octave's save -hdf5)" : "HDF5";
  return { format, entries };
}

/** A dataset as HDF5 stores it: its path, its shape, C order. */
function plainDataset(library: Hdf5Library, dataset: Dataset, path: string): Hdf5Entry {
  const metadata = metadataOf(library, dataset, path);
  if (metadata.shape === null) return { name: path, shape: [], type: "empty (null dataspace)", numeric: false };
  const stored = storedType(metadata);
  return {
    name: path,
    shape: metadata.shape,
    type: stored.type,
    numeric: stored.numeric,
    ...(stored.numeric ? { source: { kind: "dense" as const, dataset: path, columnMajor: false } } : {}),
  };
}

/**
 * A MATLAB 7.3 variable stored as a dataset. MATLAB writes column-major, so the
 * HDF5 dims are MATLAB's reversed; the class attribute says what the numbers
 * mean (logical as uint8; char as uint16 codes; cell as references into
 * /#refs#). An empty array is written as its dims with MATLAB_empty = 1 (as far
 * as we know from files MATLAB wrote; from memory, not from a specification).
 */
function matlabDataset(library: Hdf5Library, dataset: Dataset, name: string, matlabClass: string, attributes: Attributes): Hdf5Entry {
  const metadata = metadataOf(library, dataset, dataset.path);
  const stored = storedType(metadata);
  const dims = [...(metadata.shape ?? [])].reverse();
  if (numberAttribute(library, attributes, "MATLAB_empty", dataset.path)) {
    return { name, shape: emptyDims(library, dataset), type: `empty ${matlabClass}`, numeric: false };
  }
  if (MATLAB_NUMERIC.has(matlabClass) && stored.numeric && metadata.shape !== null) {
    return { name, shape: dims, type: matlabClass, numeric: true, source: { kind: "dense", dataset: dataset.path, columnMajor: true } };
  }
  const type = MATLAB_NUMERIC.has(matlabClass) && stored.type === "complex" ? `complex ${matlabClass}` : matlabClass;
  return { name, shape: dims, type, numeric: false };
}

function emptyDims(library: Hdf5Library, dataset: Dataset): number[] {
  const value = hdf5Call(library, `cannot read '${printable(dataset.path)}'`, () => dataset.value);
  if (!ArrayBuffer.isView(value)) return [0, 0];
  return Array.from(value as ArrayLike<number | bigint>, (v) => Number(v));
}

/**
 * A MATLAB 7.3 variable stored as a group: a sparse matrix (attribute
 * MATLAB_sparse = the number of rows; datasets jc, the column starts, ir, the
 * row indices, and data, both absent when it holds no nonzero), a struct or an
 * object. Sparse matrices are read as dense; the others are listed only.
 */
function matlabGroup(library: Hdf5Library, group: Group, name: string, matlabClass: string, attributes: Attributes): Hdf5Entry {
  const rows = numberAttribute(library, attributes, "MATLAB_sparse", group.path);
  if (rows === undefined) return { name, shape: [], type: matlabClass, numeric: false };
  const members = hdf5Call(library, `cannot list '${printable(group.path)}'`, () => group.keys());
  if (!members.includes("jc")) return { name, shape: [], type: `sparse ${matlabClass} without column starts (jc)`, numeric: false };
  const columnStarts = datasetMetadata(library, group, "jc");
  const columns = (columnStarts.shape ?? []).reduce((product, d) => product * d, 1) - 1;
  const numeric = MATLAB_NUMERIC.has(matlabClass);
  return {
    name,
    shape: [rows, columns],
    type: `sparse ${matlabClass}`,
    numeric,
    ...(numeric
      ? {
          source: {
            kind: "sparse" as const,
            rows,
            columns,
            columnStarts: `${group.path}/jc`,
            ...(members.includes("ir") ? { rowIndices: `${group.path}/ir` } : {}),
            ...(members.includes("data") ? { values: `${group.path}/data` } : {}),
          },
        }
      : {}),
  };
}

/** The class of an Octave `type` string whose values are numbers ("matrix", "float scalar", "int16 matrix", "bool matrix", …). */
function octaveClass(type: string): string | undefined {
  if (type === "scalar" || type === "matrix") return "double";
  if (type === "float scalar" || type === "float matrix") return "single";
  if (type === "bool" || type === "bool matrix") return "logical";
  const integer = /^(u?int(?:8|16|32|64)) (?:scalar|matrix)$/.exec(type);
  return integer?.[1];
}

/**
 * A variable written by GNU Octave's `save -hdf5`: a group holding the dataset
 * `type` (Octave's name for the value's type) and `value`, stored column-major
 * like MATLAB's (the layout seen in files Octave 7 writes: the fixtures).
 */
function octaveVariable(library: Hdf5Library, group: Group, name: string): Hdf5Entry {
  const members = hdf5Call(library, `cannot list '${printable(group.path)}'`, () => group.keys());
  if (!members.includes("type") || !members.includes("value")) return { name, shape: [], type: "Octave variable without type and value", numeric: false };
  const typeValue = hdf5Call(library, `cannot read '${printable(group.path)}/type'`, () => {
    const typeDataset = group.get(`${group.path}/type`);
    return (typeDataset as { type?: string } | null)?.type === "Dataset" ? (typeDataset as Dataset).value : undefined;
  });
  const type = typeof typeValue === "string" ? typeValue : "unknown Octave type";
  const value = hdf5Call(library, `cannot open '${printable(group.path)}/value'`, () => group.get(`${group.path}/value`));
  const valueKind = (value as { type?: string } | null)?.type;
  const matlabClass = octaveClass(type);
  if (valueKind === "Dataset") {
    const metadata = metadataOf(library, value as Dataset, `${group.path}/value`);
    const dims = [...(metadata.shape ?? [])].reverse();
    const shape = dims.length === 0 ? [1, 1] : dims; // Octave's scalars are 1 × 1
    if (matlabClass !== undefined && storedType(metadata).numeric && metadata.shape !== null) {
      return { name, shape, type: matlabClass, numeric: true, source: { kind: "dense", dataset: `${group.path}/value`, columnMajor: true } };
    }
    return { name, shape, type, numeric: false };
  }
  if (valueKind === "Group" && (type === "sparse matrix" || type === "bool sparse matrix")) {
    // nr and nc (the size), cidx (column starts), ridx (row indices), data.
    const valuePath = `${group.path}/value`;
    const parts = hdf5Call(library, `cannot list '${printable(valuePath)}'`, () => (group.get(valuePath) as Group).keys());
    const size = (part: string): number | undefined => {
      if (!parts.includes(part)) return undefined;
      const read = hdf5Call(library, `cannot read '${printable(valuePath)}/${part}'`, () => {
        const dataset = group.get(`${valuePath}/${part}`);
        return (dataset as { type?: string } | null)?.type === "Dataset" ? (dataset as Dataset).value : undefined;
      });
      return typeof read === "number" || typeof read === "bigint" ? Number(read) : undefined;
    };
    const rows = size("nr");
    const columns = size("nc");
    if (rows !== undefined && columns !== undefined && parts.includes("cidx")) {
      return {
        name,
        shape: [rows, columns],
        type: type === "bool sparse matrix" ? "sparse logical" : "sparse double",
        numeric: true,
        source: {
          kind: "sparse",
          rows,
          columns,
          columnStarts: `${valuePath}/cidx`,
          ...(parts.includes("ridx") ? { rowIndices: `${valuePath}/ridx` } : {}),
          ...(parts.includes("data") ? { values: `${valuePath}/data` } : {}),
        },
      };
    }
  }
  return { name, shape: [], type, numeric: false };
}

/** How a stored type is named in messages, and whether plexus reads it as numbers. */
export function storedType(metadata: Metadata): { type: string; numeric: boolean } {
  if (metadata.virtual_sources?.some((source) => source.file_name !== ".")) return { type: "virtual dataset over other files", numeric: false };
  switch (metadata.type) {
    case H5T.integer:
      return { type: `${metadata.signed ? "int" : "uint"}${metadata.size * 8}`, numeric: [1, 2, 4, 8].includes(metadata.size) };
    case H5T.float:
      return { type: `float${metadata.size * 8}`, numeric: metadata.size === 4 || metadata.size === 8 };
    case H5T.enum:
      return isBooleanEnum(metadata) ? { type: "bool", numeric: true } : { type: "enum", numeric: false };
    case H5T.string:
      return { type: "string", numeric: false };
    case H5T.compound:
      return { type: isComplex(metadata) ? "complex" : "compound", numeric: false };
    case H5T.reference:
      return { type: "reference", numeric: false };
    case H5T.vlen:
      return { type: "variable-length", numeric: false };
    case H5T.array:
      return { type: "array type", numeric: false };
    case H5T.bitfield:
      return { type: "bitfield", numeric: false };
    case H5T.opaque:
      return { type: "opaque", numeric: false };
    default:
      return { type: "time", numeric: false };
  }
}

/** h5py's bool: an 8-bit enum of FALSE = 0 and TRUE = 1. */
function isBooleanEnum(metadata: Metadata): boolean {
  const members = metadata.enum_type?.members;
  if (!members) return false;
  const names = Object.keys(members).sort();
  return names.length === 2 && names[0] === "FALSE" && names[1] === "TRUE" && members.FALSE === 0 && members.TRUE === 1 && metadata.size === 1;
}

/** Complex numbers as h5py (r, i) and MATLAB (real, imag) write them: two float members. */
function isComplex(metadata: Metadata): boolean {
  const members = metadata.compound_type?.members ?? [];
  const names = members.map((m) => m.name).join(",");
  return members.length === 2 && members.every((m) => m.type === H5T.float) && (names === "r,i" || names === "real,imag");
}

function metadataOf(library: Hdf5Library, dataset: Dataset, path: string): Metadata {
  return hdf5Call(library, `cannot read the description of '${printable(path)}'`, () => dataset.metadata);
}

function datasetMetadata(library: Hdf5Library, group: Group, member: string): Metadata {
  const path = `${group.path}/${member}`;
  const dataset = hdf5Call(library, `cannot open '${printable(path)}'`, () => group.get(path));
  if ((dataset as { type?: string } | null)?.type !== "Dataset") throw new InputError(`'${printable(path)}' is not a dataset`);
  return metadataOf(library, dataset as Dataset, path);
}

function attributesOf(library: Hdf5Library, object: Group | Dataset, path: string): Attributes {
  return hdf5Call(library, `cannot list the attributes of '${printable(path)}'`, () => object.attrs);
}

function attributeValue(library: Hdf5Library, attributes: Attributes, name: string, path: string): unknown {
  if (!Object.hasOwn(attributes, name)) return undefined;
  return hdf5Call(library, `cannot read the attribute ${name} of '${printable(path)}'`, () => attributes[name].value);
}

function textAttribute(library: Hdf5Library, attributes: Attributes, name: string, path: string): string | undefined {
  const value = attributeValue(library, attributes, name, path);
  if (typeof value === "string") return value;
  if (Array.isArray(value) && typeof value[0] === "string") return value[0];
  return undefined;
}

function numberAttribute(library: Hdf5Library, attributes: Attributes, name: string, path: string): number | undefined {
  const value = attributeValue(library, attributes, name, path);
  if (typeof value === "number" || typeof value === "bigint") return Number(value);
  if (typeof value === "boolean") return value ? 1 : 0;
  if (ArrayBuffer.isView(value) && (value as unknown as ArrayLike<number>).length > 0) return Number((value as unknown as ArrayLike<number | bigint>)[0]);
  return undefined;
}
