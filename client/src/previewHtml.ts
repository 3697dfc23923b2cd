// The HTML of the preview panel: the analysis summary as theme-aware tables, under a strict
// Content-Security-Policy (no network; one nonce for the inline style and script). Pure
// functions without the vscode API, so they can be tested outside the editor. Client layer.
import type { AnalysisSummary } from "../../server/src/service/summary";

export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c] ?? c);
}

/** A random nonce for the CSP (letters and digits). */
export function makeNonce(random: () => number = Math.random): string {
  const chars = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789";
  let out = "";
  for (let i = 0; i < 32; i++) out += chars.charAt(Math.floor(random() * chars.length));
  return out;
}

function table(headers: readonly string[], rows: readonly (readonly string[])[]): string {
  const head = headers.map((h) => `<th>${escapeHtml(h)}</th>`).join("");
  const body = rows.map((r) => `<tr>${r.map((c) => `<td>${escapeHtml(c)}</td>`).join("")}</tr>`).join("");
  return `<table><thead><tr>${head}</tr></thead><tbody>${body}</tbody></table>`;
}

/** The panel's body: everything the summary holds, every text escaped. */
/**
 * The plot from the server's renderer (the same SVG as `spinwright plot`), with the page's nonce
 * on its style element so that the CSP admits it.
 */
export function plotSection(svg: string | null, nonce: string): string {
  if (!svg || !svg.startsWith("<svg")) return "";
  return `<div id="plot" class="plot">${svg.replace(/<style>/g, `<style nonce="${nonce}">`).replace(/<script[\s\S]*?<\/script>/gi, "")}</div>`;
}

export function summaryBody(s: AnalysisSummary | null, fileName: string, plot = ""): string {
  if (!s) return `<p class="muted">No analysis for ${escapeHtml(fileName)} yet.</p>`;
  const out: string[] = [];
  out.push(`<h1>${s.modelName !== null ? `Model “${escapeHtml(s.modelName)}”` : "No model block"}</h1>`);
  out.push(`<p class="muted">${escapeHtml(fileName)}</p>`);
  if (plot) out.push(plot);
  const facts: string[][] = [["convention", s.convention]];
  if (s.lattice) facts.push(["lattice", s.lattice]);
  if (s.sites.length > 0) facts.push(["sites", s.sites.map((x) => `${x.name} (S = ${x.spin}, g = ${x.g})`).join(", ")]);
  if (s.cluster) facts.push(["cluster", s.cluster]);
  if (s.field) facts.push(["field", s.field.text], ...s.field.zeeman.map((z) => ["Zeeman", z]));
  out.push(table(["", ""], facts));
  if (s.parameters.length > 0) out.push("<h2>Parameters</h2>", table(["name", "value"], s.parameters.map((p) => [p.name, p.value])));
  if (s.exchanges.length > 0)
    out.push(`<h2>Exchange terms</h2>`, table(["kind", "coupling", `scale (${s.displayUnit})`, "bonds"], s.exchanges.map((e) => [e.kind, e.coupling, e.scale, e.bonds])));
  for (const item of s.physics) out.push(`<h2>${escapeHtml(item.title)}</h2><ul>${item.lines.map((l) => `<li>${escapeHtml(l)}</li>`).join("")}</ul>`);
  out.push("<h2>Diagnostics</h2>");
  if (s.diagnostics.length === 0) out.push('<p class="muted">none</p>');
  else
    out.push(
      `<ul class="diagnostics">${s.diagnostics
        .map((d) => `<li class="${escapeHtml(d.severity)}"><span class="badge">${escapeHtml(d.severity)}</span> line ${d.line} <code>${escapeHtml(d.code)}</code>: ${escapeHtml(d.message)}</li>`)
        .join("")}</ul>`,
    );
  out.push('<p class="muted">Unit conversions and μB: CODATA 2018 (Tiesinga et al., Rev. Mod. Phys. 2021).</p>');
  return out.join("\n");
}

