#!/usr/bin/env bash
# The webview tests drive Debian's Chromium: install it when missing (root and apt, as on these
# machines), so that `npm test` alone sets up what it needs on a fresh machine.
set -euo pipefail
if [[ -x /usr/bin/chromium ]]; then
  exit 0
fi
if [[ $(id -u) -ne 0 ]] || ! command -v apt-get >/dev/null 2>&1; then
  echo "The webview tests need Chromium at /usr/bin/chromium: install Debian's 'chromium' package (needs root)." >&2
  exit 1
fi
echo "Installing Debian's chromium for the webview tests (once)…"
export DEBIAN_FRONTEND=noninteractive
apt-get update -qq </dev/null
apt-get install -y -qq chromium </dev/null >/dev/null
