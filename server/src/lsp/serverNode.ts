// The stdio / IPC entry of the language server (bundled to dist/server.js): `node dist/server.js
// --stdio`, or `--node-ipc` from VS Code. Nothing but protocol frames may reach stdout, so
// stray errors go to stderr. LSP layer.
import { createConnection, ProposedFeatures } from "vscode-languageserver/node";
import { runJobInWorker } from "../host/runJob";
import { startServer } from "./server";

process.on("uncaughtException", (error) => {
  process.stderr.write(`spinwright server: uncaught exception: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
});
process.on("unhandledRejection", (reason) => {
  process.stderr.write(`spinwright server: unhandled rejection: ${reason instanceof Error ? (reason.stack ?? reason.message) : String(reason)}\n`);
});

// Exact checks run in a worker thread next to this bundle (dist/jobWorker.js).
startServer(createConnection(ProposedFeatures.all), { runJob: (job, options) => runJobInWorker(job, options) });
