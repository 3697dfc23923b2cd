// The Web Worker build of the server (dist/serverWeb.js, as VS Code for the web runs it), loaded
// in a Node worker thread behind a minimal `self` (postMessage / onmessage, as in a browser
// worker) and driven with raw JSON-RPC messages: initialize, didOpen, pull diagnostics, hover.
import { execFileSync } from "node:child_process";
import { existsSync } from "node:fs";
import { join } from "node:path";
import { Worker } from "node:worker_threads";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CHAIN } from "../service/fixtures";

const ROOT = join(__dirname, "..", "..");
const SERVER_WEB = join(ROOT, "dist", "serverWeb.js");

// The worker's global `self` as a browser worker has it, backed by the thread's parent port.
const BOOT = `
const { parentPort, workerData } = require("node:worker_threads");
const listeners = { error: [] };
globalThis.self = {
  postMessage: (m) => parentPort.postMessage(m),
  set onmessage(fn) { parentPort.on("message", (data) => fn({ data })); },
  addEventListener: (type, fn) => { (listeners[type] = listeners[type] || []).push(fn); },
};
require(workerData.bundle);
`;

describe("web worker server", () => {
  let worker: Worker;
  let nextId = 1;
  const pending = new Map<number, (m: { result?: unknown; error?: unknown }) => void>();

  function request(method: string, params: unknown): Promise<{ result?: unknown; error?: unknown }> {
    const id = nextId++;
    return new Promise((resolve) => {
      pending.set(id, resolve);
      worker.postMessage({ jsonrpc: "2.0", id, method, params });
    });
  }

  beforeAll(() => {
    // `npm test` runs scripts/build.mjs only; the editor bundles come from scripts/buildEditor.mjs.
    if (!existsSync(SERVER_WEB)) execFileSync(process.execPath, ["scripts/buildEditor.mjs"], { cwd: ROOT, stdio: "ignore" });
    worker = new Worker(BOOT, { eval: true, workerData: { bundle: SERVER_WEB } });
    worker.on("message", (m: { id?: number; method?: string; result?: unknown; error?: unknown }) => {
      if (typeof m.id === "number" && m.method === undefined) pending.get(m.id)?.(m);
      else if (typeof m.id === "number" && m.method) worker.postMessage({ jsonrpc: "2.0", id: m.id, result: null });
    });
  });

  afterAll(async () => {
    await worker.terminate();
  });

  it("initializes, analyses an opened document and hovers the field", async () => {
    const init = (await request("initialize", { processId: null, rootUri: null, capabilities: { textDocument: { diagnostic: {} } } })).result as {
      capabilities: { diagnosticProvider?: unknown };
    };
    expect(init.capabilities.diagnosticProvider).toBeTruthy();
    worker.postMessage({ jsonrpc: "2.0", method: "initialized", params: {} });
    const uri = "file:///chain.spw";
    worker.postMessage({ jsonrpc: "2.0", method: "textDocument/didOpen", params: { textDocument: { uri, languageId: "spw", version: 1, text: CHAIN } } });
    const report = (await request("textDocument/diagnostic", { textDocument: { uri } })).result as { items: { code: string }[] };
    expect(report.items.map((d) => d.code)).toContain("spw-bond-duplicate");
    const line = CHAIN.split("\n").findIndex((l) => l.trim().startsWith("field"));
    const hover = (await request("textDocument/hover", { textDocument: { uri }, position: { line, character: 3 } })).result as { contents: { value: string } };
    // E_Z = g muB B = 2.06 * 5.788381806e-2 meV/T * 3.5 T (CODATA 2018), 5 significant digits.
    expect(hover.contents.value).toContain(`${Number((2.06 * 5.788381806e-2 * 3.5).toPrecision(5))} meV`);
  });
});
