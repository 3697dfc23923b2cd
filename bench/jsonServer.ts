// The reference for the editor benchmark: a minimal JSON language server over stdio built on
// vscode-json-languageservice (the service behind VS Code's own JSON support) and
// vscode-languageserver, with the same sync (incremental), the same pull diagnostics and hover
// as ours, so that both are measured through the protocol by the same client. Bundled to
// dist/benchJsonServer.js; used by bench/editor.ts only.
import { getLanguageService, type JSONDocument } from "vscode-json-languageservice";
import { createConnection, DocumentDiagnosticReportKind, TextDocuments, TextDocumentSyncKind } from "vscode-languageserver/node";
import { TextDocument } from "vscode-languageserver-textdocument";
import { BENCH_JSON_SCHEMA, BENCH_JSON_SCHEMA_URI } from "./jsonModel";

const connection = createConnection(process.stdin, process.stdout);
const documents = new TextDocuments(TextDocument);
const service = getLanguageService({ schemaRequestService: () => Promise.reject(new Error("no network")) });
service.configure({ validate: true, allowComments: false, schemas: [{ uri: BENCH_JSON_SCHEMA_URI, fileMatch: ["*.json"], schema: BENCH_JSON_SCHEMA }] });

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
connection.languages.diagnostics.on(async (p) => {
  const doc = documents.get(p.textDocument.uri);
  if (!doc) return { kind: DocumentDiagnosticReportKind.Full, items: [] };
  return { kind: DocumentDiagnosticReportKind.Full, items: await service.doValidation(doc, jsonOf(doc)) };
});
connection.onHover(async (p) => {
  const doc = documents.get(p.textDocument.uri);
  return doc ? service.doHover(doc, p.position, jsonOf(doc)) : null;
});
documents.listen(connection);
connection.listen();
