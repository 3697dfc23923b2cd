// Protocol tests of the built server (dist/server.js) over stdio with a real JSON-RPC client:
// initialize, didOpen, pull diagnostics, hover, completion, rename, formatting, code actions,
// semantic tokens, summary, shutdown/exit with code 0, stdout holding only protocol frames; a
// second server plays a client without pull (push mode). Synchronised by messages, never sleeps.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type {
  CodeAction,
  CompletionItem,
  CompletionList,
  Diagnostic,
  FullDocumentDiagnosticReport,
  Hover,
  InitializeResult,
  InlayHint,
  SemanticTokens,
  TextEdit,
  WorkspaceEdit,
} from "vscode-languageserver-protocol";
import { CHAIN } from "../service/fixtures";
import { clientCapabilities, parseFrames, startTestServer, type TestServer } from "./lspClient";

const URI = "file:///work/chain.spw";
const DOCS = "file:///ext/docs/diagnostics.md";
// CODATA 2018: muB = 5.788381806e-5 eV/T; muB/h = 13.9962449361 GHz/T (Tiesinga et al., 2021).
const MU_B_MEV_PER_T = 5.788381806e-2;
const MU_B_GHZ_PER_T = 13.9962449361;

function positionOf(text: string, needle: string, delta = 0): { line: number; character: number } {
  const offset = text.indexOf(needle) + delta;
  if (offset < delta) throw new Error(`${needle} not in text`);
  const before = text.slice(0, offset).split("\n");
  return { line: before.length - 1, character: before[before.length - 1]!.length };
}

/** Applies LSP text edits (line/character ranges) to a text. */
function applyLspEdits(text: string, edits: readonly TextEdit[]): string {
  const lines = text.split("\n");
  const offset = (p: { line: number; character: number }) => lines.slice(0, p.line).reduce((n, l) => n + l.length + 1, 0) + p.character;
  const sorted = [...edits].sort((x, y) => offset(y.range.start) - offset(x.range.start));
  let out = text;
  for (const e of sorted) out = out.slice(0, offset(e.range.start)) + e.newText + out.slice(offset(e.range.end));
  return out;
}

