// The web entry of the VS Code extension (bundled to dist/browserExtension.js, the manifest's
// `browser` field): runs the language server in a Web Worker (dist/serverWeb.js) and registers
// the same commands as the desktop entry. Client layer.
import * as vscode from "vscode";
import { LanguageClient } from "vscode-languageclient/browser";
import { clientOptions, registerCommands } from "./commands";

let client: LanguageClient | undefined;

export async function activate(context: vscode.ExtensionContext): Promise<void> {
  const url = vscode.Uri.joinPath(context.extensionUri, "dist", "serverWeb.js");
  const worker = new Worker(url.toString(true));
  // vscode-languageclient 11 (browser): (id, name, worker, clientOptions).
  client = new LanguageClient("spinwright", "Spinwright", worker, clientOptions(context));
  registerCommands(context, client);
  await client.start();
}

export function deactivate(): Promise<void> | undefined {
  return client?.stop();
}
