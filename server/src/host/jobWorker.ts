// node:worker_threads entry for heavy jobs (bundled to dist/jobWorker.js). Messages to the parent:
// { type: "progress", fraction, stage }, { type: "result", result }, { type: "error", error }.
// Cancellation: the parent terminates the worker. Host layer.
import { parentPort, workerData } from "node:worker_threads";
import { serializeEdError } from "../physics/ed/errors";
import { runJob, type HeavyJob } from "./jobs";

function main(): void {
  const port = parentPort;
  if (!port) return;
  try {
    const result = runJob(workerData as HeavyJob, {
      onProgress: (fraction, stage) => port.postMessage({ type: "progress", fraction, stage }),
    });
    port.postMessage({ type: "result", result });
  } catch (e) {
    port.postMessage({ type: "error", error: serializeEdError(e) });
  }
}

main();
