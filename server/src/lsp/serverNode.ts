// The stdio / IPC entry of the language server (bundled to dist/server.js): `node dist/server.js
// --stdio`, or `--node-ipc` from VS Code. Nothing but protocol frames may reach stdout, so
// stray errors go to stderr. LSP layer.
import { setFlagsFromString } from "node:v8";
import { createConnection, ProposedFeatures } from "vscode-languageserver/node";
import { runJobInWorker } from "../host/runJob";
import { startServer } from "./server";

process.on("uncaughtException", (error) => {
  process.stderr.write(`spinwright server: uncaught exception: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
});
process.on("unhandledRejection", (reason) => {
  process.stderr.write(`spinwright server: unhandled rejection: ${reason instanceof Error ? (reason.stack ?? reason.message) : String(reason)}\n`);
});

// V8 optimises a function once it has run a certain amount of bytecode (its interrupt budget,
// 66 KiB by default in Node 20). Most analysis steps run once per keystroke and are short, so with
// the default they stay in the baseline tier for thousands of keystrokes; a long-lived server that
// answers each keystroke does better when they are optimised after a few hundred. Measured with
// `npm run bench -- editor` (200-line model, digit typed, ratio to the JSON reference): 1.25-1.39
// with the default, 1.03-1.21 with 8 KiB over seven runs; 2 and 4 KiB gave no further gain. A
// budget given to node by the user (command line or NODE_OPTIONS) is left alone.
const given = [...process.execArgv, process.env["NODE_OPTIONS"] ?? ""].some((a) => a.includes("interrupt-budget"));
if (!given) setFlagsFromString(`--interrupt-budget=${8 * 1024}`);

// Exact checks run in a worker thread next to this bundle (dist/jobWorker.js).
startServer(createConnection(ProposedFeatures.all), { runJob: (job, options) => runJobInWorker(job, options) });
