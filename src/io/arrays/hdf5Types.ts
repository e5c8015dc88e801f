import type { ArrayEntry } from "./arrayContainer.js";

// What the HDF5 reader's two threads say to each other (hdf5Thread.ts asks,
// hdf5Worker.ts answers): the file's entries, then one entry's values.

/** How a file is read: plain HDF5, or a MATLAB 7.3 .mat (HDF5 after a 512-byte user block). */
export type Hdf5Layout = "hdf5" | "mat73";

/** Where an entry's values are in the file and how they are laid out. */
export type Hdf5Source =
  /** One dataset; `columnMajor` when MATLAB or GNU Octave wrote it (HDF5 sees the array's dims reversed). */
  | { kind: "dense"; dataset: string; columnMajor: boolean }
  /** A compressed-sparse-column matrix (MATLAB's and Octave's sparse layouts): column starts, row indices, values. */
  | { kind: "sparse"; rows: number; columns: number; columnStarts: string; rowIndices?: string; values?: string };

/** An entry as the worker lists it: readable ones carry their source. */
export interface Hdf5Entry extends ArrayEntry {
  source?: Hdf5Source;
}

export interface Hdf5Listing {
  /** "HDF5", "MATLAB 7.3 .mat" or "HDF5 (GNU Octave's save -hdf5)". */
  format: string;
  entries: Hdf5Entry[];
}

export type Hdf5Request =
  | { op: "list"; bytes: Uint8Array; layout: Hdf5Layout }
  | { op: "read"; bytes: Uint8Array; entry: Hdf5Entry & { source: Hdf5Source } };

export type Hdf5Reply = (
  | { kind: "listing"; listing: Hdf5Listing }
  | { kind: "values"; values: Float64Array }
  /** A problem with the file the user can fix (becomes an InputError naming the file). */
  | { kind: "problem"; message: string; hint?: string }
  /** Anything else: a bug or a broken installation. */
  | { kind: "failure"; stack: string }
) & {
  /** The worker is stopping (HDF5 trapped on this file): the next request starts another. */
  retired?: boolean;
};

/** What goes over the port: each request with its number, each reply with the number of the request it answers. */
export interface Hdf5Message<T> {
  id: number;
  body: T;
}

/** Slots of the Int32Array the two threads share. */
export const CONTROL = {
  /** The number of the last request answered (its reply is posted before this is set). */
  answered: 0,
  /** Bumped by the worker as it makes progress (the asking thread gives up only on a stall). */
  progress: 1,
  length: 2,
} as const;
