// The Web Worker entry of the language server (bundled to dist/serverWeb.js) for VS Code in the
// browser: the same server as serverNode.ts, exchanging worker messages with the extension.
// Exact checks run in a nested Web Worker (dist/jobWorkerWeb.js), so this worker keeps answering
// while they run. LSP layer.
import { BrowserMessageReader, BrowserMessageWriter, createConnection, ProposedFeatures } from "vscode-languageserver/browser";
import { runJobInWebWorker, type WebWorkerLike } from "../host/runJobWeb";
import { startServer, type ServerRuntime } from "./server";

// The worker global scope; typed from the reader so the shared tsconfig needs no DOM library.
declare const self: ConstructorParameters<typeof BrowserMessageReader>[0] & { location?: { href: string } };
declare const Worker: (new (url: string) => WebWorkerLike) | undefined;
declare const Blob: new (parts: string[], options: { type: string }) => object;
declare const URL: { new (url: string, base?: string): { href: string; protocol: string }; createObjectURL?(blob: object): string };

/**
 * Where the job worker is: the client says (initializationOptions.jobWorkerUri); otherwise beside
 * this bundle, when this worker was loaded from a real URL (VS Code for the web loads it from a
 * blob: URL, which has no "beside").
 */
let jobWorkerUrl: string | null = null;
try {
  const here = self.location?.href ? new URL("jobWorkerWeb.js", self.location.href) : null;
  if (here && here.protocol !== "blob:" && here.protocol !== "data:") jobWorkerUrl = here.href;
} catch {
  jobWorkerUrl = null;
}

/** A worker for `url`: directly, or, where the origin differs, through a blob that imports it. */
function startJobWorker(url: string): WebWorkerLike {
  const W = Worker as new (u: string) => WebWorkerLike;
  try {
    return new W(url);
  } catch (direct) {
    if (!URL.createObjectURL) throw direct;
    return new W(URL.createObjectURL(new Blob([`importScripts(${JSON.stringify(url)});`], { type: "application/javascript" })));
  }
}

const runtime: ServerRuntime =
  typeof Worker === "undefined"
    ? {}
    : {
        initialize: (options) => {
          if (typeof options["jobWorkerUri"] === "string") jobWorkerUrl = options["jobWorkerUri"];
        },
        runJob: (job, options) => {
          const url = jobWorkerUrl;
          if (!url) return Promise.reject(new Error("the location of the exact-check worker (jobWorkerWeb.js) is unknown"));
          return runJobInWebWorker(job, { ...options, createWorker: () => startJobWorker(url) });
        },
      };

startServer(createConnection(ProposedFeatures.all, new BrowserMessageReader(self), new BrowserMessageWriter(self)), runtime);
