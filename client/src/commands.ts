// Commands and the preview panel, shared by the desktop and the web extension: open the analysis
// preview (a webview that follows the active .spw editor), copy the report as Markdown, and the
// exact-check placeholder behind the code lens. Reaches the server only through its requests.
// Client layer.
import * as vscode from "vscode";
import type { BaseLanguageClient } from "vscode-languageclient";
import type { AnalysisSummary } from "../../server/src/service/summary";
import { makeNonce, plotSection, previewDocument, summaryBody } from "./previewHtml";

export const LANGUAGE_ID = "spw";
const SUMMARY_REQUEST = "spinwright/summary";
const REPORT_REQUEST = "spinwright/report";
const EXACT_CHECK_REQUEST = "spinwright/exactCheck";
const PLOT_REQUEST = "spinwright/plot";
const UPDATE_DELAY_MS = 250;

function fileName(uri: vscode.Uri): string {
  return uri.path.split("/").pop() ?? uri.toString();
}

function activeSpwDocument(): vscode.TextDocument | undefined {
  const doc = vscode.window.activeTextEditor?.document;
  return doc?.languageId === LANGUAGE_ID ? doc : undefined;
}

class PreviewPanel {
  private panel: vscode.WebviewPanel | undefined;
  private uri: vscode.Uri | undefined;
  private timer: ReturnType<typeof setTimeout> | undefined;
  private nonce = makeNonce();

  constructor(private readonly client: BaseLanguageClient) {}

  async show(uri: vscode.Uri): Promise<void> {
    this.uri = uri;
    if (!this.panel) {
      this.panel = vscode.window.createWebviewPanel("spinwright.preview", "Spinwright preview", vscode.ViewColumn.Beside, {
        enableScripts: true,
        localResourceRoots: [],
      });
      this.panel.onDidDispose(() => (this.panel = undefined));
      this.panel.webview.onDidReceiveMessage((m: { type?: string; data?: string }) => {
        if (!this.uri) return;
        if (m?.type === "copyReport") void copyReport(this.client, this.uri);
        else if (m?.type === "exactCheck") void runExactCheck(this.client, this.uri).then(() => this.update());
        else if (m?.type === "exportSvg") void exportPlot(this.client, this.uri, null);
        else if (m?.type === "png" && typeof m.data === "string") void exportPlot(this.client, this.uri, m.data);
      });
      this.nonce = makeNonce();
      this.panel.webview.html = previewDocument(summaryBody(null, fileName(uri)), this.nonce, this.panel.webview.cspSource);
    } else this.panel.reveal(undefined, true);
    await this.update();
  }

  /** Re-renders after a pause, when the previewed document changes. */
  scheduleUpdate(uri: vscode.Uri): void {
    if (!this.panel || this.uri?.toString() !== uri.toString()) return;
    if (this.timer) clearTimeout(this.timer);
    this.timer = setTimeout(() => void this.update(), UPDATE_DELAY_MS);
  }

  follow(doc: vscode.TextDocument | undefined): void {
    if (this.panel && doc && doc.uri.toString() !== this.uri?.toString()) void this.show(doc.uri);
  }

  private async update(): Promise<void> {
    const panel = this.panel;
    const uri = this.uri;
    if (!panel || !uri) return;
    try {
      const result = await this.client.sendRequest<{ summary: AnalysisSummary } | null>(SUMMARY_REQUEST, { uri: uri.toString() });
      const plot = await this.client.sendRequest<{ svg: string } | null>(PLOT_REQUEST, { uri: uri.toString() });
      panel.title = `Spinwright: ${fileName(uri)}`;
      await panel.webview.postMessage({ type: "update", body: summaryBody(result?.summary ?? null, fileName(uri), plotSection(plot?.svg ?? null, this.nonce)) });
    } catch (error) {
      await panel.webview.postMessage({ type: "update", body: summaryBody(null, `${fileName(uri)} (${String(error)})`) });
    }
  }
}

async function copyReport(client: BaseLanguageClient, uri: vscode.Uri): Promise<void> {
  const result = await client.sendRequest<{ markdown: string } | null>(REPORT_REQUEST, { uri: uri.toString() });
  if (!result) {
    void vscode.window.showWarningMessage("Spinwright: no analysis for this file.");
    return;
  }
  await vscode.env.clipboard.writeText(result.markdown);
  void vscode.window.showInformationMessage(`Spinwright: report for ${fileName(uri)} copied.`);
}

/**
 * Asks the server to run the exact check (it shows progress with a Cancel button), reports its
 * message and returns the server's answer (for callers and tests).
 */
async function runExactCheck(client: BaseLanguageClient, uri: vscode.Uri): Promise<{ ok: boolean; message: string } | null> {
  const result = await client.sendRequest<{ ok: boolean; message: string } | null>(EXACT_CHECK_REQUEST, { uri: uri.toString() });
  const text = `Spinwright: ${result?.message ?? "no answer from the server."}`;
  if (result?.ok) void vscode.window.showInformationMessage(text);
  else void vscode.window.showWarningMessage(text);
  return result;
}

