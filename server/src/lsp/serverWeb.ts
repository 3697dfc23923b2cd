// The Web Worker entry of the language server (bundled to dist/serverWeb.js) for VS Code in the
// browser: the same server as serverNode.ts, exchanging worker messages with the extension.
// Exact checks run in a nested Web Worker (dist/jobWorkerWeb.js, next to this bundle), so this
// worker keeps answering while they run. LSP layer.
import { BrowserMessageReader, BrowserMessageWriter, createConnection, ProposedFeatures } from "vscode-languageserver/browser";
import { runJobInWebWorker, type WebWorkerLike } from "../host/runJobWeb";
import { startServer, type ServerRuntime } from "./server";

// The worker global scope; typed from the reader so the shared tsconfig needs no DOM library.
declare const self: ConstructorParameters<typeof BrowserMessageReader>[0] & { location?: { href: string } };
declare const Worker: (new (url: string) => WebWorkerLike) | undefined;

/** Where the job worker is: beside this bundle. Null where workers cannot start workers. */
function jobWorkerUrl(): string | null {
  if (typeof Worker === "undefined" || !self.location?.href) return null;
  try {
    const url = new URL("jobWorkerWeb.js", self.location.href);
    return url.protocol === "blob:" || url.protocol === "data:" ? null : url.href;
  } catch {
    return null;
  }
}

const url = jobWorkerUrl();
const runtime: ServerRuntime = url
  ? { runJob: (job, options) => runJobInWebWorker(job, { ...options, createWorker: () => new (Worker as new (u: string) => WebWorkerLike)(url) }) }
  : {};

startServer(createConnection(ProposedFeatures.all, new BrowserMessageReader(self), new BrowserMessageWriter(self)), runtime);
