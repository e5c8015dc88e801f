import { InputError, isInputError } from "../../errors.js";
import { npyDataOffset, parseDType, parseNpy, parseNpyHeader, type NpyHeader } from "../npy.js";
import { printable } from "../printable.js";
import { parsePythonLiteral, type PyValue } from "../pythonLiteral.js";
import type { ArrayContainer, ArrayEntry } from "./arrayContainer.js";
import { memberContent, memberPrefix, zipMembers, type ZipMember } from "./zipArchive.js";

// A NumPy .npz archive (numpy.savez, numpy.savez_compressed): a zip archive
// whose member NAME.npy holds the array NAME in the .npy format. Listing the
// arrays inflates each member's header only; a member's data is inflated when
// it is read.

const NPY_SUFFIX = ".npy";
/** Bytes inflated first to find a member's .npy header (a longer header is inflated once its length is known). */
const HEADER_PROBE_BYTES = 4096;
/** numpy's own reader refuses headers over 10 000 bytes by default; beyond this a header is taken as damage. */
const HEADER_LIMIT_BYTES = 2 ** 20;
/** The largest array read from a zip archive, in bytes once read as float64 (a larger one belongs in a .npy file). */
export const NPZ_ARRAY_LIMIT_BYTES = 2 ** 31;

interface NpzArray {
  member: ZipMember;
  /** Why the array cannot be read as numbers (its dtype), for a non-numeric entry. */
  problem?: InputError;
}

function inMember(member: ZipMember, error: InputError): InputError {
  return new InputError(`member '${printable(member.name)}': ${error.message}`, error.location, error.hint);
}

/** The first `count` bytes of a member, which must be there. */
function prefixOf(bytes: Uint8Array, member: ZipMember, count: number, file: string): Uint8Array {
  const prefix = memberPrefix(bytes, member, count, file);
  if (prefix.length < count) {
    throw new InputError(`member '${printable(member.name)}' holds fewer bytes than the ${member.size} it declares (the archive is truncated or damaged)`, { file });
  }
  return prefix;
}

/** The .npy header of a member, from its first bytes only; its declared size must be exactly what the header's shape and dtype need. */
function memberHeader(bytes: Uint8Array, member: ZipMember, file: string): { header?: NpyHeader; prefix: Uint8Array } {
  let prefix = prefixOf(bytes, member, Math.min(member.size, HEADER_PROBE_BYTES), file);
  const dataOffset = npyDataOffset(prefix);
  if (dataOffset !== undefined && dataOffset > prefix.length && dataOffset <= member.size) {
    if (dataOffset > HEADER_LIMIT_BYTES) {
      throw new InputError(`member '${printable(member.name)}' has a .npy header of ${dataOffset} bytes, beyond the ${HEADER_LIMIT_BYTES} read (the archive is damaged)`, { file });
    }
    prefix = prefixOf(bytes, member, dataOffset, file);
  }
  try {
    return { header: parseNpyHeader(prefix, file, member.size), prefix };
  } catch (error) {
    if (!isInputError(error)) throw error;
    if (nonNumericHeader(prefix)) return { prefix };
    throw inMember(member, error);
  }
}

/** The header's 'descr' and 'shape' as far as they can be read, for an array of a type plexus does not read. */
function looseHeader(prefix: Uint8Array): { descr: PyValue; shape: number[] } | undefined {
  const dataOffset = npyDataOffset(prefix);
  if (dataOffset === undefined || dataOffset > prefix.length) return undefined;
  try {
    const literal = parsePythonLiteral(new TextDecoder("latin1").decode(prefix.subarray(prefix[6] === 1 ? 10 : 12, dataOffset)));
    if (!(literal instanceof Map) || !literal.has("descr")) return undefined;
    const shape = literal.get("shape");
    const extents = Array.isArray(shape) && shape.every((v) => typeof v === "number") ? (shape as number[]) : [];
    return { descr: literal.get("descr")!, shape: extents };
  } catch {
    return undefined;
  }
}

/** True when the header is readable but names an element type that is not a number (text, objects, complex, records). */
function nonNumericHeader(prefix: Uint8Array): boolean {
  const loose = looseHeader(prefix);
  return loose !== undefined && (typeof loose.descr !== "string" || parseDType(loose.descr) === undefined);
}

/** "text (<U13)", "complex (<c16)", "records", … */
function nonNumericType(descr: PyValue): string {
  if (typeof descr !== "string") return "records (structured dtype)";
  const kind = /^[<>=|]?([a-zA-Z])/.exec(descr)?.[1];
  const word = kind === "U" || kind === "S" ? "text" : kind === "c" ? "complex" : kind === "O" ? "Python objects" : kind === "f" ? "float of an unsupported size" : "unsupported type";
  return `${word} (${descr})`;
}

/** A NumPy .npz archive as a container of its arrays (member NAME.npy is the entry NAME). */
export function npzContainer(bytes: Uint8Array, file: string): ArrayContainer {
  const members = zipMembers(bytes, file).filter((member) => !member.name.endsWith("/"));
  const arrays = members.filter((member) => member.name.endsWith(NPY_SUFFIX));
  if (arrays.length === 0) {
    const shown = members.slice(0, 10).map((member) => `'${printable(member.name)}'`).join(", ");
    throw new InputError(
      `this file is a zip archive without NumPy arrays (no member ends in .npy; ${members.length === 0 ? "it is empty" : `it holds ${shown}${members.length > 10 ? ` and ${members.length - 10} more` : ""}`})`,
      { file },
      "plexus reads a zip archive only as NumPy's .npz (numpy.savez or numpy.savez_compressed); unpack the matrices and point connectomes: at them",
    );
  }
  const entries: ArrayEntry[] = [];
  const index = new Map<string, NpzArray>();
  for (const member of arrays) {
    const name = member.name.slice(0, -NPY_SUFFIX.length);
    if (index.has(name)) continue; // a repeated member name: the first one counts
    const { header, prefix } = memberHeader(bytes, member, file);
    if (header) {
      if (header.count * Float64Array.BYTES_PER_ELEMENT > NPZ_ARRAY_LIMIT_BYTES) {
        throw new InputError(
          `member '${printable(member.name)}' holds ${header.count} values (shape ${header.shape.join(" × ")}), more than plexus reads from a zip archive (${NPZ_ARRAY_LIMIT_BYTES / 2 ** 30} GiB as float64)`,
          { file },
          "save a stack this large with numpy.save as one .npy file, which is read one matrix at a time",
        );
      }
      entries.push({ name, shape: header.shape, type: header.descr, numeric: true });
      index.set(name, { member });
    } else {
      const loose = looseHeader(prefix)!;
      const type = nonNumericType(loose.descr);
      entries.push({ name, shape: loose.shape, type, numeric: false });
      index.set(name, { member, problem: new InputError(`member '${printable(member.name)}' holds ${type} values, not numbers`, { file }) });
    }
  }
  return {
    format: "NumPy .npz",
    entries,
    read: (name) => {
      const array = index.get(name);
      if (!array) throw new InputError(`the archive has no member '${printable(name)}${NPY_SUFFIX}'`, { file });
      if (array.problem) throw array.problem;
      const content = memberContent(bytes, array.member, file);
      try {
        const { shape, data } = parseNpy(content, file);
        return { shape, values: data };
      } catch (error) {
        if (!isInputError(error)) throw error;
        throw inMember(array.member, error);
      }
    },
  };
}
