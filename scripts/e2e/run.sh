#!/usr/bin/env bash
# `npm run test:e2e`: prepares the machine (scripts/e2e/setup.sh), builds and packages the
# extension into a .vsix, then runs test/e2e/run.e2e.ts, which installs that .vsix into a fresh
# code-server and drives it with Chromium. Screenshots: test-output/e2e-screenshots/.
#
#   E2E_SKIP_PACKAGE=1     reuse the existing .vsix instead of building one
#   E2E_TIMEOUT_SECONDS    limit for the browser run (default 1200: scoring a slice alone may take 5 minutes)
#   E2E_CACHE              where setup.sh put code-server
set -euo pipefail

cd "$(dirname "$0")/../.."

now() { date +%s.%N; }
elapsed() { awk -v start="$1" -v end="$(now)" 'BEGIN { printf "%.1f", end - start }'; }

run_start="$(now)"

phase_start="$(now)"
bash scripts/e2e/setup.sh
setup_seconds="$(elapsed "$phase_start")"

phase_start="$(now)"
if [[ "${E2E_SKIP_PACKAGE:-}" == "1" ]]; then
  echo "[e2e] E2E_SKIP_PACKAGE=1: using the existing .vsix"
else
  npm run --silent package
fi
package_seconds="$(elapsed "$phase_start")"
vsix="$(node -p 'const m = require("./package.json"); `${m.name}-${m.version}.vsix`')"
[[ -f "$vsix" ]] || { echo "[e2e] ERROR: $vsix was not built" >&2; exit 1; }
echo "[e2e] package: $vsix, $(du -k "$vsix" | cut -f1) KiB, $package_seconds s"

phase_start="$(now)"
browser_limit="${E2E_TIMEOUT_SECONDS:-1200}"
# The driver stops code-server and Chromium itself, also on SIGTERM. `timeout` (its own process
# group) is the last resort if the driver hangs: SIGTERM past the limit, SIGKILL 30 s later.
# Node loads tsx in-process, so the signal reaches the driver itself, not a wrapper.
timeout --kill-after=30 "$((browser_limit + 60))" node --import tsx test/e2e/run.e2e.ts --vsix "$vsix" &
driver=$!
# Ctrl-C or a CI cancel reaches this shell, not timeout's group: pass it on, then wait for the
# driver to finish cleaning up.
trap 'echo "[e2e] interrupted: stopping the browser run" >&2; kill -TERM "$driver" 2>/dev/null || true' INT TERM
status=0
wait "$driver" || status=$?
if ((status > 128)) && kill -0 "$driver" 2>/dev/null; then
  wait "$driver" || status=$?
fi
trap - INT TERM
echo "[e2e] timings: setup $setup_seconds s, package $package_seconds s, browser run $(elapsed "$phase_start") s, total $(elapsed "$run_start") s"
exit "$status"
