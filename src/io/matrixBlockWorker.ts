import { workerData, type MessagePort } from "node:worker_threads";
import { unpackSharedViews } from "../parallel/sharedViews.js";
import { runBlockWorker, type BlockJob } from "./matrixBlocks.js";

/** A worker thread that loads blocks of matrices beside the calling thread (matrixBlocks.ts). */
const { job, control, port } = unpackSharedViews<{ job: BlockJob; control: Int32Array; port: MessagePort }>(workerData);
runBlockWorker(job, control, port);
port.close();
