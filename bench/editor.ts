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
import { TextDocument } from "vscode-languageserver-textdocument";
import { analyzeDocument } from "../server/src/analysis/analyze";
import { benchmarkEditor, generatedModel } from "../server/src/service/benchmark";
import { benchJsonService, generatedJson } from "./jsonModel";

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
  /** Every recorded round, in order (the two sessions of a pair have their rounds side by side). */
  readonly keystrokeSamples: readonly number[];
  readonly hoverSamples: readonly number[];
  readonly diagnostics: number;
  /** Share of the measured pulls answered "unchanged". */
  readonly unchangedShare: number;
}

/** One open document on one server, typed into round by round (see `measurePair`). */
class Session {
  private version = 1;
  // As VS Code does, the client sends back the result id of the last report it holds.
  private resultId: string | undefined;
  private readonly editPos: { line: number; character: number };
  private readonly hoverPos: { line: number; character: number };
  readonly keystroke: number[] = [];
  readonly hover: number[] = [];
  diagnostics = 0;
  unchanged = 0;

  constructor(
    private readonly s: Server,
    private readonly uri: string,
    languageId: string,
    text: string,
    editAt: number,
    hoverAt: number,
    private readonly typed: string,
  ) {
    this.editPos = positionOf(text, editAt);
    this.hoverPos = positionOf(text, hoverAt);
    s.connection.sendNotification("textDocument/didOpen", { textDocument: { uri, languageId, version: this.version, text } });
  }

  /**
   * A one-character incremental edit (insert `typed` on even rounds, delete it on odd ones, so the
   * file keeps its size) followed at once by a diagnostic pull with the last result id, timed from
   * sending the edit to the report; then a hover, timed on its own.
   */
  async round(r: number, record: boolean): Promise<void> {
    const c = this.s.connection;
    const insert = r % 2 === 0;
    const { editPos, typed, uri } = this;
    const range = insert ? { start: editPos, end: editPos } : { start: editPos, end: { line: editPos.line, character: editPos.character + typed.length } };
    const t0 = performance.now();
    c.sendNotification("textDocument/didChange", {
      textDocument: { uri, version: ++this.version },
      contentChanges: [{ range, text: insert ? typed : "" }],
    });
    const report = (await c.sendRequest("textDocument/diagnostic", { textDocument: { uri }, ...(this.resultId ? { previousResultId: this.resultId } : {}) })) as {
      kind: string;
      resultId?: string;
      items?: unknown[];
    };
    const t1 = performance.now();
    this.resultId = report.resultId;
    if (report.kind === "full") this.diagnostics = report.items?.length ?? 0;
    await c.sendRequest("textDocument/hover", { textDocument: { uri }, position: this.hoverPos });
    const t2 = performance.now();
    if (record) {
      this.keystroke.push(t1 - t0);
      this.hover.push(t2 - t1);
      if (report.kind === "unchanged") this.unchanged++;
    }
  }

  close(): void {
    this.s.connection.sendNotification("textDocument/didClose", { textDocument: { uri: this.uri } });
  }

  latency(): Latency {
    return {
      keystrokeMs: median(this.keystroke),
      hoverMs: median(this.hover),
      keystrokeSamples: this.keystroke,
      hoverSamples: this.hover,
      diagnostics: this.diagnostics,
      unchangedShare: this.unchanged / Math.max(1, this.keystroke.length),
    };
  }
}

/**
 * Both servers typed into in alternation, round by round (which goes first alternates too), so
 * that the machine's slow and fast moments fall on both alike: on this shared 2-core machine the
 * speed drifts by tens of per cent within a minute, more than the differences measured. The first
 * `warmup` rounds are discarded: a few hundred keystrokes, so that both servers are measured with
 * their code compiled by the JIT, as after a minute of typing.
 */
async function measurePair(a: Session, b: Session, warmup: number, rounds: number): Promise<[Latency, Latency]> {
  for (let r = 0; r < warmup + rounds; r++) {
    const record = r >= warmup;
    const [first, second] = r % 4 < 2 ? [a, b] : [b, a];
    await first.round(r, record);
    await second.round(r, record);
  }
  a.close();
  b.close();
  return [a.latency(), b.latency()];
}

/**
 * The language services alone, without the protocol: the work from a new text to its
 * diagnostics, ours (analysis from the version before) against the JSON service (parse and
 * schema validation, which is what it does per version). Chunks of keystrokes alternate between
 * the two; the figure is the median over chunks of the mean per keystroke, in microseconds.
 */
async function inProcessPair(lines: number, typed: string): Promise<{ oursUs: number; jsonUs: number }> {
  const spw = generatedModel(lines);
  const spwAt = spw.indexOf("let J1 = ") + "let J1 = ".length;
  const js = generatedJson(lines);
  const jsAt = js.indexOf('"value": ') + '"value": '.length;
  const service = benchJsonService();
  const spwTexts = [spw.slice(0, spwAt) + typed + spw.slice(spwAt), spw];
  const jsTexts = [js.slice(0, jsAt) + typed + js.slice(jsAt), js];
  let previous = analyzeDocument(spw);
  let version = 1;
  const ours: number[] = [];
  const json: number[] = [];
  // About 0.1 s per chunk and side: 500 keystrokes at 200 lines, 25 at 5,000.
  const chunk = Math.max(10, Math.round(100000 / lines));
  for (let k = 0; k < 24; k++) {
    let t0 = performance.now();
    for (let r = 0; r < chunk; r++) previous = analyzeDocument(spwTexts[r % 2]!, { previous });
    if (k >= 4) ours.push(((performance.now() - t0) / chunk) * 1000);
    t0 = performance.now();
    for (let r = 0; r < chunk; r++) {
      const doc = TextDocument.create("file:///bench/in-process.json", "json", ++version, jsTexts[r % 2]!);
      await service.doValidation(doc, service.parseJSONDocument(doc));
    }
    if (k >= 4) json.push(((performance.now() - t0) / chunk) * 1000);
  }
  return { oursUs: median(ours), jsonUs: median(json) };
}

