// node:worker_threads entry of the exact-diagonalization engine (bundled by esbuild to
// dist/edWorker.js). Protocol, worker -> parent:
//   { type: "progress", fraction, stage }   throttled progress of solveExact
//   { type: "result", result }              the ExactResult (plain JSON data)
//   { type: "error", error }                a SerializedEdError (see errors.ts)
// The input arrives as workerData { cluster, options }. Cancellation: the parent terminates the
// worker (runInWorker.ts); nothing is shared, so termination is always safe.
import { parentPort, workerData } from "node:worker_threads";
import type { SpinCluster } from "../types";
import { serializeEdError } from "./errors";
import { solveExact, type ExactOptions } from "./solve";

export interface WorkerInput {
  readonly cluster: SpinCluster;
  readonly options: ExactOptions;
}

export type WorkerMessage =
  | { readonly type: "progress"; readonly fraction: number; readonly stage: string }
  | { readonly type: "result"; readonly result: unknown }
  | { readonly type: "error"; readonly error: ReturnType<typeof serializeEdError> };

function main(): void {
  const port = parentPort;
  if (!port) return; // loaded outside a worker: nothing to do
  const input = workerData as WorkerInput;
  try {
    const result = solveExact(input.cluster, input.options ?? {}, {
      onProgress: (fraction, stage) => port.postMessage({ type: "progress", fraction, stage } satisfies WorkerMessage),
    });
    port.postMessage({ type: "result", result } satisfies WorkerMessage);
  } catch (e) {
    port.postMessage({ type: "error", error: serializeEdError(e) } satisfies WorkerMessage);
  }
}

main();
