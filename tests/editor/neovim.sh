#!/usr/bin/env bash
# End-to-end check with Neovim's built-in LSP client (a second, independent client): opens a
# sample, waits for the pushed diagnostics and requires a hover on the field that contains the
# Zeeman energy. CI installs Neovim first (apt-get install -y neovim); builds dist/server.js if
# it is missing. Usage: tests/editor/neovim.sh [FILE.spw]   (default: samples/dm-chain.spw)
set -euo pipefail
cd "$(dirname "$0")/../.."
command -v nvim >/dev/null || { echo "neovim.sh: nvim not found (apt-get install -y neovim)" >&2; exit 2; }
[ -f dist/server.js ] || node scripts/build.mjs
FILE=${1:-samples/dm-chain.spw}
[ -f "$FILE" ] || { echo "neovim.sh: no such file $FILE" >&2; exit 2; }
LOG=$(mktemp)
trap 'rm -f "$LOG"' EXIT
status=0
SPW_SERVER="$PWD/dist/server.js" timeout 60 nvim --headless --clean -c "luafile tests/editor/neovim.lua" "$FILE" >"$LOG" 2>&1 || status=$?
cat "$LOG"
grep -q '^DIAGNOSTICS after' "$LOG" || { echo "neovim.sh: no diagnostics were published" >&2; exit 1; }
if [ "$status" -ne 0 ]; then echo "neovim.sh: FAILED ($status)" >&2; exit "$status"; fi
echo "neovim.sh: OK ($FILE)"
