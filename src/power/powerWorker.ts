import { parentPort, workerData } from "node:worker_threads";
import { unpackSharedViews } from "../parallel/sharedViews.js";
import { analysePowerCohort, type PowerPlan } from "./powerStudy.js";

/** A worker thread of `plexus power`: analyses cohorts k for one sample size. */
const plan = unpackSharedViews<PowerPlan>(workerData);
parentPort!.on("message", (task: { perGroup: number; from: number; to: number }) => {
  const outcomes = [];
  for (let k = task.from; k < task.to; k++) outcomes.push(analysePowerCohort(plan, task.perGroup, k));
  parentPort!.postMessage({ ...task, outcomes });
});
