#!/usr/bin/env bash
# The main job on the bundled demo dataset (`npm run demo`):
#   1. build, validate and summarise demo-data/wind-farm;
#   2. score its newest slice headless and print the candidate classes found there;
#   3. unless --headless (or CI): package the extension and open the demo dataset in VS Code —
#      with `code` when it is on PATH, otherwise in code-server on 127.0.0.1 (installed once into
#      a cache folder by scripts/e2e/setup.sh), printing the address to open.
set -euo pipefail
cd "$(dirname "$0")/.."

headless=false
for arg in "$@"; do
  [[ "$arg" == "--headless" ]] && headless=true
done
[[ "${CI:-}" == "true" ]] && headless=true

demo=demo-data/wind-farm
cli() { node bin/graph-curator.js "$@"; }

echo "== build"
node esbuild.mjs
echo "== validate $demo"
cli validate "$demo"
echo "== summary"
cli summary "$demo"
echo "== score the newest slice and group what fits no known class"
cli score "$demo"
echo
echo "Model suggestions are not decisions: a person reviews every label change, and local rules and policies prevail."

if $headless; then
  exit 0
fi

echo "== package the extension"
npm run --silent package
vsix=$(ls -t ./*.vsix | head -n 1)

if command -v code >/dev/null 2>&1; then
  code --install-extension "$vsix" --force
  code "$demo"
  echo "Opened $demo in VS Code. Run 'Graph Curator: Open Review Panel' from the command palette."
  exit 0
fi

echo "== no 'code' on PATH: starting code-server with the demo dataset"
bash scripts/e2e/setup.sh
cache="${E2E_CACHE:-${HOME:-/root}/.cache/graph-curator-e2e}"
state="$cache/demo"
mkdir -p "$state/extensions" "$state/user-data"
server="$cache/node_modules/.bin/code-server"
"$server" --extensions-dir "$state/extensions" --user-data-dir "$state/user-data" --install-extension "$vsix" --force >/dev/null
port="${DEMO_PORT:-8731}"
folder="$(pwd)/$demo"
echo "Open http://127.0.0.1:$port/?folder=$folder in a browser (Ctrl+C stops the server)."
exec "$server" --auth none --bind-addr "127.0.0.1:$port" --extensions-dir "$state/extensions" --user-data-dir "$state/user-data" \
  --disable-telemetry --disable-update-check --disable-workspace-trust "$folder"
