// What a binary container of connectivity matrices holds, as every container reader
// (src/io/arrays/*Container.ts) gives it: named numeric arrays in a logical shape,
// their values in C order (the last index varies fastest), as float64.

/** A numeric array as its writer saw it: `shape` in the writer's own index order, `values` in C order over that shape. */
export interface NumericArray {
  shape: readonly number[];
  values: Float64Array;
}

/** One array a container holds, before it is read. */
export interface ArrayEntry {
  /** Its name: a variable (.mat, .npz member without `.npy`), an HDF5 path (`/group/conn`), or "" for a file that is one array. */
  name: string;
  shape: readonly number[];
  /** The stored type, for messages: "float64", "int16", "logical", "sparse double", "complex", "char", "struct", … */
  type: string;
  /** False for arrays that cannot be connectivity (text, structs, cells, complex): listed in messages, never chosen. */
  numeric: boolean;
}

/** A container file opened from its bytes. */
export interface ArrayContainer {
  /** The format as a user knows it, e.g. "MATLAB 5 .mat (compressed)", "HDF5", "MATLAB 7.3 .mat", "NumPy .npz", "NumPy .npy", "CIFTI-2 parcellated connectivity". */
  format: string;
  entries: readonly ArrayEntry[];
  /** Reads one entry (by `name`); throws InputError (file, and the variable) when it cannot. */
  read(name: string): NumericArray;
  /** Region labels the file itself carries (CIFTI-2 parcel names), in matrix order. */
  labels?: readonly string[];
}
