import { workerData, type MessagePort } from "node:worker_threads";
import { InputError } from "../../errors.js";
import { hdf5Call, type H5Wasm, type Hdf5Library } from "./hdf5Calls.js";
import { listObjects } from "./hdf5Objects.js";
import { CONTROL, type Hdf5Message, type Hdf5Reply, type Hdf5Request } from "./hdf5Types.js";
import { readValues } from "./hdf5Values.js";

// The HDF5 worker thread (started by hdf5Thread.ts): loads h5wasm, the HDF5 C
// library built to WebAssembly, whose module only loads asynchronously, and
// answers one request at a time while the asking thread waits. Each request
// brings the file's bytes (shared memory), which h5wasm's in-memory file system
// takes as they are: HDF5 never sees the real file system.

// HDF5 prints its error stack through Emscripten's stderr, which h5wasm binds to
// console.error as it loads: collected here, and judged after each call (hdf5Calls.ts).
const printed: string[] = [];
console.error = (...parts: unknown[]) => void printed.push(parts.map(String).join(" "));
console.warn = console.error;
console.log = console.error;

interface MemoryFileSystem {
  writeFile(path: string, data: Uint8Array, options: { canOwn: boolean }): void;
  unlink(path: string): void;
}

const { port, control } = workerData as { port: MessagePort; control: Int32Array };
const INPUT = "/plexus-input.h5";

const loaded: Promise<{ library: Hdf5Library; fs: MemoryFileSystem }> = import("h5wasm").then(async ({ default: h5 }) => {
  const module = await h5.ready;
  return { library: { h5, module, takeDiagnostics: () => printed.splice(0) }, fs: module.FS as unknown as MemoryFileSystem };
});

port.on("message", ({ id, body: request }: Hdf5Message<Hdf5Request>) => {
  loaded.then(
    ({ library, fs }) => {
      const answered = answer(library, fs, request);
      if (!library.trapped) return reply(id, answered);
      // HDF5 trapped inside WebAssembly on this file: answer, then stop, so the next file meets a fresh library.
      reply(id, { ...answered, retired: true });
      port.close();
    },
    (error: unknown) => reply(id, { kind: "failure", stack: `h5wasm did not load: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}` }),
  );
});

function answer(library: Hdf5Library, fs: MemoryFileSystem, request: Hdf5Request): Hdf5Reply {
  try {
    fs.writeFile(INPUT, request.bytes, { canOwn: true });
    try {
      const file = openFile(library, library.h5);
      try {
        if (request.op === "list") return { kind: "listing", listing: listObjects(library, file, request.layout) };
        return { kind: "values", values: readValues(library, file, request.entry, () => void Atomics.add(control, CONTROL.progress, 1)) };
      } finally {
        file.close();
      }
    } finally {
      fs.unlink(INPUT);
      library.takeDiagnostics();
    }
  } catch (error) {
    if (error instanceof InputError) return { kind: "problem", message: error.message, ...(error.hint ? { hint: error.hint } : {}) };
    return { kind: "failure", stack: error instanceof Error ? (error.stack ?? error.message) : String(error) };
  }
}

function openFile(library: Hdf5Library, h5: H5Wasm): InstanceType<H5Wasm["File"]> {
  const file = hdf5Call(library, "cannot open the file as HDF5", () => new h5.File(INPUT, "r"));
  if (file.file_id < 0n) throw new InputError("cannot open the file as HDF5: HDF5 did not recognise it");
  return file;
}

function reply(id: number, body: Hdf5Reply): void {
  const message: Hdf5Message<Hdf5Reply> = { id, body };
  port.postMessage(message, body.kind === "values" ? [body.values.buffer as ArrayBuffer] : []);
  Atomics.store(control, CONTROL.answered, id);
  Atomics.notify(control, CONTROL.answered);
}
