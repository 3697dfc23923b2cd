// The Web Worker build of the server (dist/serverWeb.js, as VS Code for the web runs it), loaded
// in a Node worker thread behind a minimal `self` (postMessage / onmessage / location, as in a
// browser worker) and driven with raw JSON-RPC messages: initialize, didOpen, pull diagnostics,
// hover; and the exact check, which the server runs in a nested worker (dist/jobWorkerWeb.js)
// through a browser-style `Worker` constructor backed by another worker thread.
import { execFileSync } from "node:child_process";
import { existsSync } from "node:fs";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { Worker } from "node:worker_threads";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CHAIN } from "../service/fixtures";

const ROOT = join(__dirname, "..", "..");
const SERVER_WEB = join(ROOT, "dist", "serverWeb.js");
const JOB_WORKER_WEB = join(ROOT, "dist", "jobWorkerWeb.js");

// The worker's global `self` as a browser worker has it, backed by the thread's parent port; with
// `nested`, also a browser-style `Worker` (new Worker(url), postMessage, onmessage, onerror,
// terminate) that runs the script at a file: URL in a further thread with the same `self`.
const BOOT = `
const { Worker: ThreadWorker, parentPort, workerData } = require("node:worker_threads");
const { fileURLToPath } = require("node:url");
globalThis.self = {
  location: { href: workerData.href },
  postMessage: (m) => parentPort.postMessage(m),
  set onmessage(fn) { parentPort.removeAllListeners("message"); if (fn) parentPort.on("message", (data) => fn({ data })); },
  addEventListener: () => {},
};
if (workerData.nested) {
  globalThis.Worker = class {
    constructor(url) {
      this.onmessage = null; this.onerror = null;
      this.thread = new ThreadWorker(workerData.boot, { eval: true, workerData: { boot: workerData.boot, href: url, bundle: fileURLToPath(url), nested: false } });
      this.thread.on("message", (data) => this.onmessage && this.onmessage({ data }));
      this.thread.on("error", (e) => this.onerror && this.onerror({ message: e.message }));
    }
    postMessage(m) { this.thread.postMessage(m); }
    terminate() { void this.thread.terminate(); }
  };
}
require(workerData.bundle);
`;

interface WebServer {
  request(method: string, params: unknown, id?: number): Promise<{ result?: unknown; error?: unknown }>;
  notify(method: string, params: unknown): void;
  stop(): Promise<number>;
}

function startWebServer(nested: boolean, href = pathToFileURL(SERVER_WEB).href): WebServer {
  const worker = new Worker(BOOT, { eval: true, workerData: { boot: BOOT, href, bundle: SERVER_WEB, nested } });
  let nextId = 1;
  const pending = new Map<number, (m: { result?: unknown; error?: unknown }) => void>();
  worker.on("message", (m: { id?: number; method?: string; params?: { items?: unknown[] }; result?: unknown; error?: unknown }) => {
    if (typeof m.id === "number" && m.method === undefined) pending.get(m.id)?.(m);
    else if (typeof m.id === "number" && m.method === "workspace/configuration")
      worker.postMessage({ jsonrpc: "2.0", id: m.id, result: (m.params?.items ?? []).map(() => ({ exactCheck: { maxSites: 24 } })) });
    else if (typeof m.id === "number" && m.method) worker.postMessage({ jsonrpc: "2.0", id: m.id, result: null });
  });
  return {
    request(method, params, id = nextId++) {
      return new Promise((resolve) => {
        pending.set(id, resolve);
        worker.postMessage({ jsonrpc: "2.0", id, method, params });
      });
    },
    notify(method, params) {
      worker.postMessage({ jsonrpc: "2.0", method, params });
    },
    stop: () => worker.terminate(),
  };
}

async function initialize(s: WebServer, initializationOptions: Record<string, unknown> = {}): Promise<{ capabilities: { diagnosticProvider?: unknown } }> {
  const init = (await s.request("initialize", { processId: null, rootUri: null, initializationOptions, capabilities: { workspace: { configuration: true }, textDocument: { diagnostic: {} } } })).result;
  s.notify("initialized", {});
  return init as { capabilities: { diagnosticProvider?: unknown } };
}

const chain = (sites: number) => `# Invented scenario for a protocol test.
model "web-exact-${sites}" {
  convention antiferro-positive
  lattice chain sites Cu
  let J1 = 1 meV
  exchange heisenberg(J1) on shell 1
  g Cu = 2
  field 8 T along (0, 0, 1)
  cluster ${sites} periodic
}
`;

beforeAll(() => {
  // `npm test` runs scripts/build.mjs only; the editor bundles come from scripts/buildEditor.mjs.
  if (!existsSync(SERVER_WEB) || !existsSync(JOB_WORKER_WEB)) execFileSync(process.execPath, ["scripts/buildEditor.mjs"], { cwd: ROOT, stdio: "ignore" });
});