/** The whole document. `cspSource` is the webview's own source (webview.cspSource). */
export function previewDocument(body: string, nonce: string, cspSource: string): string {
  const csp = [`default-src 'none'`, `style-src ${cspSource} 'nonce-${nonce}'`, `script-src 'nonce-${nonce}'`, `img-src ${cspSource} data:`, `font-src ${cspSource}`].join("; ");
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="UTF-8">
<meta http-equiv="Content-Security-Policy" content="${csp}">
<meta name="viewport" content="width=device-width, initial-scale=1.0">
<title>Spinwright preview</title>
<style nonce="${nonce}">
  body { color: var(--vscode-foreground); background: var(--vscode-editor-background); font-family: var(--vscode-font-family); font-size: var(--vscode-font-size); padding: 0 1em 2em; }
  h1 { font-size: 1.4em; margin-bottom: 0.1em; }
  h2 { font-size: 1.1em; margin-top: 1.4em; border-bottom: 1px solid var(--vscode-panel-border); }
  table { border-collapse: collapse; margin: 0.5em 0; }
  th, td { text-align: left; padding: 2px 10px 2px 0; vertical-align: top; }
  th { color: var(--vscode-descriptionForeground); font-weight: normal; }
  code { font-family: var(--vscode-editor-font-family); }
  .muted { color: var(--vscode-descriptionForeground); }
  .badge { display: inline-block; min-width: 6em; font-size: 0.85em; }
  .error .badge { color: var(--vscode-editorError-foreground); }
  .warning .badge { color: var(--vscode-editorWarning-foreground); }
  .information .badge, .hint .badge { color: var(--vscode-editorInfo-foreground); }
  button { color: var(--vscode-button-foreground); background: var(--vscode-button-background); border: none; padding: 4px 10px; cursor: pointer; }
  button:hover { background: var(--vscode-button-hoverBackground); }
  .plot svg { max-width: 100%; height: auto; }
</style>
</head>
<body>
<p><button id="copy" type="button">Copy report</button> <button id="exact" type="button">Run exact check</button> <button id="svg" type="button">Export SVG</button> <button id="png" type="button">Export PNG</button></p>
<div id="root">${body}</div>
<script nonce="${nonce}">
  const vscode = acquireVsCodeApi();
  document.getElementById("copy").addEventListener("click", () => vscode.postMessage({ type: "copyReport" }));
  document.getElementById("exact").addEventListener("click", () => vscode.postMessage({ type: "exactCheck" }));
  document.getElementById("svg").addEventListener("click", () => vscode.postMessage({ type: "exportSvg" }));
  // PNG: draw the SVG on a canvas here (data: images are allowed by the CSP) and send the bytes.
  document.getElementById("png").addEventListener("click", () => {
    const svg = document.querySelector("#plot svg");
    if (!svg) return;
    const text = new XMLSerializer().serializeToString(svg);
    const img = new Image();
    img.onload = () => {
      const canvas = document.createElement("canvas");
      canvas.width = 2 * (svg.viewBox.baseVal.width || 960);
      canvas.height = 2 * (svg.viewBox.baseVal.height || 380);
      const ctx = canvas.getContext("2d");
      ctx.fillStyle = getComputedStyle(document.body).backgroundColor || "#fff";
      ctx.fillRect(0, 0, canvas.width, canvas.height);
      ctx.drawImage(img, 0, 0, canvas.width, canvas.height);
      vscode.postMessage({ type: "png", data: canvas.toDataURL("image/png") });
    };
    img.src = "data:image/svg+xml;base64," + btoa(unescape(encodeURIComponent(text)));
  });
  window.addEventListener("message", (event) => {
    const message = event.data;
    if (message && message.type === "update" && typeof message.body === "string") document.getElementById("root").innerHTML = message.body;
  });
</script>
</body>
</html>`;
}
