// The language server shared by the stdio (Node) and Web Worker entries: capabilities, document
// cache, debounced analysis, pull diagnostics (push for clients without pull), `spinwright.`
// settings, and each editor feature as a guarded wrapper over the service layer (a failure is
// logged and answered with an empty result). LSP layer: the only importer of vscode-languageserver.
import {
  CodeActionKind,
  DidChangeConfigurationNotification,
  DocumentDiagnosticReportKind,
  ErrorCodes,
  ResponseError,
  SemanticTokensBuilder,
  TextDocumentSyncKind,
  TextDocuments,
  type CodeLens as LspCodeLens,
  type Connection,
  type DocumentDiagnosticReport,
  type InitializeParams,
  type InitializeResult,
  type SelectionRange,
  type ServerCapabilities,
} from "vscode-languageserver";
import { TextDocument } from "vscode-languageserver-textdocument";
import { analyzeDocument, type DocumentAnalysis } from "../analysis/analyze";
import type { ExactCalibration } from "../analysis/predictions";
import { clusterSolveJob, type HeavyJob, type JobResult } from "../host/jobs";
import { exportCluster } from "../model/exportCluster";
import type { ExactResult } from "../physics/ed/solve";
import { renderPlotSvg, type PlotPole } from "../render/plot";
import * as service from "../service/index";
import { sameAsLsp, toDocumentSymbol, toLspCodeAction, toLspCompletion, toLspDiagnostic, toLspEdits, toRange, type LspReport } from "./convert";
import { AnalysisCache, Debouncer, type CachedAnalysis } from "./documents";

export const SERVER_NAME = "spinwright";
export const SERVER_VERSION = "0.1.0";
/** Pause after the last keystroke before a pushed analysis (pull clients ask themselves). */
export const DEBOUNCE_MS = 50;

export interface ServerSettings extends service.ServiceSettings {
  readonly exactCheckAutomatic: boolean;
}

export const DEFAULT_SERVER_SETTINGS: ServerSettings = { ...service.DEFAULT_SETTINGS, exactCheckAutomatic: false };

/** Reads the `spinwright` configuration section defensively (nested or flat dotted keys). */
export function readSettings(raw: unknown): ServerSettings {
  const r = raw !== null && typeof raw === "object" ? (raw as Record<string, unknown>) : {};
  const exact = r["exactCheck"] !== null && typeof r["exactCheck"] === "object" ? (r["exactCheck"] as Record<string, unknown>) : {};
  const pick = (nested: unknown, flat: unknown): unknown => (nested !== undefined ? nested : flat);
  const units = r["displayUnits"];
  const maxSites = pick(exact["maxSites"], r["exactCheck.maxSites"]);
  const automatic = pick(exact["automatic"], r["exactCheck.automatic"]);
  return {
    displayUnits: typeof units === "string" ? units : DEFAULT_SERVER_SETTINGS.displayUnits,
    exactCheckMaxSites: typeof maxSites === "number" && Number.isFinite(maxSites) && maxSites > 0 ? Math.floor(maxSites) : DEFAULT_SERVER_SETTINGS.exactCheckMaxSites,
    exactCheckAutomatic: typeof automatic === "boolean" ? automatic : DEFAULT_SERVER_SETTINGS.exactCheckAutomatic,
  };
}

/** Custom requests of ours, namespaced. */
export const SUMMARY_REQUEST = "spinwright/summary";
export const REPORT_REQUEST = "spinwright/report";

export const EXACT_CHECK_REQUEST = "spinwright/exactCheck";
export const PLOT_REQUEST = "spinwright/plot";

/** What the host offers: heavy jobs off the main thread (absent where no worker can be started). */
export interface ServerRuntime {
  readonly runJob?: <J extends HeavyJob>(job: J, options: { signal: AbortSignal; onProgress: (fraction: number, stage: string) => void }) => Promise<JobResult<J>>;
  /** Receives the client's initializationOptions (e.g. where the browser job worker is). */
  readonly initialize?: (options: Record<string, unknown>) => void;
}

