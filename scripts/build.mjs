// Bundles the command-line checker, the language server, the exact-diagonalization worker and
// the benchmarks with esbuild. Type checking is separate (`npm run typecheck`).
import { build } from "esbuild";
import { existsSync, rmSync } from "node:fs";

// --production (used by `npm run package`): minified, no source maps, for the .vsix.
const production = process.argv.includes("--production");

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
    sourcemap: !production,
    minify: production,
    ...(production ? { legalComments: "none" } : {}),
    logLevel: "warning",
    // vscode-json-languageservice's UMD build requires its modules dynamically; take its ES build.
    ...(entry.startsWith("bench/") ? { mainFields: ["module", "main"] } : {}),
    banner: entry.endsWith("cli/main.ts") ? { js: "#!/usr/bin/env node" } : {},
  });
  // A minified bundle has no map; an old one beside it would point at other code.
  if (production && existsSync(`${outfile}.map`)) rmSync(`${outfile}.map`);
}
