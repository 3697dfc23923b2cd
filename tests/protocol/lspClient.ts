// A small LSP test client: spawns the built server (`node dist/server.js --stdio`), drives it
// with vscode-languageserver-protocol's createProtocolConnection, records every stdout byte so
// the test can check that nothing but protocol frames was written, and waits on notifications
// with promises instead of sleeps. Test support for the protocol tests.
import { spawn, type ChildProcessWithoutNullStreams } from "node:child_process";
import { existsSync } from "node:fs";
import { join } from "node:path";
import {
  createProtocolConnection,
  StreamMessageReader,
  StreamMessageWriter,
  type ClientCapabilities,
  type ProtocolConnection,
  type PublishDiagnosticsParams,
} from "vscode-languageserver-protocol/node";

export const SERVER_JS = join(__dirname, "..", "..", "dist", "server.js");

export interface TestServer {
  readonly connection: ProtocolConnection;
  readonly child: ChildProcessWithoutNullStreams;
  readonly stdout: Buffer[];
  readonly stderr: string[];
  readonly logs: { type: number; message: string }[];
  readonly published: PublishDiagnosticsParams[];
  /** Resolves with the first publishDiagnostics for `uri` that satisfies `accept`. */
  waitForDiagnostics(uri: string, accept: (p: PublishDiagnosticsParams) => boolean): Promise<PublishDiagnosticsParams>;
  /** Resolves with the server's exit code. */
  readonly exited: Promise<number | null>;
}

export function startTestServer(onConfiguration?: (items: unknown[]) => unknown[]): TestServer {
  if (!existsSync(SERVER_JS)) throw new Error(`${SERVER_JS} is missing: run node scripts/build.mjs first`);
  const child = spawn(process.execPath, [SERVER_JS, "--stdio"], { stdio: ["pipe", "pipe", "pipe"] });
  const stdout: Buffer[] = [];
  const stderr: string[] = [];
  child.stdout.on("data", (chunk: Buffer) => stdout.push(chunk));
  child.stderr.on("data", (chunk: Buffer) => stderr.push(chunk.toString("utf8")));
  const exited = new Promise<number | null>((resolve) => child.on("exit", (code) => resolve(code)));
  const connection = createProtocolConnection(new StreamMessageReader(child.stdout), new StreamMessageWriter(child.stdin));
  const logs: { type: number; message: string }[] = [];
  const published: PublishDiagnosticsParams[] = [];
  const waiters: { uri: string; accept: (p: PublishDiagnosticsParams) => boolean; resolve: (p: PublishDiagnosticsParams) => void }[] = [];
  connection.onNotification("window/logMessage", (p: { type: number; message: string }) => {
    logs.push(p);
  });
  connection.onNotification("textDocument/publishDiagnostics", (p: PublishDiagnosticsParams) => {
    published.push(p);
    for (const w of [...waiters]) {
      if (w.uri === p.uri && w.accept(p)) {
        waiters.splice(waiters.indexOf(w), 1);
        w.resolve(p);
      }
    }
  });
  connection.onRequest("workspace/configuration", (p: { items: unknown[] }) => (onConfiguration ? onConfiguration(p.items) : p.items.map(() => null)));
  connection.onRequest("client/registerCapability", () => null);
  connection.onRequest("workspace/inlayHint/refresh", () => null);
  connection.onRequest("workspace/codeLens/refresh", () => null);
  connection.onRequest("workspace/diagnostic/refresh", () => null);
  connection.listen();
  return {
    connection,
    child,
    stdout,
    stderr,
    logs,
    published,
    exited,
    waitForDiagnostics(uri, accept) {
      const already = published.find((p) => p.uri === uri && accept(p));
      if (already) return Promise.resolve(already);
      return new Promise((resolve) => waiters.push({ uri, accept, resolve }));
    },
  };
}

/** Capabilities of a modern client (pull diagnostics, snippets, configuration) or an old one. */
export function clientCapabilities(pull: boolean): ClientCapabilities {
  return {
    workspace: { configuration: pull, didChangeConfiguration: { dynamicRegistration: false } },
    textDocument: {
      synchronization: { dynamicRegistration: false },
      completion: { completionItem: { snippetSupport: pull } },
      hover: { contentFormat: ["markdown", "plaintext"] },
      ...(pull ? { diagnostic: { dynamicRegistration: false, relatedDocumentSupport: false } } : {}),
      publishDiagnostics: { relatedInformation: true, tagSupport: { valueSet: [1, 2] }, versionSupport: true, codeDescriptionSupport: true, dataSupport: true },
      semanticTokens: {
        requests: { full: true },
        tokenTypes: [],
        tokenModifiers: [],
        formats: ["relative"],
      },
    },
  };
}

/**
 * Splits the recorded stdout into LSP frames (`Content-Length: n\r\n...\r\n\r\n` + n bytes of
 * JSON). Throws if any byte is not part of a well-formed frame.
 */
export function parseFrames(chunks: readonly Buffer[]): unknown[] {
  const data = Buffer.concat(chunks);
  const messages: unknown[] = [];
  let at = 0;
  while (at < data.length) {
    const headerEnd = data.indexOf("\r\n\r\n", at, "latin1");
    if (headerEnd < 0) throw new Error(`bytes after the last frame: ${JSON.stringify(data.subarray(at, at + 80).toString("latin1"))}`);
    const header = data.subarray(at, headerEnd).toString("latin1");
    const lines = header.split("\r\n");
    let length = -1;
    for (const line of lines) {
      const m = /^([A-Za-z-]+): (.*)$/.exec(line);
      if (!m) throw new Error(`not a header line: ${JSON.stringify(line)}`);
      if (m[1]?.toLowerCase() === "content-length") length = Number(m[2]);
    }
    if (!(length >= 0)) throw new Error(`frame without Content-Length: ${JSON.stringify(header)}`);
    const bodyStart = headerEnd + 4;
    const body = data.subarray(bodyStart, bodyStart + length);
    if (body.length !== length) throw new Error("truncated frame");
    messages.push(JSON.parse(body.toString("utf8")));
    at = bodyStart + length;
  }
  return messages;
}