describe("language server over stdio (pull diagnostics)", () => {
  let server: TestServer;
  let init: InitializeResult;
  let configured: () => void = () => undefined;
  const configuredOnce = new Promise<void>((resolve) => (configured = resolve));

  beforeAll(async () => {
    server = startTestServer((items) => {
      configured();
      return items.map(() => ({ displayUnits: "K", exactCheck: { maxSites: 24, automatic: false } }));
    });
    init = await server.connection.sendRequest("initialize", {
      processId: process.pid,
      rootUri: null,
      capabilities: clientCapabilities(true),
      initializationOptions: { diagnosticsDocUri: DOCS },
    });
    await server.connection.sendNotification("initialized", {});
    await configuredOnce;
    await server.connection.sendNotification("textDocument/didOpen", { textDocument: { uri: URI, languageId: "spw", version: 1, text: CHAIN } });
  });

  afterAll(() => {
    if (server.child.exitCode === null) server.child.kill();
  });

  it("announces its features and pull diagnostics", () => {
    const caps = init.capabilities;
    expect(init.serverInfo?.name).toBe("spinwright");
    expect(caps.diagnosticProvider).toMatchObject({ interFileDependencies: false, workspaceDiagnostics: false });
    expect(caps.semanticTokensProvider?.legend.tokenTypes).toContain("variable");
    expect(caps.renameProvider).toEqual({ prepareProvider: true });
    expect(caps.documentFormattingProvider).toBe(true);
    expect(caps.inlayHintProvider).toBeTruthy();
  });

  it("answers a pull for diagnostics with codes, related information, tags and doc links", async () => {
    const report = (await server.connection.sendRequest("textDocument/diagnostic", { textDocument: { uri: URI } })) as FullDocumentDiagnosticReport;
    expect(report.kind).toBe("full");
    const byCode = new Map<string, Diagnostic>(report.items.map((d) => [String(d.code), d]));
    const duplicate = byCode.get("spw-bond-duplicate");
    expect(duplicate?.relatedInformation?.[0]?.location.uri).toBe(URI);
    expect(duplicate?.codeDescription?.href).toBe(`${DOCS}#spw-bond-duplicate`);
    expect(duplicate?.range.start.line).toBe(positionOf(CHAIN, "shell 2").line);
    expect(byCode.get("spw-single-ion-constant")?.tags).toEqual([1]);
    const again = await server.connection.sendRequest("textDocument/diagnostic", { textDocument: { uri: URI }, previousResultId: report.resultId });
    expect(again).toMatchObject({ kind: "unchanged", resultId: report.resultId });
  });

  it("answers 'unchanged' after an edit that leaves the diagnostics as they were, and the full list after one that does not", async () => {
    const uri = "file:///workspace/chain-edits.spw";
    const c = server.connection;
    await c.sendNotification("textDocument/didOpen", { textDocument: { uri, languageId: "spw", version: 1, text: CHAIN } });
    const first = (await c.sendRequest("textDocument/diagnostic", { textDocument: { uri } })) as FullDocumentDiagnosticReport;
    expect(first.kind).toBe("full");
    // A space typed at the end of the first line moves nothing the diagnostics point at.
    const lineEnd = { line: 0, character: (CHAIN.split("\n")[0] ?? "").length };
    await c.sendNotification("textDocument/didChange", { textDocument: { uri, version: 2 }, contentChanges: [{ range: { start: lineEnd, end: lineEnd }, text: " " }] });
    const second = await c.sendRequest("textDocument/diagnostic", { textDocument: { uri }, previousResultId: first.resultId });
    expect(second).toEqual({ kind: "unchanged", resultId: first.resultId });
    // A new line with an unknown unit: a new diagnostic, a new result id, and lines below moved.
    await c.sendNotification("textDocument/didChange", {
      textDocument: { uri, version: 3 },
      contentChanges: [{ range: { start: { line: 2, character: 0 }, end: { line: 2, character: 0 } }, text: "  let Jx = 2 furlong\n" }],
    });
    const third = (await c.sendRequest("textDocument/diagnostic", { textDocument: { uri }, previousResultId: first.resultId })) as FullDocumentDiagnosticReport;
    expect(third.kind).toBe("full");
    expect(third.resultId).not.toBe(first.resultId);
    expect(third.items.map((d) => d.code)).toContain("spw-unit-unknown");
    await c.sendNotification("textDocument/didClose", { textDocument: { uri } });
  });

  it("hovers the field with the Zeeman energy", async () => {
    const hover = (await server.connection.sendRequest("textDocument/hover", {
      textDocument: { uri: URI },
      position: positionOf(CHAIN, "field 3.5", 2),
    })) as Hover;
    const value = (hover.contents as { value: string }).value;
    // E_Z = g muB B, g = 2.06, B = 3.5 T; printed with 5 significant digits.
    expect(value).toContain(`${Number((2.06 * 3.5 * MU_B_MEV_PER_T).toPrecision(5))} meV`);
    expect(value).toContain(`${Number((2.06 * 3.5 * MU_B_GHZ_PER_T).toPrecision(5))} GHz`);
  });

  it("uses the client's settings (display unit K in inlay hints)", async () => {
    const hints = (await server.connection.sendRequest("textDocument/inlayHint", {
      textDocument: { uri: URI },
      range: { start: { line: 0, character: 0 }, end: { line: 40, character: 0 } },
    })) as InlayHint[];
    const labels = hints.map((h) => String(h.label));
    expect(labels).toContain("= 2.556 K");
  });

  it("completes presets after `lattice` in an edited document, and pulls the new version", async () => {
    const edited = CHAIN.replace("lattice chain sites Cu", "lattice ");
    await server.connection.sendNotification("textDocument/didChange", {
      textDocument: { uri: URI, version: 2 },
      contentChanges: [{ text: edited }],
    });
    const result = (await server.connection.sendRequest("textDocument/completion", {
      textDocument: { uri: URI },
      position: positionOf(edited, "lattice ", "lattice ".length),
    })) as CompletionItem[] | CompletionList;
    const items = Array.isArray(result) ? result : result.items;
    expect(items.map((i) => i.label)).toEqual(expect.arrayContaining(["chain", "square", "kagome"]));
    const report = (await server.connection.sendRequest("textDocument/diagnostic", { textDocument: { uri: URI } })) as FullDocumentDiagnosticReport;
    expect(report.items.map((d) => d.code)).toContain("spw-syntax");
    await server.connection.sendNotification("textDocument/didChange", { textDocument: { uri: URI, version: 3 }, contentChanges: [{ text: CHAIN }] });
  });

  it("renames a parameter after prepareRename, and refuses a keyword", async () => {
    const position = positionOf(CHAIN, "heisenberg(J1)", "heisenberg(".length);
    const prepared = await server.connection.sendRequest("textDocument/prepareRename", { textDocument: { uri: URI }, position });
    expect(prepared).toMatchObject({ placeholder: "J1" });
    const edit = (await server.connection.sendRequest("textDocument/rename", { textDocument: { uri: URI }, position, newName: "Jnn" })) as WorkspaceEdit;
    const edits = edit.changes?.[URI] ?? [];
    expect(edits).toHaveLength(4);
    expect(applyLspEdits(CHAIN, edits)).not.toMatch(/\bJ1\b/);
    await expect(server.connection.sendRequest("textDocument/rename", { textDocument: { uri: URI }, position, newName: "exchange" })).rejects.toThrow(/keyword/);
  });

  it("formats a messy document into the canonical layout", async () => {
    const messy = "model   \"m\"{\nlattice chain\nlet J=1 meV\n    exchange heisenberg( J ) on A->A+(1)\n}\n";
    const uri = "file:///work/messy.spw";
    await server.connection.sendNotification("textDocument/didOpen", { textDocument: { uri, languageId: "spw", version: 1, text: messy } });
    const edits = (await server.connection.sendRequest("textDocument/formatting", { textDocument: { uri }, options: { tabSize: 2, insertSpaces: true } })) as TextEdit[];
    expect(applyLspEdits(messy, edits)).toBe('model "m" {\n  lattice chain\n  let J = 1 meV\n  exchange heisenberg(J) on A -> A + (1)\n}\n');
  });

  it("offers the quick fix for the duplicate bond", async () => {
    const start = positionOf(CHAIN, "shell 2");
    const actions = (await server.connection.sendRequest("textDocument/codeAction", {
      textDocument: { uri: URI },
      range: { start, end: start },
      context: { diagnostics: [] },
    })) as CodeAction[];
    const fix = actions.find((a) => a.title === "Remove the duplicate bond");
    expect(fix?.kind).toBe("quickfix");
    const fixed = applyLspEdits(CHAIN, fix?.edit?.changes?.[URI] ?? []);
    expect(fixed).toContain("exchange heisenberg(J2) on Cu -> Cu + (2)\n");
  });

  it("returns semantic tokens that decode to the right names", async () => {
    const tokens = (await server.connection.sendRequest("textDocument/semanticTokens/full", { textDocument: { uri: URI } })) as SemanticTokens;
    expect(tokens.data.length % 5).toBe(0);
    const legend = init.capabilities.semanticTokensProvider!.legend.tokenTypes;
    const lines = CHAIN.split("\n");
    let line = 0;
    let character = 0;
    const decoded: string[] = [];
    for (let k = 0; k < tokens.data.length; k += 5) {
      const [dl, dc, len, type] = tokens.data.slice(k, k + 4) as [number, number, number, number];
      line += dl;
      character = dl === 0 ? character + dc : dc;
      decoded.push(`${lines[line]!.slice(character, character + len)}:${legend[type]}`);
    }
    expect(decoded).toEqual(expect.arrayContaining(["J1:variable", "Cu:property", "heisenberg:function", "chain:enumMember", "K:type"]));
  });

  it("answers the summary request and survives requests for unknown documents", async () => {
    const summary = (await server.connection.sendRequest("spinwright/summary", { uri: URI })) as { summary: { modelName: string; field: { zeeman: string[] } } };
    expect(summary.summary.modelName).toBe("chain-A");
    expect(summary.summary.field.zeeman[0]).toContain("meV");
    expect(await server.connection.sendRequest("textDocument/hover", { textDocument: { uri: "file:///nope.spw" }, position: { line: 0, character: 0 } })).toBeNull();
    expect(await server.connection.sendRequest("textDocument/hover", { textDocument: { uri: URI }, position: { line: 9999, character: 9999 } })).toBeDefined();
    expect(await server.connection.sendRequest("spinwright/summary", {})).toBeNull();
  });

  it("shuts down and exits with code 0, having written only protocol frames to stdout", async () => {
    await server.connection.sendRequest("shutdown");
    await server.connection.sendNotification("exit");
    expect(await server.exited).toBe(0);
    const frames = parseFrames(server.stdout);
    expect(frames.length).toBeGreaterThan(5);
    for (const f of frames) expect(f).toMatchObject({ jsonrpc: "2.0" });
    expect(server.logs.filter((l) => l.type === 1)).toEqual([]);
  });
});

