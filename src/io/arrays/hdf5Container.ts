import { InputError } from "../../errors.js";
import { printable } from "../printable.js";
import type { ArrayContainer, ArrayEntry } from "./arrayContainer.js";
import { describeEntry } from "./chooseArray.js";
import { askHdf5Thread } from "./hdf5Thread.js";
import type { Hdf5Entry, Hdf5Layout, Hdf5Request } from "./hdf5Types.js";

/**
 * An HDF5 file (.h5, .hdf5) as a container: every dataset by its full path
 * (`/conn`, `/group/conn`) in its stored shape and C order; groups, strings,
 * compound types and references are listed as non-numeric. Variables written by
 * GNU Octave's `save -hdf5` are read as Octave saw them (see matlab73Container).
 */
export function hdf5Container(bytes: Uint8Array, file: string): ArrayContainer {
  return openHdf5(bytes, file, "hdf5");
}

/**
 * A MATLAB 7.3 .mat file (HDF5 after a 512-byte user block) in MATLAB's terms:
 * variables by name (`conn`; `/conn` is accepted too), in MATLAB's shape (the
 * HDF5 dims reversed, since MATLAB writes column-major) with the values in C
 * order over it, so an N × N × S stack saved in MATLAB is read N × N × S with
 * element (i, j, s) in place. Logical arrays read as 0/1 and sparse matrices as
 * dense; char, cell, struct and complex variables are listed as non-numeric.
 */
export function matlab73Container(bytes: Uint8Array, file: string): ArrayContainer {
  return openHdf5(bytes, file, "mat73");
}

function openHdf5(bytes: Uint8Array, file: string, layout: Hdf5Layout): ArrayContainer {
  // The worker thread reads the bytes where they are: shared memory, copied once if they are not in it already.
  const shared = bytes.buffer instanceof SharedArrayBuffer ? bytes : copyToShared(bytes);
  const reply = ask({ op: "list", bytes: shared, layout }, file);
  if (reply.kind !== "listing") throw new Error(`the HDF5 reading thread answered a listing with ${reply.kind}`);
  const { format, entries: listed } = reply.listing;
  const entries: ArrayEntry[] = listed.map(({ name, shape, type, numeric }) => ({ name, shape, type, numeric }));
  return {
    format,
    entries,
    read(name: string) {
      const entry = findEntry(listed, name);
      if (!entry) {
        throw new InputError(`${format} file has no variable '${printable(name)}'; ${holdings(entries)}`, { file });
      }
      if (!entry.source) throw new InputError(`variable ${describeEntry(entry)} is not a numeric array`, { file });
      const values = ask({ op: "read", bytes: shared, entry: { ...entry, source: entry.source } }, file);
      if (values.kind !== "values") throw new Error(`the HDF5 reading thread answered a read with ${values.kind}`);
      return { shape: entry.shape, values: values.values };
    },
  };
}

/** The entry `name` names: its exact name, or the same path with or without the leading slash (`conn` = `/conn`). */
function findEntry(entries: readonly Hdf5Entry[], name: string): Hdf5Entry | undefined {
  const bare = (text: string) => text.replace(/^\//, "");
  return entries.find((e) => e.name === name) ?? (name === "" ? undefined : entries.find((e) => bare(e.name) === bare(name)));
}

function holdings(entries: readonly ArrayEntry[]): string {
  if (entries.length === 0) return "it holds no array";
  const more = entries.length > 20 ? `, and ${entries.length - 20} more` : "";
  return `it holds ${entries.slice(0, 20).map(describeEntry).join(", ")}${more}`;
}

function ask(request: Hdf5Request, file: string) {
  const reply = askHdf5Thread(request);
  if (reply.kind === "problem") throw new InputError(reply.message, { file }, reply.hint);
  if (reply.kind === "failure") throw new Error(`reading the HDF5 file ${file} failed: ${reply.stack}`);
  return reply;
}

function copyToShared(bytes: Uint8Array): Uint8Array {
  const shared = new Uint8Array(new SharedArrayBuffer(bytes.length));
  shared.set(bytes);
  return shared;
}
