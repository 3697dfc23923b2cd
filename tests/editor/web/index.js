// In-editor test for @vscode/test-web (VS Code for the web; also run on the desktop by
// tests/editor/electron.mjs with @vscode/test-electron): runs inside the extension host
// with the real Spinwright extension (browser entry + Web Worker server). Opens a sample from the
// mounted samples folder, waits for its diagnostics (on the diagnostics-changed event, no fixed
// sleeps) and requires: a hover on the field with the Zeeman energy (0.80227 meV: g = 1.98 at 7 T,
// CODATA 2018 muB), a quick fix for a diagnostic of the broken sample, and the exact check run
// from the code lens (in the server's nested Web Worker).
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
  // The samples folder is the workspace: vscode-test-web://mount/ on the web, a file: folder on
  // the desktop (tests/editor/electron.mjs runs this same suite there).
  const folder = vscode.workspace.workspaceFolders && vscode.workspace.workspaceFolders[0];
  if (!folder) throw new Error("no workspace folder: open the samples folder");
  const uri = vscode.Uri.joinPath(folder.uri, "dm-chain.spw");
  const doc = await vscode.workspace.openTextDocument(uri);
  await vscode.window.showTextDocument(doc);
  if (doc.languageId !== "spw") throw new Error("language id is " + doc.languageId);
  const diagnostics = await waitForDiagnostics(uri, 30000);
  console.log("IN-EDITOR DIAGNOSTICS: " + diagnostics.map((d) => String(d.code && d.code.value !== undefined ? d.code.value : d.code)).join(", "));
  const line = doc.getText().split("\n").findIndex((l) => l.trim().startsWith("field"));
  const hovers = await vscode.commands.executeCommand("vscode.executeHoverProvider", uri, new vscode.Position(line, 4));
  const text = hovers.map((h) => h.contents.map((c) => (c.value !== undefined ? c.value : String(c))).join(" ")).join(" ");
  if (!/Zeeman energy/.test(text) || !/E_Z = 0\.80227 meV/.test(text)) throw new Error("no Zeeman energy of 0.80227 meV in the hover: " + text);
  console.log("IN-EDITOR HOVER OK: " + text.replace(/\s+/g, " ").slice(0, 200));

  // A quick fix: the missing sign convention in the broken sample.
  const broken = vscode.Uri.joinPath(folder.uri, "broken", "mistakes.spw");
  await vscode.window.showTextDocument(await vscode.workspace.openTextDocument(broken));
  const brokenDiagnostics = await waitForDiagnostics(broken, 30000);
  const convention = brokenDiagnostics.find((d) => String(d.code && d.code.value !== undefined ? d.code.value : d.code) === "spw-convention-missing");
  if (!convention) throw new Error("no spw-convention-missing diagnostic in mistakes.spw");
  const actions = await vscode.commands.executeCommand("vscode.executeCodeActionProvider", broken, convention.range, vscode.CodeActionKind.QuickFix.value);
  const titles = (actions || []).map((a) => a.title);
  if (!titles.some((t) => /convention antiferro-positive/.test(t))) throw new Error("no quick fix adding the convention: " + JSON.stringify(titles));
  console.log("IN-EDITOR QUICK FIX OK: " + titles.join(" | "));

  // The exact check from the code lens, as a click would run it.
  await vscode.window.showTextDocument(doc);
  const lenses = await vscode.commands.executeCommand("vscode.executeCodeLensProvider", uri);
  const lens = (lenses || []).find((l) => l.command && l.command.command === "spinwright.runExactCheck");
  if (!lens) throw new Error("no exact-check code lens on dm-chain.spw");
  const result = await vscode.commands.executeCommand(lens.command.command, ...(lens.command.arguments || []));
  if (!result || !result.ok || !/Exact check on 20 sites/.test(result.message)) throw new Error("exact check failed: " + JSON.stringify(result));
  console.log("IN-EDITOR EXACT CHECK OK: " + result.message);
};
