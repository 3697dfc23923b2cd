// In-editor test for @vscode/test-web (VS Code for the web): runs inside the web extension host
// with the real Spinwright extension (browser entry + Web Worker server). Opens a sample from the
// mounted samples folder, waits for its diagnostics (on the diagnostics-changed event, no fixed
// sleeps) and requires a hover on the field that shows the Zeeman energy in meV.
const vscode = require("vscode");

function waitForDiagnostics(uri, timeoutMs) {
  return new Promise((resolve, reject) => {
    const done = (list) => {
      clearTimeout(timer);
      sub.dispose();
      resolve(list);
    };
    const sub = vscode.languages.onDidChangeDiagnostics((e) => {
      if (e.uris.some((u) => u.toString() === uri.toString())) done(vscode.languages.getDiagnostics(uri));
    });
    const timer = setTimeout(() => {
      sub.dispose();
      reject(new Error("no diagnostics for " + uri.toString()));
    }, timeoutMs);
    const already = vscode.languages.getDiagnostics(uri);
    if (already.length > 0) done(already);
  });
}

exports.run = async function () {
  const uri = vscode.Uri.parse("vscode-test-web://mount/dm-chain.spw");
  const doc = await vscode.workspace.openTextDocument(uri);
  await vscode.window.showTextDocument(doc);
  if (doc.languageId !== "spw") throw new Error("language id is " + doc.languageId);
  const diagnostics = await waitForDiagnostics(uri, 30000);
  console.log("IN-EDITOR DIAGNOSTICS: " + diagnostics.map((d) => String(d.code && d.code.value !== undefined ? d.code.value : d.code)).join(", "));
  const line = doc.getText().split("\n").findIndex((l) => l.trim().startsWith("field"));
  const hovers = await vscode.commands.executeCommand("vscode.executeHoverProvider", uri, new vscode.Position(line, 4));
  const text = hovers.map((h) => h.contents.map((c) => (c.value !== undefined ? c.value : String(c))).join(" ")).join(" ");
  if (!/Zeeman energy/.test(text) || !/[0-9.]+ meV/.test(text)) throw new Error("no Zeeman energy in the hover: " + text);
  console.log("IN-EDITOR HOVER OK: " + text.replace(/\s+/g, " ").slice(0, 200));
};
