import { MessageChannel, Worker, receiveMessageOnPort, type MessagePort } from "node:worker_threads";
import { workerScript } from "../../parallel/workerPool.js";
import { CONTROL, type Hdf5Message, type Hdf5Reply, type Hdf5Request } from "./hdf5Types.js";

// The calling thread's side of the HDF5 reader. h5wasm's WebAssembly module
// loads only asynchronously, and plexus loads its inputs synchronously, so
// h5wasm lives on a worker thread of its own (hdf5Worker.ts), started the first
// time an HDF5 file is read and kept (unref'd) for the next: this thread posts
// a request and waits with Atomics.wait until the reply is posted, then takes it
// with receiveMessageOnPort. Nothing is loaded for runs without HDF5 input.

interface Hdf5Thread {
  worker: Worker;
  port: MessagePort;
  control: Int32Array;
}

/** The worker may go this long without progress (loading, listing, or one slab of values) before it is given up. */
const STALL_MILLISECONDS = 120_000;

let thread: Hdf5Thread | undefined;

function startThread(): Hdf5Thread {
  const channel = new MessageChannel();
  const control = new Int32Array(new SharedArrayBuffer(CONTROL.length * Int32Array.BYTES_PER_ELEMENT));
  const worker = new Worker(workerScript("io/arrays/hdf5Worker.js"), {
    workerData: { port: channel.port2, control },
    transferList: [channel.port2],
  });
  const started: Hdf5Thread = { worker, port: channel.port1, control };
  // A worker that stopped is replaced at the next request (seen when this thread's event loop next runs).
  const forget = (): void => {
    if (thread === started) thread = undefined;
  };
  worker.on("error", forget);
  worker.on("exit", forget);
  worker.unref();
  channel.port1.unref();
  return started;
}

let requests = 0;

/** Sends one request to the HDF5 worker and waits for its reply. */
export function askHdf5Thread(request: Hdf5Request): Hdf5Reply {
  const current = (thread ??= startThread());
  const { port, control } = current;
  const id = ++requests;
  const message: Hdf5Message<Hdf5Request> = { id, body: request };
  port.postMessage(message);
  let progress = Atomics.load(control, CONTROL.progress);
  let stalled = 0;
  const slice = 1000;
  for (let answered = Atomics.load(control, CONTROL.answered); answered !== id; answered = Atomics.load(control, CONTROL.answered)) {
    if (Atomics.wait(control, CONTROL.answered, answered, slice) !== "timed-out") continue;
    const now = Atomics.load(control, CONTROL.progress);
    stalled = now === progress ? stalled + slice : 0;
    progress = now;
    if (stalled >= STALL_MILLISECONDS) {
      retire(current);
      throw new Error(`the HDF5 reading thread gave no answer for ${STALL_MILLISECONDS / 1000} s`);
    }
  }
  const reply = receiveReply(port, id);
  if (reply.retired) retire(current);
  return reply;
}

const pause = new Int32Array(new SharedArrayBuffer(Int32Array.BYTES_PER_ELEMENT));

/** The reply to request `id` (posted before its number was set): replies to earlier requests, if any, are dropped. */
function receiveReply(port: MessagePort, id: number): Hdf5Reply {
  for (let waited = 0; ; ) {
    const received = receiveMessageOnPort(port);
    if (received) {
      const message = received.message as Hdf5Message<Hdf5Reply>;
      if (message.id === id) return message.body;
    } else if (waited < 1000) {
      Atomics.wait(pause, 0, 0, 1);
      waited++;
    } else {
      throw new Error(`the HDF5 reading thread answered request ${id}, but its reply did not come`);
    }
  }
}

function retire(stopping: Hdf5Thread): void {
  void stopping.worker.terminate();
  if (thread === stopping) thread = undefined;
}