/** Saves the plot as SVG (from the server) or PNG (drawn by the preview). */
async function exportPlot(client: BaseLanguageClient, uri: vscode.Uri, pngDataUrl: string | null): Promise<void> {
  const ext = pngDataUrl ? "png" : "svg";
  const target = await vscode.window.showSaveDialog({
    defaultUri: vscode.Uri.joinPath(uri, "..", `${fileName(uri).replace(/\.spw$/, "")}-plot.${ext}`),
    filters: pngDataUrl ? { "PNG image": ["png"] } : { "SVG image": ["svg"] },
  });
  if (!target) return;
  let bytes: Uint8Array;
  if (pngDataUrl) {
    const b64 = pngDataUrl.replace(/^data:image\/png;base64,/, "");
    bytes = Uint8Array.from(atob(b64), (c) => c.charCodeAt(0));
  } else {
    const plot = await client.sendRequest<{ svg: string } | null>(PLOT_REQUEST, { uri: uri.toString() });
    if (!plot) return;
    bytes = new TextEncoder().encode(plot.svg);
  }
  await vscode.workspace.fs.writeFile(target, bytes);
  void vscode.window.showInformationMessage(`Spinwright: plot saved to ${target.path.split("/").pop()}.`);
}

/** Registers the commands and the preview's listeners; returns nothing, disposables go to the context. */
export function registerCommands(context: vscode.ExtensionContext, client: BaseLanguageClient): void {
  const preview = new PreviewPanel(client);
  context.subscriptions.push(
    vscode.commands.registerCommand("spinwright.openPreview", async (uri?: vscode.Uri) => {
      const target = uri instanceof vscode.Uri ? uri : activeSpwDocument()?.uri;
      if (!target) {
        void vscode.window.showWarningMessage("Spinwright: open a .spw file first.");
        return;
      }
      await preview.show(target);
    }),
    vscode.commands.registerCommand("spinwright.copyReport", async (uri?: vscode.Uri) => {
      const target = uri instanceof vscode.Uri ? uri : activeSpwDocument()?.uri;
      if (target) await copyReport(client, target);
      else void vscode.window.showWarningMessage("Spinwright: open a .spw file first.");
    }),
    // The code lens "Run exact check on N sites": the server runs it in a worker with progress.
    vscode.commands.registerCommand("spinwright.runExactCheck", async (args?: { uri?: string; sites?: number; fits?: boolean }) => {
      if (args?.fits === false) {
        void vscode.window.showWarningMessage(`Spinwright: ${args.sites ?? "these"} sites exceed spinwright.exactCheck.maxSites; reduce the cluster or raise the limit.`);
        return null;
      }
      const target = typeof args?.uri === "string" ? vscode.Uri.parse(args.uri) : activeSpwDocument()?.uri;
      if (!target) return null;
      const result = await runExactCheck(client, target);
      preview.scheduleUpdate(target);
      return result;
    }),
    vscode.commands.registerCommand("spinwright.exportCluster", async (uri?: vscode.Uri) => {
      const target = uri instanceof vscode.Uri ? uri : activeSpwDocument()?.uri;
      if (!target) return;
      const result = await client.sendRequest<{ json: string } | { error: string } | null>("spinwright/exportCluster", { uri: target.toString() });
      if (!result || "error" in result) {
        void vscode.window.showWarningMessage(`Spinwright: ${result && "error" in result ? result.error : "no analysis for this file."}`);
        return;
      }
      const dest = await vscode.window.showSaveDialog({ defaultUri: vscode.Uri.joinPath(target, "..", `${fileName(target).replace(/\.spw$/, "")}-cluster.json`), filters: { JSON: ["json"] } });
      if (dest) await vscode.workspace.fs.writeFile(dest, new TextEncoder().encode(result.json));
    }),
    vscode.workspace.onDidChangeTextDocument((e) => preview.scheduleUpdate(e.document.uri)),
    vscode.window.onDidChangeActiveTextEditor((e) => preview.follow(e?.document.languageId === LANGUAGE_ID ? e.document : undefined)),
  );
}

/** Options shared by both language clients. */
export function clientOptions(context: vscode.ExtensionContext): import("vscode-languageclient").LanguageClientOptions {
  return {
    documentSelector: [{ language: LANGUAGE_ID }],
    initializationOptions: {
      diagnosticsDocUri: vscode.Uri.joinPath(context.extensionUri, "docs", "diagnostics.md").toString(),
      // The browser build's server starts its exact-check worker from here.
      jobWorkerUri: vscode.Uri.joinPath(context.extensionUri, "dist", "jobWorkerWeb.js").toString(true),
    },
  };
}