describe("frame checker", () => {
  it("rejects bytes outside a frame, so a stray console.log would fail the tests above", () => {
    const frame = (body: string) => Buffer.from(`Content-Length: ${Buffer.byteLength(body)}\r\n\r\n${body}`);
    expect(parseFrames([frame('{"jsonrpc":"2.0","id":1}'), frame('{"jsonrpc":"2.0","method":"x"}')])).toHaveLength(2);
    expect(() => parseFrames([frame('{"jsonrpc":"2.0","id":1}'), Buffer.from("hello\n")])).toThrow();
    expect(() => parseFrames([Buffer.from("hello\n"), frame('{"jsonrpc":"2.0","id":1}')])).toThrow();
  });
});

describe("language server over stdio (push diagnostics)", () => {
  it("publishes diagnostics for the latest version to a client without pull support", async () => {
    const server = startTestServer();
    try {
      const init = (await server.connection.sendRequest("initialize", { processId: process.pid, rootUri: null, capabilities: clientCapabilities(false) })) as InitializeResult;
      expect(init.capabilities.diagnosticProvider).toBeUndefined();
      await server.connection.sendNotification("initialized", {});
      await server.connection.sendNotification("textDocument/didOpen", { textDocument: { uri: URI, languageId: "spw", version: 1, text: CHAIN } });
      const first = await server.waitForDiagnostics(URI, (p) => p.version === 1);
      expect(first.diagnostics.map((d) => d.code)).toContain("spw-bond-duplicate");
      const fixed = CHAIN.replace("on Cu -> Cu + (2), shell 2", "on Cu -> Cu + (2)");
      await server.connection.sendNotification("textDocument/didChange", { textDocument: { uri: URI, version: 2 }, contentChanges: [{ text: `${fixed}junk` }] });
      await server.connection.sendNotification("textDocument/didChange", { textDocument: { uri: URI, version: 3 }, contentChanges: [{ text: fixed }] });
      const latest = await server.waitForDiagnostics(URI, (p) => p.version === 3);
      expect(latest.diagnostics.map((d) => d.code)).not.toContain("spw-bond-duplicate");
      expect(latest.diagnostics.map((d) => d.code)).not.toContain("spw-syntax");
      await server.connection.sendRequest("shutdown");
      await server.connection.sendNotification("exit");
      expect(await server.exited).toBe(0);
      expect(() => parseFrames(server.stdout)).not.toThrow();
    } finally {
      if (server.child.exitCode === null) server.child.kill();
    }
  });
});