/**
 * The ratio of medians ours / reference in each of `blocks` consecutive stretches of the paired
 * rounds (the same stretch of time for both servers): its spread says how far the machine's drift
 * moves the ratio. "met" when every stretch gives at most 1, "NOT MET" when every stretch gives
 * more, otherwise "within noise".
 */
function pairedRatio(ours: readonly number[], reference: readonly number[], blocks = 5): { ratio: number; low: number; high: number; verdict: "met" | "NOT MET" | "within noise" } {
  const size = Math.floor(Math.min(ours.length, reference.length) / blocks);
  const ratios: number[] = [];
  for (let k = 0; k < blocks; k++) ratios.push(median(ours.slice(k * size, (k + 1) * size)) / median(reference.slice(k * size, (k + 1) * size)));
  const low = Math.min(...ratios);
  const high = Math.max(...ratios);
  return { ratio: median(ours as number[]) / median(reference as number[]), low, high, verdict: high <= 1 ? "met" : low > 1 ? "NOT MET" : "within noise" };
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
  out.push("language services alone, new text to diagnostics (chunks of keystrokes alternating between the two; median of 20 chunk means):");
  for (const lines of [200, 5000]) {
    for (const [what, typed] of [
      ["a space", " "],
      ["a digit", "1"],
    ] as const) {
      const r = await inProcessPair(lines, typed);
      out.push(`  ${lines} lines, typing ${what}: ours ${r.oursUs.toFixed(0)} us, JSON ${r.jsonUs.toFixed(0)} us, ratio ${(r.oursUs / r.jsonUs).toFixed(2)}`);
    }
  }

  const ours = await startServer("spinwright", "server.js", ["--stdio"]);
  const json = await startServer("json reference", "benchJsonServer.js", ["--stdio"]);
  try {
    const warmup = 300;
    out.push(`through the protocol (stdio JSON-RPC, incremental sync, pull diagnostics), both servers typed into in alternation, median after ${warmup} warm-up keystrokes:`);
    const verdicts: ("met" | "NOT MET" | "within noise")[] = [];
    for (const [lines, rounds] of [
      [200, 500],
      [5000, 200],
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
        const tag = `${lines}-${typed === " " ? "space" : "digit"}`;
        const [a, b] = await measurePair(
          new Session(ours, `file:///bench/model-${tag}.spw`, "spw", spw, spwEdit, spwHover, typed),
          new Session(json, `file:///bench/model-${tag}.json`, "json", js, jsEdit, jsHover, typed),
          warmup,
          rounds,
        );
        const keystroke = pairedRatio(a.keystrokeSamples, b.keystrokeSamples);
        const hover = pairedRatio(a.hoverSamples, b.hoverSamples);
        const both = [keystroke.verdict, hover.verdict];
        const verdict = both.includes("NOT MET") ? "NOT MET" : both.every((v) => v === "met") ? "met" : "within noise";
        verdicts.push(verdict);
        const range = (r: { ratio: number; low: number; high: number }): string => `${r.ratio.toFixed(2)} (${r.low.toFixed(2)}-${r.high.toFixed(2)} over 5 stretches)`;
        out.push(
          `  ${n(spw)}-line .spw, typing ${what}: keystroke to diagnostics ${a.keystrokeMs.toFixed(2)} ms (target < ${target} ms: ${a.keystrokeMs < target ? "met" : "NOT MET"}), ` +
            `hover ${a.hoverMs.toFixed(2)} ms (target < 5 ms: ${a.hoverMs < 5 ? "met" : "NOT MET"}), ${a.diagnostics} diagnostics, ${Math.round(100 * a.unchangedShare)} % of pulls unchanged`,
        );
        out.push(`  ${n(js)}-line .json (vscode-json-languageservice), typing ${what}: keystroke to diagnostics ${b.keystrokeMs.toFixed(2)} ms, hover ${b.hoverMs.toFixed(2)} ms, ${b.diagnostics} diagnostics, ${Math.round(100 * b.unchangedShare)} % of pulls unchanged`);
        out.push(
          `  ratio ours / JSON at ${lines} lines, typing ${what}: keystroke ${range(keystroke)} ${keystroke.verdict}, hover ${range(hover)} ${hover.verdict} (target <= 1)`,
        );
      }
    }
    const count = (v: string): number => verdicts.filter((x) => x === v).length;
    out.push(`not slower than the JSON reference: met in ${count("met")} of ${verdicts.length} cases, within noise in ${count("within noise")}, NOT MET in ${count("NOT MET")}`);
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
