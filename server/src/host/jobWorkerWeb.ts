// Web Worker entry for heavy jobs in the browser build (bundled to dist/jobWorkerWeb.js): receives
// one HeavyJob, answers with the messages of JobWorkerMessage (progress, then result or error).
// Cancellation: the parent terminates the worker. Host layer.
import { serializeEdError } from "../physics/ed/errors";
import { runJob, type HeavyJob, type JobWorkerMessage } from "./jobs";

// The dedicated worker's global scope, typed here so the shared tsconfig needs no DOM library.
declare const self: { onmessage: ((event: { data: unknown }) => void) | null; postMessage(message: JobWorkerMessage): void };

self.onmessage = (event) => {
  self.onmessage = null;
  try {
    const result = runJob(event.data as HeavyJob, { onProgress: (fraction, stage) => self.postMessage({ type: "progress", fraction, stage }) });
    self.postMessage({ type: "result", result });
  } catch (e) {
    self.postMessage({ type: "error", error: serializeEdError(e) });
  }
};
