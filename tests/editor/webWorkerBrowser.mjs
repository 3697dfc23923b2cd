// The browser build of the language server in a real browser (Debian's Chromium via Playwright):
// a page on a loopback server starts dist/serverWeb.js as a Web Worker, speaks JSON-RPC to it
// over postMessage, and runs the exact check, which the server hands to a nested Web Worker
// (dist/jobWorkerWeb.js). Checks: the hover holds the Zeeman energy, and the exact check of a
// 10-site Heisenberg ring finds one q = 0 pole (Larmor theorem).
// usage: node tests/editor/webWorkerBrowser.mjs <screenshot-folder>   (PW_FROM: playwright-core)
import { createServer } from "http";
import { readFileSync, existsSync } from "fs";
import { createRequire } from "module";
import { join, resolve } from "path";
const require = createRequire(process.env.PW_FROM || import.meta.url);
const { chromium } = require("playwright-core");
const ROOT = resolve(new URL(".", import.meta.url).pathname, "..", "..");
const shots = process.argv[2] || join(ROOT, ".e2e", "screenshots");
const page0 = `<!doctype html><meta charset="utf-8"><title>Spinwright web worker check</title><body><pre id="log"></pre>`;
const http = createServer((req, res) => {
  const path = req.url.split("?")[0];
  if (path === "/") return res.writeHead(200, { "content-type": "text/html" }).end(page0);
  const file = join(ROOT, "dist", path.replace(/^\/dist\//, ""));
  if (!path.startsWith("/dist/") || !existsSync(file)) return res.writeHead(404).end();
  res.writeHead(200, { "content-type": "text/javascript" }).end(readFileSync(file));
});
await new Promise((r) => http.listen(0, "127.0.0.1", r));
const base = `http://127.0.0.1:${http.address().port}`;
const text = `# Invented scenario for a browser test.
model "web-ring" {
  convention antiferro-positive
  lattice chain sites Cu
  let J1 = 1 meV
  exchange heisenberg(J1) on shell 1
  g Cu = 2
  field 8 T along (0, 0, 1)
  cluster 10 periodic
}
`;
const browser = await chromium.launch({ executablePath: "/usr/bin/chromium", headless: true, args: ["--no-sandbox", "--disable-gpu"] });
let failures = 0;
const check = (ok, what) => {
  console.log(`${ok ? "PASS" : "FAIL"} ${what}`);
  if (!ok) failures++;
};
try {
  const page = await browser.newPage();
  page.on("pageerror", (e) => console.log("  [pageerror] " + String(e).slice(0, 300)));
  await page.goto(base + "/");
  const out = await page.evaluate(async (text) => {
    const log = (m) => (document.getElementById("log").textContent += m + "\n");
    const w = new Worker("/dist/serverWeb.js");
    let id = 0;
    const pending = new Map();
    w.onmessage = ({ data: m }) => {
      if (m.id !== undefined && m.method === undefined) pending.get(m.id)?.(m);
      else if (m.id !== undefined) w.postMessage({ jsonrpc: "2.0", id: m.id, result: m.method === "workspace/configuration" ? m.params.items.map(() => null) : null });
    };
    const request = (method, params) => new Promise((r) => { const k = ++id; pending.set(k, r); w.postMessage({ jsonrpc: "2.0", id: k, method, params }); });
    const notify = (method, params) => w.postMessage({ jsonrpc: "2.0", method, params });
    await request("initialize", { processId: null, rootUri: null, capabilities: { workspace: { configuration: true }, textDocument: { diagnostic: {} } } });
    notify("initialized", {});
    const uri = "file:///web-ring.spw";
    notify("textDocument/didOpen", { textDocument: { uri, languageId: "spw", version: 1, text } });
    const hover = (await request("textDocument/hover", { textDocument: { uri }, position: { line: 7, character: 3 } })).result?.contents?.value ?? "";
    log("hover: " + hover.split("\n").slice(0, 5).join(" | "));
    const t0 = performance.now();
    const exact = (await request("spinwright/exactCheck", { uri })).result;
    log(`exact check (${((performance.now() - t0) / 1000).toFixed(1)} s): ${exact.message}`);
    return { hover, exact };
  }, text);
  // E_Z = g muB B = 2 * 5.788381806e-2 meV/T * 8 T (CODATA 2018) = 0.92614 meV.
  check(out.hover.includes("E_Z = 0.92614 meV"), "browser: hover from the Web Worker server holds E_Z = 0.92614 meV");
  check(out.exact?.ok === true && out.exact.sites === 10 && out.exact.larmor?.singlePole === true, `browser: exact check in a nested Web Worker (${out.exact?.message})`);
  await page.screenshot({ path: join(shots, "4-web-worker.png") });
} catch (e) {
  console.log("ERROR", e);
  failures++;
} finally {
  await browser.close();
  http.close();
}
process.exit(failures === 0 ? 0 : 1);
