#!/usr/bin/env bash
# Attach `tandem lsp` to a calc with an error in headless Neovim and print
# the diagnostics and a hover it reads back. Usage:
#   editors/nvim/check.sh [CALC] [TANDEM]
# (default: a copy of examples/filled_post.tandem with a misspelt material,
# and `tandem` on the PATH). Exit 0 when the diagnostic came back.
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
root="$(cd "$here/../.." && pwd)"
tandem="${2:-tandem}"
work="$(mktemp -d)"
trap 'rm -rf "$work"' EXIT
calc="${1:-}"
if [ -z "$calc" ]; then
  calc="$work/post.tandem"
  sed '0,/material = fill/s//material = fil/' "$root/examples/filled_post.tandem" > "$calc"
fi
export TANDEM_NVIM_OUT="$work/out.txt" TANDEM_BIN="$tandem"
timeout 60 nvim --headless --noplugin -u "$here/attach.lua" "$calc" > /dev/null 2>&1 || true
cat "$TANDEM_NVIM_OUT"
grep -q '^diagnostic ' "$TANDEM_NVIM_OUT"
