// The Web Worker entry of the language server (bundled to dist/serverWeb.js) for VS Code in the
// browser: the same server as serverNode.ts, exchanging worker messages with the extension.
// LSP layer.
import { BrowserMessageReader, BrowserMessageWriter, createConnection, ProposedFeatures } from "vscode-languageserver/browser";
import { startServer } from "./server";

// The worker global scope; typed from the reader so the shared tsconfig needs no DOM library.
declare const self: ConstructorParameters<typeof BrowserMessageReader>[0];

startServer(createConnection(ProposedFeatures.all, new BrowserMessageReader(self), new BrowserMessageWriter(self)));
