// The reference for the editor benchmark: a minimal JSON language server over stdio built on
// vscode-json-languageservice (the service behind VS Code's own JSON support) and
// vscode-languageserver, with the same sync (incremental), the same pull diagnostics and hover
// as ours (result ids included), so that both are measured through the protocol by the same
// client. Bundled to
// dist/benchJsonServer.js; used by bench/editor.ts only.
import type { JSONDocument } from "vscode-json-languageservice";
import { createConnection, DocumentDiagnosticReportKind, TextDocuments, TextDocumentSyncKind } from "vscode-languageserver/node";
import { TextDocument } from "vscode-languageserver-textdocument";
import { benchJsonService } from "./jsonModel";

const connection = createConnection(process.stdin, process.stdout);
const documents = new TextDocuments(TextDocument);
const service = benchJsonService();

// Parsed documents keyed by uri + version, as our server caches its analysis.
const parsed = new Map<string, { version: number; json: JSONDocument }>();
function jsonOf(doc: TextDocument): JSONDocument {
  const hit = parsed.get(doc.uri);
  if (hit && hit.version === doc.version) return hit.json;
  const json = service.parseJSONDocument(doc);
  parsed.set(doc.uri, { version: doc.version, json });
  return json;
}

connection.onInitialize(() => ({
  capabilities: {
    textDocumentSync: TextDocumentSyncKind.Incremental,
    hoverProvider: true,
    diagnosticProvider: { interFileDependencies: false, workspaceDiagnostics: false },
  },
}));
// The same result ids as our server: diagnostics that read as before keep their id, and a client
// that sends it back gets "unchanged".
const lastReports = new Map<string, { json: string; resultId: string }>();
let serial = 0;
connection.languages.diagnostics.on(async (p) => {
  const doc = documents.get(p.textDocument.uri);
  if (!doc) return { kind: DocumentDiagnosticReportKind.Full, items: [] };
  const items = await service.doValidation(doc, jsonOf(doc));
  const json = JSON.stringify(items);
  const last = lastReports.get(doc.uri);
  const resultId = last && last.json === json ? last.resultId : String(++serial);
  lastReports.set(doc.uri, { json, resultId });
  if (p.previousResultId === resultId) return { kind: DocumentDiagnosticReportKind.Unchanged, resultId };
  return { kind: DocumentDiagnosticReportKind.Full, resultId, items };
});
connection.onHover(async (p) => {
  const doc = documents.get(p.textDocument.uri);
  return doc ? service.doHover(doc, p.position, jsonOf(doc)) : null;
});
documents.listen(connection);
connection.listen();
