// Packages the extension into spinwright.vsix with vsce, offline: the bundles in dist/ carry all
// code, so dependency detection is off (--no-dependencies). Builds first (production bundles
// for the editor entries), then prints the package's size and file count.
import { execFileSync } from "node:child_process";
import { existsSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";

const root = process.cwd();
const run = (cmd, args) => execFileSync(cmd, args, { stdio: "inherit", cwd: root });

run(process.execPath, ["scripts/build.mjs", "--production"]);
run(process.execPath, ["scripts/buildEditor.mjs", "--production"]);
for (const f of ["dist/server.js", "dist/extension.js", "dist/browserExtension.js", "dist/serverWeb.js", "dist/jobWorkerWeb.js"])
  if (!existsSync(join(root, f))) throw new Error(`${f} is missing after the build`);

const manifest = JSON.parse(readFileSync(join(root, "package.json"), "utf8"));
const vsce = join(root, "node_modules", "@vscode", "vsce", "vsce");
const args = [vsce, "package", "--no-dependencies", "--out", "spinwright.vsix", "--ignoreFile", "scripts/vscodeignore", "--allow-missing-repository", "--no-rewrite-relative-links"];
if (!existsSync(join(root, "LICENSE")) && !existsSync(join(root, "LICENSE.md"))) args.push("--skip-license");
run(process.execPath, args);

const bytes = statSync(join(root, "spinwright.vsix")).size;
console.log(`spinwright.vsix (${manifest.name} ${manifest.version}): ${(bytes / 1024).toFixed(0)} KiB (${bytes} bytes)`);
