import { parentPort, workerData } from "node:worker_threads";
import { unpackSharedViews } from "../parallel/sharedViews.js";
import { computeNullRange } from "./nullRange.js";
import type { NullContext } from "./nullRangeTypes.js";

/** A worker thread: receives ranges of relabelings, returns their null rows. */
const context = unpackSharedViews<NullContext>(workerData);
parentPort!.on("message", (range: { from: number; to: number }) => {
  const chunk = computeNullRange(context, range.from, range.to);
  parentPort!.postMessage(chunk, [chunk.maxExtent.buffer, chunk.maxMass.buffer, chunk.maxStatistic.buffer, ...chunk.extra.map((v) => v.buffer)] as ArrayBuffer[]);
});
