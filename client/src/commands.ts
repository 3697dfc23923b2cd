// Commands and the preview panel, shared by the desktop and the web extension: open the analysis
// preview (a webview that follows the active .spw editor), copy the report as Markdown, and the
// exact-check placeholder behind the code lens. Reaches the server only through its requests.
// Client layer.
import * as vscode from "vscode";
import type { BaseLanguageClient } from "vscode-languageclient";
import type { AnalysisSummary } from "../../server/src/service/summary";
import { makeNonce, previewDocument, summaryBody } from "./previewHtml";

export const LANGUAGE_ID = "spw";
const SUMMARY_REQUEST = "spinwright/summary";
const REPORT_REQUEST = "spinwright/report";
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

  constructor(private readonly client: BaseLanguageClient) {}

  async show(uri: vscode.Uri): Promise<void> {
    this.uri = uri;
    if (!this.panel) {
      this.panel = vscode.window.createWebviewPanel("spinwright.preview", "Spinwright preview", vscode.ViewColumn.Beside, {
        enableScripts: true,
        localResourceRoots: [],
      });
      this.panel.onDidDispose(() => (this.panel = undefined));
      this.panel.webview.onDidReceiveMessage((m: { type?: string }) => {
        if (m?.type === "copyReport" && this.uri) void copyReport(this.client, this.uri);
      });
      this.panel.webview.html = previewDocument(summaryBody(null, fileName(uri)), makeNonce(), this.panel.webview.cspSource);
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
      panel.title = `Spinwright: ${fileName(uri)}`;
      await panel.webview.postMessage({ type: "update", body: summaryBody(result?.summary ?? null, fileName(uri)) });
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
    // Placeholder: the exact diagonalization is not wired to the editor yet; the lens says what
    // it would run on, and this command says plainly that it does not run.
    vscode.commands.registerCommand("spinwright.runExactCheck", (args?: { sites?: number; fits?: boolean }) => {
      const sites = typeof args?.sites === "number" ? `${args.sites} sites` : "this cluster";
      void vscode.window.showInformationMessage(
        args?.fits === false
          ? `Spinwright: ${sites} exceed spinwright.exactCheck.maxSites; reduce the cluster or raise the limit.`
          : `Spinwright: the exact check on ${sites} is not available from the editor yet (use the command line).`,
      );
    }),
    vscode.workspace.onDidChangeTextDocument((e) => preview.scheduleUpdate(e.document.uri)),
    vscode.window.onDidChangeActiveTextEditor((e) => preview.follow(e?.document.languageId === LANGUAGE_ID ? e.document : undefined)),
  );
}

/** Options shared by both language clients. */
export function clientOptions(context: vscode.ExtensionContext): import("vscode-languageclient").LanguageClientOptions {
  return {
    documentSelector: [{ language: LANGUAGE_ID }],
    initializationOptions: { diagnosticsDocUri: vscode.Uri.joinPath(context.extensionUri, "docs", "diagnostics.md").toString() },
  };
}
