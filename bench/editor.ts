// Editor latency through the protocol: spawns the bundled language server (dist/server.js) and,
// as the reference, a JSON language server built on vscode-json-languageservice
// (dist/benchJsonServer.js), drives both with the same JSON-RPC client (incremental sync, pull
// diagnostics, hover) and reports medians, for a space and for a digit typed. Also reports the
// server's memory after opening every bundled sample. Targets (issue 5): keystroke to diagnostics,
// 200 lines < 10 ms and 5,000 lines < 100 ms (median); hover < 5 ms; ours not slower than the JSON
// reference.
import { spawn, type ChildProcessWithoutNullStreams } from "node:child_process";
import { readdirSync, readFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { pathToFileURL } from "node:url";
import {
  createProtocolConnection,
  StreamMessageReader,
  StreamMessageWriter,
  type ProtocolConnection,
} from "vscode-languageserver-protocol/node";
import { benchmarkEditor, generatedModel } from "../server/src/service/benchmark";
import { generatedJson } from "./jsonModel";

const ROOT = resolve(__dirname, "..");

interface Server {
  readonly name: string;
  readonly child: ChildProcessWithoutNullStreams;
  readonly connection: ProtocolConnection;
}

async function startServer(name: string, script: string, args: string[]): Promise<Server> {
  // BENCH_NODE_ARGS (e.g. "--cpu-prof --cpu-prof-dir=/tmp/prof") goes to both servers' node.
  const nodeArgs = (process.env["BENCH_NODE_ARGS"] ?? "").split(" ").filter(Boolean);
  const child = spawn(process.execPath, [...nodeArgs, join(ROOT, "dist", script), ...args], { stdio: ["pipe", "pipe", "pipe"] });
  child.stderr.on("data", () => undefined);
  const connection = createProtocolConnection(new StreamMessageReader(child.stdout), new StreamMessageWriter(child.stdin));
  connection.onRequest("workspace/configuration", (p: { items: unknown[] }) => p.items.map(() => null));
  connection.onRequest("client/registerCapability", () => null);
  connection.onRequest("workspace/inlayHint/refresh", () => null);
  connection.onRequest("workspace/codeLens/refresh", () => null);
  connection.onRequest("workspace/diagnostic/refresh", () => null);
  connection.onRequest("workspace/semanticTokens/refresh", () => null);
  connection.onNotification("window/logMessage", () => undefined);
  connection.onNotification("textDocument/publishDiagnostics", () => undefined);
  connection.listen();
  const died = new Promise<never>((_, reject) => child.on("exit", (code) => reject(new Error(`${name} (${script}) exited with code ${code} during start-up`))));
  died.catch(() => undefined);
  await Promise.race([died, connection.sendRequest("initialize", {
    processId: process.pid,
    rootUri: null,
    capabilities: {
      workspace: { configuration: true },
      textDocument: {
        synchronization: { dynamicRegistration: false },
        hover: { contentFormat: ["markdown", "plaintext"] },
        diagnostic: { dynamicRegistration: false, relatedDocumentSupport: false },
        publishDiagnostics: { relatedInformation: true },
      },
    },
  })]);
  connection.sendNotification("initialized", {});
  return { name, child, connection };
}

async function stopServer(s: Server): Promise<void> {
  const exited = new Promise<void>((res) => s.child.on("exit", () => res()));
  await s.connection.sendRequest("shutdown");
  s.connection.sendNotification("exit");
  await exited;
  s.connection.dispose();
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] ?? NaN;
}

function positionOf(text: string, offset: number): { line: number; character: number } {
  const before = text.slice(0, offset);
  const line = before.split("\n").length - 1;
  return { line, character: offset - (before.lastIndexOf("\n") + 1) };
}

interface Latency {
  readonly keystrokeMs: number;
  readonly hoverMs: number;
  readonly diagnostics: number;
  /** Share of the measured pulls answered "unchanged". */
  readonly unchangedShare: number;
}

/**
 * Opens `text`, then repeats: a one-character incremental edit at `editAt` (insert `typed`, then
 * delete it, so the file stays the same size) followed at once by a diagnostic pull with the last
 * result id, timed from sending the edit to the report; and a hover at `hoverAt`. The first `warmup` rounds are
 * discarded: a few hundred keystrokes, so that both servers are measured with their code compiled
 * by the JIT, as after a minute of typing.
 */
async function measure(s: Server, uri: string, languageId: string, text: string, editAt: number, hoverAt: number, typed: string, warmup: number, rounds: number): Promise<Latency> {
  const c = s.connection;
  let version = 1;
  c.sendNotification("textDocument/didOpen", { textDocument: { uri, languageId, version, text } });
  const editPos = positionOf(text, editAt);
  const hoverPos = positionOf(text, hoverAt);
  const keystroke: number[] = [];
  const hover: number[] = [];
  let diagnostics = 0;
  // As VS Code does, the client sends back the result id of the last report it holds.
  let resultId: string | undefined;
  let unchanged = 0;
  for (let r = 0; r < warmup + rounds; r++) {
    const insert = r % 2 === 0;
    const range = insert ? { start: editPos, end: editPos } : { start: editPos, end: { line: editPos.line, character: editPos.character + typed.length } };
    const t0 = performance.now();
    c.sendNotification("textDocument/didChange", {
      textDocument: { uri, version: ++version },
      contentChanges: [{ range, text: insert ? typed : "" }],
    });
    const report = (await c.sendRequest("textDocument/diagnostic", { textDocument: { uri }, ...(resultId ? { previousResultId: resultId } : {}) })) as {
      kind: string;
      resultId?: string;
      items?: unknown[];
    };
    const t1 = performance.now();
    resultId = report.resultId;
    if (report.kind === "full") diagnostics = report.items?.length ?? 0;
    await c.sendRequest("textDocument/hover", { textDocument: { uri }, position: hoverPos });
    const t2 = performance.now();
    if (r >= warmup) {
      keystroke.push(t1 - t0);
      hover.push(t2 - t1);
      if (report.kind === "unchanged") unchanged++;
    }
  }
  c.sendNotification("textDocument/didClose", { textDocument: { uri } });
  return { keystrokeMs: median(keystroke), hoverMs: median(hover), diagnostics, unchangedShare: unchanged / rounds };
}

