import type h5wasm from "h5wasm";
import { InputError } from "../../errors.js";

// Calls into h5wasm (the HDF5 C library built to WebAssembly) on the HDF5
// worker thread. HDF5 reports most failures by printing its error stack rather
// than by failing the call (a read that fails can leave the buffer as it was),
// so every call is judged by what it printed as well as by what it threw.

export type H5Wasm = typeof h5wasm;
/** The Emscripten module underneath: its heap, malloc and HDF5's read call. */
export type H5Module = Awaited<H5Wasm["ready"]>;

export interface Hdf5Library {
  h5: H5Wasm;
  module: H5Module;
  /** What HDF5 printed since the last call (its error stack), emptied. */
  takeDiagnostics(): string[];
  /** Set once a call trapped inside the WebAssembly module (an abort, an access out of bounds): its state can no longer be trusted. */
  trapped?: boolean;
}

/** Runs `action`; anything HDF5 threw or printed becomes an InputError "`what`: HDF5's reason". */
export function hdf5Call<T>(library: Hdf5Library, what: string, action: () => T): T {
  library.takeDiagnostics();
  let result: T;
  try {
    result = action();
  } catch (error) {
    if (error instanceof InputError) throw error;
    if (error instanceof Error && error.name === "RuntimeError") library.trapped = true; // WebAssembly.RuntimeError
    const printed = library.takeDiagnostics();
    throw new InputError(`${what}: ${innermostReason(printed) ?? (error instanceof Error ? error.message : String(error))}`);
  }
  const printed = library.takeDiagnostics();
  if (printed.length > 0) throw new InputError(`${what}: ${innermostReason(printed) ?? "HDF5 reported an error"}`);
  return result;
}

/**
 * The last (innermost) step of an HDF5 error stack, e.g. from
 * "#012: …/H5Defl.c line 318 in H5D__efl_read(): unable to open external raw data file"
 * the text after "(): ".
 */
export function innermostReason(lines: readonly string[]): string | undefined {
  let reason: string | undefined;
  for (const text of lines) {
    for (const line of text.split("\n")) {
      const match = /#\d+:.*?\(\): (.*)$/.exec(line);
      if (match) reason = match[1].trim();
    }
  }
  return reason;
}
