#!/usr/bin/env bash
# Prepares a machine for the end-to-end tests: Debian's chromium and ripgrep, and code-server
# (a real VS Code whose extension host is plain Node) installed into a cache folder outside
# the project's dependencies, so that `npm ci` stays light.
#
# Idempotent: every step checks first and is skipped when already done (a second run takes
# about a second). Works as root without a terminal (CI=true) and prints how long each step took.
#
#   E2E_CACHE   where code-server goes (default: $HOME/.cache/graph-curator-e2e)
set -euo pipefail

readonly CODE_SERVER_VERSION="4.100.3" # VS Code 1.100.3; later code-server releases need Node 24
readonly APT_PACKAGES=(libkrb5-dev ripgrep chromium)
# code-server bundles @vscode/ripgrep 1.15.11, whose postinstall downloads this archive from
# GitHub (unreachable here) unless it already sits in its cache folder.
readonly RIPGREP_CACHE_DIR_NAME="vscode-ripgrep-cache-1.15.11"
readonly RIPGREP_ARCHIVE_NAME="ripgrep-v13.0.0-10-x86_64-unknown-linux-musl.tar.gz"

E2E_CACHE="${E2E_CACHE:-${HOME:-/root}/.cache/graph-curator-e2e}"
readonly E2E_CACHE

now() { date +%s.%N; }
elapsed() { awk -v start="$1" -v end="$(now)" 'BEGIN { printf "%.1f", end - start }'; }
log() { printf '[e2e-setup] %s\n' "$*"; }
fail() { printf '[e2e-setup] ERROR: %s\n' "$*" >&2; exit 1; }

setup_start="$(now)"

# --- 1. Debian packages ---------------------------------------------------------------------
step_start="$(now)"
missing_packages=()
for package in "${APT_PACKAGES[@]}"; do
  if ! dpkg-query -W -f='${Status}' "$package" 2>/dev/null | grep -q 'install ok installed'; then
    missing_packages+=("$package")
  fi
done
if ((${#missing_packages[@]} > 0)); then
  if [[ "$(id -u)" -eq 0 ]]; then
    as_root=()
  elif command -v sudo >/dev/null 2>&1; then
    as_root=(sudo -n)
  else
    fail "missing Debian packages (${missing_packages[*]}) and not root: install them with apt-get"
  fi
  log "installing Debian packages: ${missing_packages[*]}"
  # Another apt process may hold the lock (CI images, parallel jobs): wait for it, bounded.
  apt_options=(-y -q -o DPkg::Lock::Timeout=900)
  "${as_root[@]}" env DEBIAN_FRONTEND=noninteractive apt-get "${apt_options[@]}" update
  "${as_root[@]}" env DEBIAN_FRONTEND=noninteractive apt-get "${apt_options[@]}" install "${missing_packages[@]}"
else
  log "Debian packages present: ${APT_PACKAGES[*]}"
fi
[[ -x /usr/bin/chromium ]] || fail "/usr/bin/chromium is missing after installing the chromium package"
command -v rg >/dev/null 2>&1 || fail "rg (ripgrep) is missing after installing the ripgrep package"
log "step 1 (Debian packages): $(elapsed "$step_start") s"

# --- 2. code-server into the cache folder ---------------------------------------------------
step_start="$(now)"
code_server_package_json="$E2E_CACHE/node_modules/code-server/package.json"
code_server_bin="$E2E_CACHE/node_modules/.bin/code-server"
installed_version=""
if [[ -f "$code_server_package_json" ]]; then
  installed_version="$(node -p "require(process.argv[1]).version" "$code_server_package_json" 2>/dev/null || true)"
fi
# The marker is written only after a whole install succeeded, so an interrupted install is redone.
install_marker="$E2E_CACHE/.installed-code-server-$CODE_SERVER_VERSION"
if [[ "$installed_version" == "$CODE_SERVER_VERSION" && -x "$code_server_bin" && -f "$install_marker" ]]; then
  log "code-server $CODE_SERVER_VERSION present in $E2E_CACHE"
else
  [[ "$(uname -m)" == "x86_64" ]] || fail "the ripgrep pre-seed below is for x86_64 only (this machine: $(uname -m))"
  ripgrep_cache_dir="$(node -p 'require("os").tmpdir()')/$RIPGREP_CACHE_DIR_NAME"
  if [[ ! -s "$ripgrep_cache_dir/$RIPGREP_ARCHIVE_NAME" ]]; then
    log "pre-seeding the ripgrep download cache with Debian's rg: $ripgrep_cache_dir/$RIPGREP_ARCHIVE_NAME"
    mkdir -p "$ripgrep_cache_dir"
    rg_path="$(readlink -f "$(command -v rg)")"
    tar -czf "$ripgrep_cache_dir/$RIPGREP_ARCHIVE_NAME.partial" -C "$(dirname "$rg_path")" "$(basename "$rg_path")"
    mv "$ripgrep_cache_dir/$RIPGREP_ARCHIVE_NAME.partial" "$ripgrep_cache_dir/$RIPGREP_ARCHIVE_NAME"
  fi

  log "installing code-server@$CODE_SERVER_VERSION into $E2E_CACHE (several minutes on a fresh machine)"
  mkdir -p "$E2E_CACHE"
  # A package.json of its own stops npm from walking up and installing into an enclosing project.
  if [[ ! -f "$E2E_CACHE/package.json" ]]; then
    printf '{\n  "name": "graph-curator-e2e-cache",\n  "private": true\n}\n' >"$E2E_CACHE/package.json"
  fi
  rm -f "$install_marker"
  # --unsafe-perm: as root, code-server's postinstall refuses without it.
  # npm_config_yes: lets the postinstall's nested `npx node-gyp` run without a prompt.
  (cd "$E2E_CACHE" && npm_config_yes=true npm install "code-server@$CODE_SERVER_VERSION" \
    --unsafe-perm=true --no-audit --no-fund --loglevel=error) \
    || fail "npm install code-server@$CODE_SERVER_VERSION failed in $E2E_CACHE (see npm's output above)"
  [[ -x "$code_server_bin" ]] || fail "code-server installed but $code_server_bin is missing"
  touch "$install_marker"
fi
# The first run also prints a log line about its config file; the version line starts with digits.
reported_version="$("$code_server_bin" --version 2>/dev/null | grep -E '^[0-9]+\.[0-9]+\.[0-9]+' | head -n 1 || true)"
[[ "$reported_version" == "$CODE_SERVER_VERSION"* ]] \
  || fail "code-server --version printed '$reported_version', expected $CODE_SERVER_VERSION"
log "step 2 (code-server $reported_version): $(elapsed "$step_start") s"

log "ready in $(elapsed "$setup_start") s; code-server: $code_server_bin"
