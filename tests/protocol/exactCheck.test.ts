// The exact check through the protocol: the server runs it in a worker thread with work-done
// progress, feeds the result back into the analysis (hover, plot), and stops it when the request
// is cancelled or the document is edited. Synchronised by messages, never sleeps.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { CancellationTokenSource } from "vscode-languageserver-protocol";
import { clientCapabilities, parseFrames, startTestServer, type TestServer } from "./lspClient";

const SMALL = "file:///work/small.spw";
const LARGE = "file:///work/large.spw";
const chain = (sites: number) => `# Invented scenario for a protocol test.
model "exact-${sites}" {
  convention antiferro-positive
  lattice chain sites Cu
  let J1 = 1 meV
  exchange heisenberg(J1) on shell 1
  exchange heisenberg(0.1 * J1) on shell 2
  g Cu = 2
  field 8 T along (0, 0, 1)
  cluster ${sites} periodic
}
`;

describe("exact check over the protocol", () => {
  let server: TestServer;
  const progress: { token: unknown; value: { kind: string; percentage?: number } }[] = [];
  const progressListeners: ((p: { kind: string }) => void)[] = [];

  beforeAll(async () => {
    server = startTestServer((items) => items.map(() => ({ exactCheck: { maxSites: 24, automatic: false } })));
    server.connection.onRequest("window/workDoneProgress/create", () => null);
    server.connection.onNotification("$/progress", (p: { token: unknown; value: { kind: string; percentage?: number } }) => {
      progress.push(p);
      for (const l of progressListeners) l(p.value);
    });
    const caps = clientCapabilities(true);
    await server.connection.sendRequest("initialize", { processId: process.pid, rootUri: null, capabilities: { ...caps, window: { workDoneProgress: true } } });
    await server.connection.sendNotification("initialized", {});
    await server.connection.sendNotification("textDocument/didOpen", { textDocument: { uri: SMALL, languageId: "spw", version: 1, text: chain(12) } });
    await server.connection.sendNotification("textDocument/didOpen", { textDocument: { uri: LARGE, languageId: "spw", version: 1, text: chain(24) } });
  });

  afterAll(() => {
    if (server.child.exitCode === null) server.child.kill();
  });

  it("runs on a 12-site ring with progress and finds the Larmor line at the Zeeman energy", async () => {
    const hoverBefore = (await server.connection.sendRequest("textDocument/hover", { textDocument: { uri: SMALL }, position: { line: 8, character: 4 } })) as { contents: { value: string } } | null;
    const result = (await server.connection.sendRequest("spinwright/exactCheck", { uri: SMALL })) as { ok: boolean; message: string; larmor: { singlePole: boolean } };
    expect(result.ok).toBe(true);
    expect(result.larmor.singlePole).toBe(true);
    expect(result.message).toMatch(/12 sites/);
    expect(progress.some((p) => p.value.kind === "begin")).toBe(true);
    expect(progress.some((p) => p.value.kind === "report")).toBe(true);
    expect(progress.some((p) => p.value.kind === "end")).toBe(true);
    // The exact poles now appear in the plot, and the predictions use the ring calibration.
    const plot = (await server.connection.sendRequest("spinwright/plot", { uri: SMALL })) as { svg: string };
    expect(plot.svg).toMatch(/<circle [^>]*stroke="#2ca02c"/);
    expect(plot.svg).toMatch(/exact diagonalization/);
    expect(hoverBefore).not.toBeNull();
  });

  it("stops when the request is cancelled", async () => {
    const source = new CancellationTokenSource();
    const started = new Promise<void>((resolve) => progressListeners.push((v) => v.kind === "report" && resolve()));
    const pending = server.connection.sendRequest("spinwright/exactCheck", { uri: LARGE }, source.token) as Promise<{ ok: boolean; cancelled?: boolean }>;
    await started;
    source.cancel();
    const result = await pending.catch((e: Error) => ({ ok: false, cancelled: /cancel/i.test(e.message) }));
    expect(result.ok).toBe(false);
    expect(result.cancelled).toBe(true);
  });

  it("stops when the document is edited during the check", async () => {
    progressListeners.length = 0;
    const started = new Promise<void>((resolve) => progressListeners.push((v) => v.kind === "report" && resolve()));
    const pending = server.connection.sendRequest("spinwright/exactCheck", { uri: LARGE }) as Promise<{ ok: boolean; cancelled?: boolean }>;
    await started;
    await server.connection.sendNotification("textDocument/didChange", {
      textDocument: { uri: LARGE, version: 2 },
      contentChanges: [{ text: chain(24).replace("0.1 * J1", "0.2 * J1") }],
    });
    const result = await pending;
    expect(result).toMatchObject({ ok: false, cancelled: true });
  });

  it("refuses a cluster above the size limit with the reason", async () => {
    await server.connection.sendNotification("textDocument/didOpen", { textDocument: { uri: "file:///work/huge.spw", languageId: "spw", version: 1, text: chain(40) } });
    const result = (await server.connection.sendRequest("spinwright/exactCheck", { uri: "file:///work/huge.spw" })) as { ok: boolean; message: string };
    expect(result.ok).toBe(false);
    expect(result.message).toMatch(/40 sites exceed spinwright.exactCheck.maxSites = 24/);
  });

  it("shuts down with exit code 0 and only protocol frames on stdout", async () => {
    await server.connection.sendRequest("shutdown");
    await server.connection.sendNotification("exit");
    expect(await server.exited).toBe(0);
    expect(() => parseFrames(server.stdout)).not.toThrow();
  });
});

describe("automatic exact check on save (spinwright.exactCheck.automatic)", () => {
  it("runs when a file without errors is saved, and its poles reach the plot", async () => {
    const server = startTestServer((items) => items.map(() => ({ exactCheck: { maxSites: 24, automatic: true } })));
    try {
      let ended!: () => void;
      const end = new Promise<void>((resolve) => (ended = resolve));
      server.connection.onRequest("window/workDoneProgress/create", () => null);
      server.connection.onNotification("$/progress", (p: { value: { kind: string } }) => {
        if (p.value.kind === "end") ended();
      });
      const caps = clientCapabilities(true);
      const init = (await server.connection.sendRequest("initialize", { processId: process.pid, rootUri: null, capabilities: { ...caps, window: { workDoneProgress: true } } })) as {
        capabilities: { textDocumentSync: { save?: unknown } };
      };
      expect(init.capabilities.textDocumentSync.save).toBeTruthy();
      await server.connection.sendNotification("initialized", {});
      const uri = "file:///work/auto.spw";
      await server.connection.sendNotification("textDocument/didOpen", { textDocument: { uri, languageId: "spw", version: 1, text: chain(10) } });
      const before = (await server.connection.sendRequest("spinwright/plot", { uri })) as { svg: string };
      expect(before.svg).not.toMatch(/<circle [^>]*stroke="#2ca02c"/);
      await server.connection.sendNotification("textDocument/didSave", { textDocument: { uri } });
      await end;
      const after = (await server.connection.sendRequest("spinwright/plot", { uri })) as { svg: string };
      expect(after.svg).toMatch(/<circle [^>]*stroke="#2ca02c"/);
    } finally {
      server.child.kill();
    }
  });
});
