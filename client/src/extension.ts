// The desktop entry of the VS Code extension (bundled to dist/extension.js): starts the language
// server (dist/server.js) as a Node process over IPC and registers the commands. Client layer.
import * as vscode from "vscode";
import { LanguageClient, TransportKind, type ServerOptions } from "vscode-languageclient/node";
import { clientOptions, registerCommands } from "./commands";

let client: LanguageClient | undefined;

export async function activate(context: vscode.ExtensionContext): Promise<void> {
  const module = context.asAbsolutePath("dist/server.js");
  const serverOptions: ServerOptions = {
    run: { module, transport: TransportKind.ipc },
    debug: { module, transport: TransportKind.ipc, options: { execArgv: ["--nolazy", "--inspect=6010"] } },
  };
  // The id `spinwright` makes the client honour the `spinwright.trace.server` setting.
  client = new LanguageClient("spinwright", "Spinwright", serverOptions, clientOptions(context));
  registerCommands(context, client);
  await client.start();
}

export function deactivate(): Promise<void> | undefined {
  return client?.stop();
}
