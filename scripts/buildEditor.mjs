// Bundles the editor layer with esbuild: the desktop extension (dist/extension.js, Node), the
// web extension (dist/browserExtension.js), the Web Worker language server (dist/serverWeb.js) and
// its job worker for exact checks (dist/jobWorkerWeb.js).
// dist/server.js (stdio server) comes from scripts/build.mjs (rebuilt minified with --production). Type checking is separate:
// `tsc -p tsconfig.json --noEmit` and `tsc -p client/tsconfig.json --noEmit`.
import { build } from "esbuild";
import { existsSync, rmSync, statSync } from "node:fs";

const production = process.argv.includes("--production");
const common = { bundle: true, logLevel: "warning", sourcemap: !production, minify: production, legalComments: "none" };

const targets = [
  { entryPoints: ["client/src/extension.ts"], outfile: "dist/extension.js", platform: "node", target: "node20", format: "cjs", external: ["vscode"] },
  { entryPoints: ["client/src/browserExtension.ts"], outfile: "dist/browserExtension.js", platform: "browser", target: "es2022", format: "cjs", external: ["vscode"] },
  // The worker has no Node globals; mathjs and chevrotain run as they are.
  { entryPoints: ["server/src/lsp/serverWeb.ts"], outfile: "dist/serverWeb.js", platform: "browser", target: "es2022", format: "iife" },
  // Exact checks in the browser: a Web Worker started by the server's worker.
  { entryPoints: ["server/src/host/jobWorkerWeb.ts"], outfile: "dist/jobWorkerWeb.js", platform: "browser", target: "es2022", format: "iife" },
  // For packaging, the stdio server from scripts/build.mjs is rebuilt minified (same entry).
  ...(production ? [{ entryPoints: ["server/src/lsp/serverNode.ts"], outfile: "dist/server.js", platform: "node", target: "node20", format: "cjs" }] : []),
];

for (const t of targets) {
  const started = performance.now();
  await build({ ...common, ...t });
  // A production bundle has no map; an old one beside it would point at other code.
  if (production && existsSync(`${t.outfile}.map`)) rmSync(`${t.outfile}.map`);
  const kib = statSync(t.outfile).size / 1024;
  console.log(`${t.outfile}: ${kib.toFixed(0)} KiB in ${(performance.now() - started).toFixed(0)} ms`);
}