describe("web worker server", () => {
  let server: WebServer;
  beforeAll(() => {
    server = startWebServer(true);
  });
  afterAll(async () => {
    await server.stop();
  });

  it("initializes, analyses an opened document and hovers the field", async () => {
    const init = await initialize(server);
    expect(init.capabilities.diagnosticProvider).toBeTruthy();
    const uri = "file:///chain.spw";
    server.notify("textDocument/didOpen", { textDocument: { uri, languageId: "spw", version: 1, text: CHAIN } });
    const report = (await server.request("textDocument/diagnostic", { textDocument: { uri } })).result as { items: { code: string }[] };
    expect(report.items.map((d) => d.code)).toContain("spw-bond-duplicate");
    const line = CHAIN.split("\n").findIndex((l) => l.trim().startsWith("field"));
    const hover = (await server.request("textDocument/hover", { textDocument: { uri }, position: { line, character: 3 } })).result as { contents: { value: string } };
    // E_Z = g muB B = 2.06 * 5.788381806e-2 meV/T * 3.5 T (CODATA 2018), 5 significant digits.
    expect(hover.contents.value).toContain(`${Number((2.06 * 5.788381806e-2 * 3.5).toPrecision(5))} meV`);
  });

  it("runs the exact check in a nested Web Worker: one pole at the Zeeman energy (Larmor theorem, SU(2) chain)", async () => {
    const uri = "file:///web-exact-10.spw";
    server.notify("textDocument/didOpen", { textDocument: { uri, languageId: "spw", version: 1, text: chain(10) } });
    const lenses = (await server.request("textDocument/codeLens", { textDocument: { uri } })).result as { command: { title: string } }[];
    expect(lenses.map((l) => l.command.title).join()).toMatch(/exact check on 10 sites/i);
    const result = (await server.request("spinwright/exactCheck", { uri })).result as { ok: boolean; message: string; sites: number; larmor: { singlePole: boolean } };
    expect(result.ok, result.message).toBe(true);
    expect(result.sites).toBe(10);
    expect(result.larmor.singlePole).toBe(true);
  });

  it("cancels a running exact check when the request is cancelled", async () => {
    const uri = "file:///web-exact-22.spw";
    server.notify("textDocument/didOpen", { textDocument: { uri, languageId: "spw", version: 1, text: chain(22) } });
    await server.request("textDocument/diagnostic", { textDocument: { uri } });
    const id = 9001;
    const running = server.request("spinwright/exactCheck", { uri }, id);
    server.notify("$/cancelRequest", { id });
    const result = (await running) as { result?: { ok: boolean; cancelled?: boolean }; error?: { code: number } };
    // Either the handler saw the cancellation (cancelled: true) or the connection answered with
    // RequestCancelled (-32800); a finished 22-site solve would mean the cancel was ignored.
    if (result.error) expect(result.error.code).toBe(-32800);
    else expect(result.result).toMatchObject({ ok: false, cancelled: true });
  });
});

describe("web worker server loaded from a blob: URL (as VS Code for the web loads it)", () => {
  it("starts the job worker from the location the client passes in initializationOptions", async () => {
    const server = startWebServer(true, "blob:http://localhost/00000000-0000-0000-0000-000000000000");
    try {
      await initialize(server, { jobWorkerUri: pathToFileURL(JOB_WORKER_WEB).href });
      const uri = "file:///web-exact-8.spw";
      server.notify("textDocument/didOpen", { textDocument: { uri, languageId: "spw", version: 1, text: chain(8) } });
      const result = (await server.request("spinwright/exactCheck", { uri })).result as { ok: boolean; message: string; sites: number };
      expect(result.ok, result.message).toBe(true);
      expect(result.sites).toBe(8);
    } finally {
      await server.stop();
    }
  });

  it("says where the job worker is missing when the client does not tell", async () => {
    const server = startWebServer(true, "blob:http://localhost/00000000-0000-0000-0000-000000000000");
    try {
      await initialize(server);
      const uri = "file:///web-exact-8.spw";
      server.notify("textDocument/didOpen", { textDocument: { uri, languageId: "spw", version: 1, text: chain(8) } });
      const result = (await server.request("spinwright/exactCheck", { uri })).result as { ok: boolean; message: string };
      expect(result.ok).toBe(false);
      expect(result.message).toMatch(/jobWorkerWeb\.js/);
    } finally {
      await server.stop();
    }
  });
});

describe("web worker server where workers cannot start workers", () => {
  it("offers no exact-check lens and explains why the check is unavailable", async () => {
    const server = startWebServer(false);
    try {
      await initialize(server);
      const uri = "file:///web-exact-8.spw";
      server.notify("textDocument/didOpen", { textDocument: { uri, languageId: "spw", version: 1, text: chain(8) } });
      const lenses = (await server.request("textDocument/codeLens", { textDocument: { uri } })).result as unknown[];
      expect(lenses).toEqual([]);
      const result = (await server.request("spinwright/exactCheck", { uri })).result as { ok: boolean; message: string };
      expect(result.ok).toBe(false);
      expect(result.message).toMatch(/spinwright solve/);
    } finally {
      await server.stop();
    }
  });
});
