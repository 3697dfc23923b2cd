// Runs a heavy job in a Web Worker (the browser build: the language server itself is a Web
// Worker and starts this one inside it): progress forwarded, an AbortSignal terminates the worker
// at once, failures reject with a clear Error. The worker is made by `createWorker`, so the same
// code runs against a real browser Worker or a test double. Host layer (no DOM types, no Node).
import { CancelledError, deserializeEdError } from "../physics/ed/errors";
import type { HeavyJob, JobResult, JobWorkerMessage } from "./jobs";

/** The part of the browser's Worker that the runner uses. */
export interface WebWorkerLike {
  postMessage(message: unknown): void;
  terminate(): void;
  onmessage: ((event: { data: unknown }) => void) | null;
  onerror: ((event: { message?: string; preventDefault?: () => void }) => void) | null;
}

export interface RunWebJobOptions {
  readonly createWorker: () => WebWorkerLike;
  readonly onProgress?: (fraction: number, stage: string) => void;
  readonly signal?: AbortSignal;
}

export function runJobInWebWorker<J extends HeavyJob>(job: J, options: RunWebJobOptions): Promise<JobResult<J>> {
  return new Promise<JobResult<J>>((resolvePromise, reject) => {
    if (options.signal?.aborted) return reject(new CancelledError());
    let worker: WebWorkerLike;
    try {
      worker = options.createWorker();
    } catch (e) {
      return reject(new Error(`the exact-check worker could not be started: ${(e as Error).message}`));
    }
    let done = false;
    const finish = (fn: () => void): void => {
      if (done) return;
      done = true;
      options.signal?.removeEventListener("abort", onAbort);
      worker.onmessage = null;
      worker.onerror = null;
      worker.terminate();
      fn();
    };
    const onAbort = (): void => finish(() => reject(new CancelledError()));
    options.signal?.addEventListener("abort", onAbort, { once: true });
    worker.onmessage = (event) => {
      const m = event.data as JobWorkerMessage;
      if (m?.type === "progress") options.onProgress?.(m.fraction, m.stage);
      else if (m?.type === "result") finish(() => resolvePromise(m.result as JobResult<J>));
      else if (m?.type === "error") finish(() => reject(deserializeEdError(m.error)));
    };
    worker.onerror = (event) => {
      event.preventDefault?.();
      finish(() => reject(new Error(`the exact-check worker failed: ${event.message ?? "unknown error"}`)));
    };
    worker.postMessage(job);
  });
}
