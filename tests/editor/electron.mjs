// The in-editor suite (tests/editor/web/index.js) in desktop VS Code through @vscode/test-electron,
// for developers with network access: test-electron downloads a VS Code build, which this offline
// machine and CI cannot do (CI runs the same suite in VS Code for the web: tests/editor/web.sh).
// usage: npm run build && node tests/editor/electron.mjs
import { runTests } from "@vscode/test-electron";
import { join, resolve } from "node:path";
import { fileURLToPath } from "node:url";

const root = resolve(fileURLToPath(new URL(".", import.meta.url)), "..", "..");
try {
  await runTests({
    extensionDevelopmentPath: root,
    extensionTestsPath: join(root, "tests", "editor", "web", "index.js"),
    launchArgs: [join(root, "samples"), "--disable-extensions", "--disable-workspace-trust"],
  });
} catch (error) {
  console.error(`electron.mjs: the desktop run failed: ${error instanceof Error ? error.message : String(error)}`);
  process.exit(1);
}