function memoryOf(pid: number): { rssMiB: number; peakMiB: number } {
  const status = readFileSync(`/proc/${pid}/status`, "utf8");
  const kib = (key: string): number => Number(new RegExp(`^${key}:\\s+(\\d+) kB`, "m").exec(status)?.[1] ?? NaN);
  return { rssMiB: kib("VmRSS") / 1024, peakMiB: kib("VmHWM") / 1024 };
}

export async function benchEditor(): Promise<string[]> {
  const out: string[] = [];
  const inProcess = benchmarkEditor(30, 200);
  out.push("in process (service layer, no protocol), 200-line model, median of 30:");
  for (const [k, v] of Object.entries(inProcess.medianMs)) out.push(`  ${k}: ${v.toFixed(2)} ms`);

  const ours = await startServer("spinwright", "server.js", ["--stdio"]);
  const json = await startServer("json reference", "benchJsonServer.js", ["--stdio"]);
  try {
    const warmup = 300;
    out.push(`through the protocol (stdio JSON-RPC, incremental sync, pull diagnostics), median after ${warmup} warm-up keystrokes:`);
    const verdicts: boolean[] = [];
    for (const [lines, rounds] of [
      [200, 200],
      [5000, 100],
    ] as const) {
      const spw = generatedModel(lines);
      const spwEdit = spw.indexOf("let J1 = ") + "let J1 = ".length;
      const spwHover = spw.indexOf("field 3.5") + 2;
      const js = generatedJson(lines);
      const jsEdit = js.indexOf('"value": ') + '"value": '.length;
      const jsHover = js.indexOf('"tesla"') + 2;
      const target = lines <= 200 ? 10 : 100;
      const n = (t: string): number => t.split("\n").length - 1;
      // A space changes no value; a digit typed into the first coupling changes it and every
      // parameter, term and prediction that depends on it (in JSON: one number to validate again).
      for (const [what, typed] of [
        ["a space", " "],
        ["a digit", "1"],
      ] as const) {
        const a = await measure(ours, `file:///bench/model-${lines}-${typed === " " ? "space" : "digit"}.spw`, "spw", spw, spwEdit, spwHover, typed, warmup, rounds);
        const b = await measure(json, `file:///bench/model-${lines}-${typed === " " ? "space" : "digit"}.json`, "json", js, jsEdit, jsHover, typed, warmup, rounds);
        const met = a.keystrokeMs <= b.keystrokeMs && a.hoverMs <= b.hoverMs;
        verdicts.push(met);
        out.push(
          `  ${n(spw)}-line .spw, typing ${what}: keystroke to diagnostics ${a.keystrokeMs.toFixed(2)} ms (target < ${target} ms: ${a.keystrokeMs < target ? "met" : "NOT MET"}), ` +
            `hover ${a.hoverMs.toFixed(2)} ms (target < 5 ms: ${a.hoverMs < 5 ? "met" : "NOT MET"}), ${a.diagnostics} diagnostics, ${Math.round(100 * a.unchangedShare)} % of pulls unchanged`,
        );
        out.push(`  ${n(js)}-line .json (vscode-json-languageservice), typing ${what}: keystroke to diagnostics ${b.keystrokeMs.toFixed(2)} ms, hover ${b.hoverMs.toFixed(2)} ms, ${b.diagnostics} diagnostics, ${Math.round(100 * b.unchangedShare)} % of pulls unchanged`);
        out.push(
          `  ratio ours / JSON at ${lines} lines, typing ${what}: keystroke ${(a.keystrokeMs / b.keystrokeMs).toFixed(2)}, hover ${(a.hoverMs / b.hoverMs).toFixed(2)} (target <= 1: ${met ? "met" : "NOT MET"})`,
        );
      }
    }
    out.push(`not slower than the JSON reference: ${verdicts.every((v) => v) ? "met" : `NOT MET in ${verdicts.filter((v) => !v).length} of ${verdicts.length} cases`}`);
    // Memory after opening every bundled sample and pulling its diagnostics.
    const dir = join(ROOT, "samples");
    const files = readdirSync(dir).filter((f) => f.endsWith(".spw"));
    for (const f of files) {
      const uri = pathToFileURL(join(dir, f)).href;
      ours.connection.sendNotification("textDocument/didOpen", { textDocument: { uri, languageId: "spw", version: 1, text: readFileSync(join(dir, f), "utf8") } });
      await ours.connection.sendRequest("textDocument/diagnostic", { textDocument: { uri } });
    }
    const mem = memoryOf(ours.child.pid!);
    const ref = memoryOf(json.child.pid!);
    out.push(
      `server memory after opening all ${files.length} samples (and the benchmark files): RSS ${mem.rssMiB.toFixed(0)} MiB, peak ${mem.peakMiB.toFixed(0)} MiB ` +
        `(JSON reference after its benchmark files: RSS ${ref.rssMiB.toFixed(0)} MiB, peak ${ref.peakMiB.toFixed(0)} MiB; no target set)`,
    );
  } finally {
    await stopServer(ours);
    await stopServer(json);
  }
  return out;
}
