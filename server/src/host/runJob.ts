// Runs a heavy job in a worker thread: progress forwarded, an AbortSignal terminates the worker
// at once, failures reject with a clear Error. Host layer (Node).
import { existsSync } from "node:fs";
import { join, resolve } from "node:path";
import { Worker } from "node:worker_threads";
import { CancelledError, deserializeEdError } from "../physics/ed/errors";
import type { HeavyJob, JobResult, JobWorkerMessage } from "./jobs";

export interface RunJobOptions {
  readonly onProgress?: (fraction: number, stage: string) => void;
  readonly signal?: AbortSignal;
  readonly workerPath?: string;
}

export function defaultJobWorkerPath(): string {
  const here = typeof __dirname === "string" ? __dirname : undefined;
  if (here && existsSync(join(here, "jobWorker.js"))) return join(here, "jobWorker.js");
  return resolve(__dirname ?? process.cwd(), "..", "..", "..", "dist", "jobWorker.js");
}

export function runJobInWorker<J extends HeavyJob>(job: J, options: RunJobOptions = {}): Promise<JobResult<J>> {
  const path = options.workerPath ?? defaultJobWorkerPath();
  return new Promise<JobResult<J>>((resolvePromise, reject) => {
    if (options.signal?.aborted) return reject(new CancelledError());
    if (!existsSync(path)) return reject(new Error(`the worker for exact checks was not found at ${path}; run \`npm run build\``));
    let done = false;
    const worker = new Worker(path, { workerData: job });
    const finish = (fn: () => void): void => {
      if (done) return;
      done = true;
      options.signal?.removeEventListener("abort", onAbort);
      fn();
      void worker.terminate();
    };
    const onAbort = (): void => finish(() => reject(new CancelledError()));
    options.signal?.addEventListener("abort", onAbort, { once: true });
    worker.on("message", (m: JobWorkerMessage) => {
      if (m.type === "progress") options.onProgress?.(m.fraction, m.stage);
      else if (m.type === "result") finish(() => resolvePromise(m.result as JobResult<J>));
      else finish(() => reject(deserializeEdError(m.error)));
    });
    worker.on("error", (e) => finish(() => reject(new Error(`the exact-check worker failed: ${e.message}`))));
    worker.on("exit", (code) => finish(() => reject(new Error(`the exact-check worker stopped (exit code ${code}) before it finished`))));
  });
}
