// Bundles the command-line checker, the language server, the exact-diagonalization worker and
// the benchmarks with esbuild. Type checking is separate (`npm run typecheck`).
import { build } from "esbuild";
import { existsSync } from "node:fs";

const entries = [
  ["server/src/cli/main.ts", "dist/cli.js"],
  ["server/src/lsp/serverNode.ts", "dist/server.js"],
  ["server/src/physics/ed/worker.ts", "dist/edWorker.js"],
  ["server/src/host/jobWorker.ts", "dist/jobWorker.js"],
  ["bench/main.ts", "dist/bench.js"],
  ["bench/jsonServer.ts", "dist/benchJsonServer.js"],
];

for (const [entry, outfile] of entries) {
  if (!existsSync(entry)) continue;
  await build({
    entryPoints: [entry],
    outfile,
    bundle: true,
    platform: "node",
    target: "node20",
    format: "cjs",
    sourcemap: true,
    logLevel: "warning",
    // vscode-json-languageservice's UMD build requires its modules dynamically; take its ES build.
    ...(entry.startsWith("bench/jsonServer") ? { mainFields: ["module", "main"] } : {}),
    banner: entry.endsWith("cli/main.ts") ? { js: "#!/usr/bin/env node" } : {},
  });
}