/** Poles of the file's exact check on the plot's axes (q in units of pi). */
function polesForPlot(r: ExactResult): PlotPole[] {
  return r.correlators
    .filter((c) => c.component === "-+")
    .flatMap((c) => c.poles.filter((p) => p.weight > 1e-6).map((p) => ({ qOverPi: c.q / Math.PI, energyMeV: p.energyMeV, weight: p.weight })));
}

export function startServer(connection: Connection, runtime: ServerRuntime = {}): void {
  const documents = new TextDocuments(TextDocument);
  // Exact results: calibrations per coupling set (shared by every file with those couplings) and
  // the last solve of each file's cluster, with the document version it was run on.
  const calibrations = new Map<string, ExactCalibration>();
  const solves = new Map<string, { version: number; result: ExactResult }>();
  const running = new Map<string, AbortController>();
  const cache = new AnalysisCache(
    (uri, error) => logError(`analysis of ${uri}`, error),
    (text, previous) => analyzeDocument(text, { previous, exact: (c) => calibrations.get(c.key) ?? null }),
  );
  const debouncer = new Debouncer(DEBOUNCE_MS);
  let settings: ServerSettings = DEFAULT_SERVER_SETTINGS;
  let pullDiagnostics = false;
  let snippetSupport = false;
  let configurationPull = false;
  let dynamicConfiguration = false;
  let docsUri: string | null = null;

  function logError(what: string, error: unknown): void {
    const text = error instanceof Error ? `${error.message}\n${error.stack ?? ""}` : String(error);
    try {
      connection.console.error(`${what} failed: ${text}`);
    } catch {
      // The connection itself is gone; nothing left to tell.
    }
  }

  /** Wraps a handler: any exception is logged and answered with `fallback`. */
  function guard<P, R>(name: string, fallback: R, handler: (params: P, token?: unknown) => R | Promise<R>): (params: P, token?: unknown) => Promise<R> {
    return async (params: P, token?: unknown) => {
      try {
        return await handler(params, token);
      } catch (error) {
        if (error instanceof ResponseError) throw error;
        logError(name, error);
        return fallback;
      }
    };
  }

  function analysisOf(uri: string): { entry: CachedAnalysis; a: DocumentAnalysis } | null {
    const doc = documents.get(uri);
    if (!doc) return null;
    const entry = cache.get(doc);
    return entry.analysis ? { entry, a: entry.analysis } : null;
  }

  function offsetOf(a: DocumentAnalysis, position: { line: number; character: number }): number {
    return a.lines.offsetAt(position);
  }

  function publish(uri: string): void {
    const doc = documents.get(uri);
    if (!doc) return;
    const entry = cache.get(doc);
    const a = entry.analysis;
    void connection.sendDiagnostics({
      uri,
      version: doc.version,
      diagnostics: a ? a.diagnostics.map((d) => toLspDiagnostic(a, uri, d, docsUri)) : [],
    });
  }

  connection.onInitialize((params: InitializeParams): InitializeResult => {
    const caps = params.capabilities;
    pullDiagnostics = caps.textDocument?.diagnostic !== undefined;
    snippetSupport = caps.textDocument?.completion?.completionItem?.snippetSupport === true;
    configurationPull = caps.workspace?.configuration === true;
    dynamicConfiguration = caps.workspace?.didChangeConfiguration?.dynamicRegistration === true;
    const init = (params.initializationOptions ?? {}) as Record<string, unknown>;
    if (typeof init["diagnosticsDocUri"] === "string") docsUri = init["diagnosticsDocUri"];
    runtime.initialize?.(init);
    if (init["settings"] !== undefined) settings = readSettings(init["settings"]);
    const capabilities: ServerCapabilities = {
      textDocumentSync: { openClose: true, change: TextDocumentSyncKind.Incremental, save: { includeText: false } },
      hoverProvider: true,
      completionProvider: { triggerCharacters: [" ", "(", ">", ","], resolveProvider: false },
      signatureHelpProvider: { triggerCharacters: ["(", ","], retriggerCharacters: [","] },
      definitionProvider: true,
      referencesProvider: true,
      documentHighlightProvider: true,
      renameProvider: { prepareProvider: true },
      documentSymbolProvider: true,
      foldingRangeProvider: true,
      selectionRangeProvider: true,
      documentFormattingProvider: true,
      codeActionProvider: { codeActionKinds: [CodeActionKind.QuickFix] },
      codeLensProvider: { resolveProvider: false },
      executeCommandProvider: { commands: [] },
      inlayHintProvider: { resolveProvider: false },
      semanticTokensProvider: {
        legend: { tokenTypes: [...service.SEMANTIC_TOKEN_TYPES], tokenModifiers: [...service.SEMANTIC_TOKEN_MODIFIERS] },
        full: true,
        range: false,
      },
    };
    if (pullDiagnostics) capabilities.diagnosticProvider = { identifier: SERVER_NAME, interFileDependencies: false, workspaceDiagnostics: false };
    return { capabilities, serverInfo: { name: SERVER_NAME, version: SERVER_VERSION } };
  });

  async function refreshSettings(): Promise<void> {
    if (!configurationPull) return;
    try {
      settings = readSettings(await connection.workspace.getConfiguration({ section: "spinwright" }));
    } catch (error) {
      logError("reading the spinwright settings", error);
    }
  }

  /** After a settings change: ask the client to redraw what depends on settings. */
  function refreshViews(): void {
    const ignore = (): void => undefined;
    connection.languages.inlayHint.refresh().catch(ignore);
    connection.sendRequest("workspace/codeLens/refresh").catch(ignore);
    if (pullDiagnostics) connection.languages.diagnostics.refresh().catch(ignore);
  }

  connection.onInitialized(
    guard("initialized", undefined, async () => {
      if (dynamicConfiguration) await connection.client.register(DidChangeConfigurationNotification.type, { section: "spinwright" });
      await refreshSettings();
    }),
  );

  connection.onDidChangeConfiguration(
    guard("configuration change", undefined, async (change) => {
      if (configurationPull) await refreshSettings();
      else if (change.settings !== null && typeof change.settings === "object") settings = readSettings((change.settings as Record<string, unknown>)["spinwright"]);
      refreshViews();
    }),
  );

  documents.onDidOpen(
    guard("open", undefined, (e) => {
      if (!pullDiagnostics) publish(e.document.uri);
    }),
  );

  // spinwright.exactCheck.automatic: a saved file without errors whose cluster fits the size
  // limit is checked at once (unless this version is already solved); an edit cancels the run.
  documents.onDidSave(
    guard("save", undefined, (e) => {
      if (!settings.exactCheckAutomatic || !runtime.runJob) return;
      const uri = e.document.uri;
      if (solves.get(uri)?.version === e.document.version || running.has(uri)) return;
      const x = analysisOf(uri);
      if (!x?.a.model || x.a.diagnostics.some((d) => d.severity === "error")) return;
      const sites = service.clusterSiteCount(x.a);
      if (sites === null || sites > settings.exactCheckMaxSites) return;
      void runExactCheck(uri).then((r) => {
        if (!r["ok"] && !r["cancelled"]) connection.console.warn(`automatic exact check of ${uri}: ${String(r["message"])}`);
      });
    }),
  );

  documents.onDidChangeContent(
    guard("change", undefined, (e) => {
      const uri = e.document.uri;
      // An edit makes a running exact check stale: stop it.
      running.get(uri)?.abort();
      const version = e.document.version;
      debouncer.schedule(uri, () => {
        // A newer version replaced this one while we waited: its own schedule takes over.
        const current = documents.get(uri);
        if (!current || current.version !== version) return;
        try {
          if (pullDiagnostics) cache.get(current);
          else publish(uri);
        } catch (error) {
          logError("debounced analysis", error);
        }
      });
    }),
  );

  documents.onDidClose(
    guard("close", undefined, (e) => {
      debouncer.cancel(e.document.uri);
      cache.delete(e.document.uri);
      lastReports.delete(e.document.uri);
      if (!pullDiagnostics) void connection.sendDiagnostics({ uri: e.document.uri, diagnostics: [] });
    }),
  );

  // The last diagnostics sent for each document, as JSON, and their result id: a new version
  // whose diagnostics read the same (most keystrokes) keeps the id, so a client that sends it back
  // gets "unchanged" instead of the whole list again. Whether they read the same is first asked
  // cheaply of the service diagnostics they were made from (see sameAsLsp).
  const lastReports = new Map<string, LspReport & { version: number; json: string; resultId: string }>();
  const emptyReport: DocumentDiagnosticReport = { kind: DocumentDiagnosticReportKind.Full, items: [] };
  connection.languages.diagnostics.on(
    guard("diagnostics", emptyReport, (params): DocumentDiagnosticReport => {
      const uri = params.textDocument.uri;
      const doc = documents.get(uri);
      if (!doc) return emptyReport;
      const entry = cache.get(doc);
      let last = lastReports.get(uri);
      if (!last || last.version !== entry.version) {
        const a = entry.analysis;
        if (a && last && sameAsLsp(a, uri, docsUri, last)) last = { ...last, version: entry.version, core: a.diagnostics };
        else {
          const items = a ? a.diagnostics.map((d) => toLspDiagnostic(a, uri, d, docsUri)) : [];
          const json = JSON.stringify(items);
          last = { version: entry.version, json, resultId: last && last.json === json ? last.resultId : entry.resultId, core: a ? a.diagnostics : [], items };
        }
        lastReports.set(uri, last);
      }
      if (params.previousResultId === last.resultId) return { kind: DocumentDiagnosticReportKind.Unchanged, resultId: last.resultId };
      return { kind: DocumentDiagnosticReportKind.Full, resultId: last.resultId, items: [...last.items] };
    }),
  );

  connection.onHover(
    guard("hover", null, (p) => {
      const x = analysisOf(p.textDocument.uri);
      if (!x) return null;
      const h = service.doHover(x.a, offsetOf(x.a, p.position), p.textDocument.uri);
      return h ? { contents: { kind: "markdown" as const, value: h.markdown }, range: toRange(x.a, h.span) } : null;
    }),
  );

  connection.onCompletion(
    guard("completion", [], (p) => {
      const x = analysisOf(p.textDocument.uri);
      if (!x) return [];
      return service.doComplete(x.a, offsetOf(x.a, p.position)).map((item) => toLspCompletion(x.a, item, snippetSupport));
    }),
  );

  connection.onSignatureHelp(
    guard("signature help", null, (p) => {
      const x = analysisOf(p.textDocument.uri);
      if (!x) return null;
      const help = service.signatureHelp(x.a, offsetOf(x.a, p.position));
      if (!help) return null;
      return {
        signatures: help.signatures.map((s) => ({
          label: s.label,
          documentation: s.documentation,
          parameters: s.parameters.map((q) => ({ label: q.label, documentation: q.documentation })),
        })),
        activeSignature: help.activeSignature,
        activeParameter: help.activeParameter,
      };
    }),
  );

  connection.onDefinition(
    guard("definition", null, (p) => {
      const x = analysisOf(p.textDocument.uri);
      if (!x) return null;
      const span = service.findDefinition(x.a, offsetOf(x.a, p.position));
      return span ? { uri: p.textDocument.uri, range: toRange(x.a, span) } : null;
    }),
  );

  connection.onReferences(
    guard("references", [], (p) => {
      const x = analysisOf(p.textDocument.uri);
      if (!x) return [];
      return service
        .findReferences(x.a, offsetOf(x.a, p.position), p.context.includeDeclaration)
        .map((span) => ({ uri: p.textDocument.uri, range: toRange(x.a, span) }));
    }),
  );

  connection.onDocumentHighlight(
    guard("highlight", [], (p) => {
      const x = analysisOf(p.textDocument.uri);
      if (!x) return [];
      // DocumentHighlightKind: 2 = Read, 3 = Write.
      return service.documentHighlights(x.a, offsetOf(x.a, p.position)).map((h) => ({ range: toRange(x.a, h.span), kind: h.kind === "write" ? 3 : 2 }) as const);
    }),
  );

  connection.onPrepareRename(
    guard("prepare rename", null, (p) => {
      const x = analysisOf(p.textDocument.uri);
      if (!x) return null;
      const r = service.prepareRename(x.a, offsetOf(x.a, p.position));
      if (!r.ok) throw new ResponseError(ErrorCodes.InvalidRequest, r.reason);
      return { range: toRange(x.a, r.span), placeholder: r.placeholder };
    }),
  );

  connection.onRenameRequest(
    guard("rename", null, (p) => {
      const x = analysisOf(p.textDocument.uri);
      if (!x) return null;
      const r = service.rename(x.a, offsetOf(x.a, p.position), p.newName);
      if (!r.ok) throw new ResponseError(ErrorCodes.InvalidRequest, r.reason);
      return { changes: { [p.textDocument.uri]: toLspEdits(x.a, r.edits) } };
    }),
  );

  connection.onDocumentSymbol(
    guard("symbols", [], (p) => {
      const x = analysisOf(p.textDocument.uri);
      return x ? service.documentSymbols(x.a).map((s) => toDocumentSymbol(x.a, s)) : [];
    }),
  );

  connection.onFoldingRanges(
    guard("folding", [], (p) => {
      const x = analysisOf(p.textDocument.uri);
      return x ? service.foldingRanges(x.a).map((f) => ({ startLine: f.startLine, endLine: f.endLine, ...(f.kind ? { kind: f.kind } : {}) })) : [];
    }),
  );

  connection.onSelectionRanges(
    guard("selection ranges", [], (p) => {
      const x = analysisOf(p.textDocument.uri);
      if (!x) return [];
      return p.positions.map((pos) => {
        const spans = service.selectionSpans(x.a, offsetOf(x.a, pos));
        let range: SelectionRange | undefined;
        for (let k = spans.length - 1; k >= 0; k--) {
          const span = spans[k]!;
          range = range ? { range: toRange(x.a, span), parent: range } : { range: toRange(x.a, span) };
        }
        return range ?? { range: { start: pos, end: pos } };
      });
    }),
  );

  connection.onDocumentFormatting(
    guard("formatting", [], (p) => {
      const x = analysisOf(p.textDocument.uri);
      return x ? toLspEdits(x.a, service.formatDocument(x.a)) : [];
    }),
  );

  connection.onCodeAction(
    guard("code actions", [], (p) => {
      const x = analysisOf(p.textDocument.uri);
      if (!x) return [];
      if (p.context.only && !p.context.only.some((k) => k === CodeActionKind.QuickFix || CodeActionKind.QuickFix.startsWith(`${k}.`) || k === "")) return [];
      const range = { start: offsetOf(x.a, p.range.start), end: offsetOf(x.a, p.range.end) };
      return service.codeActions(x.a, range).map((c) => toLspCodeAction(x.a, p.textDocument.uri, c, docsUri));
    }),
  );

  connection.onCodeLens(
    guard("code lens", [], (p): LspCodeLens[] => {
      const x = analysisOf(p.textDocument.uri);
      // The lens runs the exact check: offered only where a worker can run it.
      if (!x || !runtime.runJob) return [];
      return service.codeLenses(x.a, p.textDocument.uri, settings).map((l) => ({
        range: toRange(x.a, l.span),
        command: { title: l.title, command: l.command, arguments: [...l.arguments] },
      }));
    }),
  );

  connection.languages.inlayHint.on(
    guard("inlay hints", [], (p) => {
      const x = analysisOf(p.textDocument.uri);
      if (!x) return [];
      const range = { start: offsetOf(x.a, p.range.start), end: offsetOf(x.a, p.range.end) };
      return service.inlayHints(x.a, range, settings).map((h) => ({
        position: x.a.lines.positionAt(h.offset),
        label: h.label,
        tooltip: h.tooltip,
        paddingLeft: true,
      }));
    }),
  );

  connection.languages.semanticTokens.on(
    guard("semantic tokens", { data: [] }, (p) => {
      const x = analysisOf(p.textDocument.uri);
      if (!x) return { data: [] };
      const builder = new SemanticTokensBuilder();
      const types = service.SEMANTIC_TOKEN_TYPES as readonly string[];
      const modifiers = service.SEMANTIC_TOKEN_MODIFIERS as readonly string[];
      for (const t of service.semanticTokens(x.a)) {
        const start = x.a.lines.positionAt(t.span.start);
        const mask = t.modifiers.reduce((m, name) => m | (1 << modifiers.indexOf(name)), 0);
        builder.push(start.line, start.character, t.span.end - t.span.start, types.indexOf(t.type), mask);
      }
      return builder.build();
    }),
  );

  connection.onRequest(
    SUMMARY_REQUEST,
    guard("summary", null, (p: { uri?: string }) => {
      const x = typeof p?.uri === "string" ? analysisOf(p.uri) : null;
      return x ? { version: x.entry.version, analysisMs: x.entry.elapsedMs, summary: service.analysisSummary(x.a, settings) } : null;
    }),
  );

  connection.onRequest(
    REPORT_REQUEST,
    guard("report", null, (p: { uri?: string }) => {
      const x = typeof p?.uri === "string" ? analysisOf(p.uri) : null;
      if (!x || typeof p.uri !== "string") return null;
      const name = decodeURIComponent(p.uri.split("/").pop() ?? p.uri);
      return { markdown: service.summaryMarkdown(service.analysisSummary(x.a, settings), name) };
    }),
  );

  /** Re-analyses a document after new exact results and asks the client to redraw. */
  function afterExactResults(uri: string): void {
    cache.delete(uri);
    if (pullDiagnostics) connection.languages.diagnostics.refresh().catch(() => undefined);
    else publish(uri);
    connection.languages.inlayHint.refresh().catch(() => undefined);
    connection.sendRequest("workspace/codeLens/refresh").catch(() => undefined);
  }

  /**
   * Runs the exact check of a document in the worker: the ring calibration of the chain
   * predictions (when they apply) and the exact solve of the file's cluster. Work-done progress
   * with a Cancel button; an edit of the document or a cancelled request stops it.
   */
  async function runExactCheck(uri: string, requestToken?: { isCancellationRequested: boolean; onCancellationRequested: (f: () => void) => unknown }): Promise<Record<string, unknown>> {
    const runJob = runtime.runJob;
    if (!runJob) return { ok: false, message: "Exact checks are not available here: this host cannot start a worker for heavy jobs (a browser without workers inside workers). Use the desktop extension or `spinwright solve FILE`." };
    const doc = documents.get(uri);
    const x = analysisOf(uri);
    if (!doc || !x) return { ok: false, message: "No analysis for this document." };
    const errors = x.a.diagnostics.filter((d) => d.severity === "error").length;
    if (errors > 0 || !x.a.model) return { ok: false, message: `Fix the ${errors} error(s) first.` };
    const sites = service.clusterSiteCount(x.a);
    if (sites !== null && sites > settings.exactCheckMaxSites)
      return { ok: false, message: `${sites} sites exceed spinwright.exactCheck.maxSites = ${settings.exactCheckMaxSites}.` };
    running.get(uri)?.abort();
    const controller = new AbortController();
    running.set(uri, controller);
    requestToken?.onCancellationRequested(() => controller.abort());
    const version = doc.version;
    const progress = await connection.window.createWorkDoneProgress().catch(() => null);
    progress?.begin("Spinwright exact check", 0, "starting", true);
    progress?.token.onCancellationRequested(() => controller.abort());
    const report = (base: number, span: number) => (f: number, stage: string) => progress?.report(Math.round(100 * (base + span * f)), stage);
    try {
      const couplings = x.a.physics?.predictions.couplings ?? null;
      let calibration: ExactCalibration | null = null;
      if (couplings) {
        const ring = Math.min(16, Math.max(8, 2 * Math.floor(Math.min(settings.exactCheckMaxSites, 16) / 2)));
        calibration = calibrations.get(couplings.key) ?? (await runJob({ kind: "calibrate", couplings, sites: ring }, { signal: controller.signal, onProgress: report(0, 0.5) }));
        calibrations.set(couplings.key, calibration);
      }
      const prepared = clusterSolveJob(x.a);
      let solved: ExactResult | null = null;
      if (prepared.ok) {
        solved = await runJob(prepared.job, { signal: controller.signal, onProgress: report(couplings ? 0.5 : 0, couplings ? 0.5 : 1) });
        solves.set(uri, { version, result: solved });
      }
      afterExactResults(uri);
      const l = solved?.larmor;
      const message = solved
        ? `Exact check on ${solved.sites} sites: ${l ? (l.singlePole ? "the q = 0 line is a single pole at the Zeeman energy" : `the q = 0 response is not a single line (mean offset ${Number((l.offsetFromZeemanMeV ?? 0).toPrecision(3))} meV, width ${Number((l.widthMeV ?? 0).toPrecision(3))} meV)`) : "no uniform field"}; splitting from the spin current ${solved.splittingMeV.fromCurrent === null ? "n/a" : `${Number(solved.splittingMeV.fromCurrent.toPrecision(4))} meV`}; ${solved.seconds.toFixed(2)} s.`
        : "The exact calibration of the chain predictions is done.";
      return { ok: true, message, sites: solved?.sites ?? null, larmor: solved?.larmor ?? null, splittingMeV: solved?.splittingMeV ?? null, calibrated: calibration !== null };
    } catch (error) {
      const cancelled = controller.signal.aborted || (error as Error).name === "CancelledError";
      return { ok: false, cancelled, message: cancelled ? "Exact check cancelled." : `Exact check failed: ${(error as Error).message}` };
    } finally {
      progress?.done();
      if (running.get(uri) === controller) running.delete(uri);
    }
  }

  connection.onRequest(
    EXACT_CHECK_REQUEST,
    guard("exact check", { ok: false, message: "internal error" }, (p: { uri?: string }, token?: unknown) =>
      typeof p?.uri === "string" ? runExactCheck(p.uri, token as Parameters<typeof runExactCheck>[1]) : { ok: false, message: "no uri" },
    ),
  );

  connection.onRequest(
    "spinwright/exportCluster",
    guard("export cluster", null, (p: { uri?: string }) => {
      const x = typeof p?.uri === "string" ? analysisOf(p.uri) : null;
      if (!x?.a.model) return { error: "no model in this file" };
      if (x.a.diagnostics.some((d) => d.severity === "error")) return { error: "fix the errors before exporting the cluster" };
      const e = exportCluster(x.a.model);
      return e.ok ? { json: JSON.stringify(e.json, null, 2) } : { error: e.reason };
    }),
  );

  connection.onRequest(
    PLOT_REQUEST,
    guard("plot", null, (p: { uri?: string }) => {
      const x = typeof p?.uri === "string" ? analysisOf(p.uri) : null;
      if (!x || typeof p.uri !== "string") return null;
      const solved = solves.get(p.uri);
      const c = x.a.physics?.predictions.couplings;
      const poles = solved && solved.version === x.entry.version ? polesForPlot(solved.result) : [];
      return { svg: renderPlotSvg(x.a, { poles, exact: c ? (calibrations.get(c.key) ?? null) : null }) };
    }),
  );

  connection.onShutdown(() => {
    debouncer.cancelAll();
    for (const c of running.values()) c.abort();
  });

  documents.listen(connection);
  connection.listen();
}
