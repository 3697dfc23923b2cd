// Runs solveExact in a node:worker_threads worker (dist/edWorker.js) so that the caller's event
// loop stays free: progress is forwarded, an AbortSignal terminates the worker at once, and
// every failure rejects with a clear Error (EdSizeError / EdInputError / CancelledError restored
// from the worker's serialized error, or an Error naming the worker file for crashes).
import { existsSync } from "node:fs";
import { join, resolve } from "node:path";
import { Worker } from "node:worker_threads";
import type { SpinCluster } from "../types";
import { CancelledError, deserializeEdError } from "./errors";
import type { ExactOptions, ExactResult } from "./solve";
import type { WorkerInput, WorkerMessage } from "./worker";

export interface RunInWorkerOptions {
  onProgress?: (fraction: number, stage: string) => void;
  signal?: AbortSignal;
  /** Path of the bundled worker (default: edWorker.js next to the running bundle, else dist/). */
  workerPath?: string;
}

/** Default location of the bundled worker. */
export function defaultWorkerPath(): string {
  const here = typeof __dirname === "string" ? __dirname : undefined;
  if (here) {
    const p = join(here, "edWorker.js");
    if (existsSync(p)) return p;
  }
  return resolve(process.cwd(), "dist", "edWorker.js");
}

export function runExactInWorker(
  cluster: SpinCluster,
  options: ExactOptions,
  run: RunInWorkerOptions = {},
): Promise<ExactResult> {
  const workerPath = run.workerPath ?? defaultWorkerPath();
  return new Promise<ExactResult>((resolvePromise, reject) => {
    if (run.signal?.aborted) {
      reject(new CancelledError());
      return;
    }
    if (!existsSync(workerPath)) {
      reject(new Error(`exact-diagonalization worker not found at ${workerPath} (run \`node scripts/build.mjs\`)`));
      return;
    }
    let settled = false;
    const input: WorkerInput = { cluster, options };
    let worker: Worker;
    try {
      worker = new Worker(workerPath, { workerData: input });
    } catch (e) {
      reject(new Error(`could not start the exact-diagonalization worker ${workerPath}: ${(e as Error).message}`));
      return;
    }
    const finish = (fn: () => void): void => {
      if (settled) return;
      settled = true;
      run.signal?.removeEventListener("abort", onAbort);
      fn();
    };
    const onAbort = (): void => {
      finish(() => reject(new CancelledError()));
      void worker.terminate();
    };
    run.signal?.addEventListener("abort", onAbort, { once: true });
    worker.on("message", (msg: WorkerMessage) => {
      if (settled) return;
      if (msg.type === "progress") run.onProgress?.(msg.fraction, msg.stage);
      else if (msg.type === "result") {
        finish(() => resolvePromise(msg.result as ExactResult));
        void worker.terminate();
      } else if (msg.type === "error") {
        finish(() => reject(deserializeEdError(msg.error)));
        void worker.terminate();
      }
    });
    worker.on("error", (e) => {
      finish(() => reject(new Error(`exact-diagonalization worker failed: ${e.message}`)));
    });
    worker.on("exit", (code) => {
      finish(() => reject(new Error(`exact-diagonalization worker exited with code ${code} before returning a result`)));
    });
  });
}
