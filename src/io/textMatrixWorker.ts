import { workerData, type MessagePort } from "node:worker_threads";
import { runBlockWorker, type TextBlockJob } from "./textMatrixBlocks.js";

/** A worker thread that loads blocks of text matrices beside the calling thread (textMatrixBlocks.ts). */
const { job, control, port } = workerData as { job: TextBlockJob; control: Int32Array; port: MessagePort };
runBlockWorker(job, control, port);
port.close();
