import { workerData, type MessagePort } from "node:worker_threads";
import { runBlockWorker, type BlockJob } from "./matrixBlocks.js";

/** A worker thread that loads blocks of matrices beside the calling thread (matrixBlocks.ts). */
const { job, control, port } = workerData as { job: BlockJob; control: Int32Array; port: MessagePort };
runBlockWorker(job, control, port);
port.close();
