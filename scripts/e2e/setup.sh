#!/usr/bin/env bash
# Installs the real VS Code workbench (code-server) that the e2e tests drive.
#
# Machines are handed out fresh, so nothing installed by hand survives: this
# script is the only way the workbench gets onto a machine. It is idempotent:
# a completed install leaves a stamp, and a second run only re-checks cheap
# facts and exits.
#
# Environment:
#   COPSE_E2E_CACHE  where the workbench is cached (default ~/.cache/copse-e2e);
#                    kept outside the repo so a fresh work tree reuses it.
#   COPSE_E2E_FORCE=1  reinstall even when the stamp says it is done.
# Options:
#   --no-browser     skip Chromium: for scripts/demo.sh, whose user brings a browser.
set -euo pipefail

want_browser=true
for arg in "$@"; do
  case "$arg" in
    --no-browser) want_browser=false ;;
    *) printf 'e2e-setup: unknown option %s\n' "$arg" >&2; exit 2 ;;
  esac
done

# 4.100.3 is the last code-server line that runs on Node 20; later ones need
# Node 22/24. It bundles the VS Code 1.100 workbench that package.json targets.
readonly CS_VERSION=4.100.3
# Pinned by code-server 4.100.3's lib/vscode/npm-shrinkwrap.json; the ripgrep
# post-install looks for its download in a folder named after its own version.
readonly RG_PKG_VERSION=1.15.11
readonly RG_ASSET=ripgrep-v13.0.0-10-x86_64-unknown-linux-musl.tar.gz
# Packages allowed to run install scripts, per dependency tree: code-server's
# own, then the two trees its post-install installs with nested `npm install`s.
# The @vscode/windows-* modules are installed on Linux too; their builds are
# empty stubs here, listed so that npm does not warn about them.
readonly ALLOW_TOP='"code-server": true, "argon2": true'
readonly ALLOW_VSCODE="@parcel/watcher,@vscode/deviceid,@vscode/ripgrep,@vscode/spdlog,kerberos,native-watchdog,node-pty,@vscode/windows-process-tree,@vscode/windows-registry"
readonly ALLOW_EXTENSIONS="@parcel/watcher,esbuild"
# Bump when the install steps change in a way that needs a reinstall.
readonly SETUP_REVISION=1

readonly CACHE_ROOT="${COPSE_E2E_CACHE:-$HOME/.cache/copse-e2e}"
readonly CS_DIR="$CACHE_ROOT/code-server-$CS_VERSION"
readonly STAMP="$CS_DIR/.copse-e2e-ready"
readonly ENTRY="$CS_DIR/node_modules/code-server/out/node/entry.js"
readonly BUNDLED_RG="$CS_DIR/node_modules/code-server/lib/vscode/node_modules/@vscode/ripgrep/bin/rg"

started=$(date +%s%N)
say() { printf 'e2e-setup: %s\n' "$*"; }
fail() { printf 'e2e-setup: ERROR: %s\n' "$*" >&2; exit 1; }
elapsed() { echo "$(( ($(date +%s%N) - started) / 1000000 )) ms"; }

# --- Node -------------------------------------------------------------------
command -v node >/dev/null || fail "node is not on PATH (Node 20 is required)"
node_major=$(node -p 'process.versions.node.split(".")[0]')
[ "$node_major" = 20 ] || fail "code-server $CS_VERSION needs Node 20; this is Node $(node -v)"
# Native modules are built for one Node ABI; a different Node needs a rebuild.
stamp_text="code-server=$CS_VERSION node-abi=$(node -p process.versions.modules) arch=$(uname -m) setup=$SETUP_REVISION"

# --- Is the workbench already installed? ------------------------------------------
installed=false
if [ "${COPSE_E2E_FORCE:-0}" != 1 ] && [ -f "$STAMP" ] && [ "$(cat "$STAMP")" = "$stamp_text" ] \
   && [ -f "$ENTRY" ] && [ -x "$BUNDLED_RG" ]; then
  installed=true
fi

# --- System packages ----------------------------------------------------------
# Each entry: when it is needed (run: every test run; build: installing only),
# the Debian package, a file it provides, and why. Probing a file rather than
# asking dpkg keeps the check fast and lets a non-Debian machine that already
# has the files pass.
requirements=(
  "run|chromium|/usr/bin/chromium|renders the workbench (Playwright drives it; no browser is downloaded)"
  "run|ripgrep|/usr/bin/rg|VS Code's search needs rg; its npm package would download one"
  "build|libkrb5-dev|/usr/include/gssapi/gssapi.h|gssapi headers for the kerberos native module"
)
missing_pkgs=()
missing_lines=()
check_requirements() {
  missing_pkgs=()
  missing_lines=()
  local entry when pkg file why
  for entry in "${requirements[@]}"; do
    IFS='|' read -r when pkg file why <<<"$entry"
    if [ "$when" = build ] && [ "$installed" = true ]; then continue; fi
    if [ "$pkg" = chromium ] && [ "$want_browser" = false ]; then continue; fi
    if [ ! -e "$file" ]; then
      missing_pkgs+=("$pkg")
      missing_lines+=("  $pkg (no $file): $why")
    fi
  done
}

check_requirements
if [ ${#missing_pkgs[@]} -gt 0 ]; then
  if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null; then
    say "installing Debian packages: ${missing_pkgs[*]}"
    export DEBIAN_FRONTEND=noninteractive
    # A fresh machine has no package lists until the first update.
    apt-get update -qq || fail "apt-get update failed"
    apt-get install -y -qq "${missing_pkgs[@]}" || fail "apt-get install ${missing_pkgs[*]} failed"
    check_requirements
    [ ${#missing_pkgs[@]} -eq 0 ] || fail "still missing after apt-get install: ${missing_pkgs[*]}"
  else
    {
      echo "e2e-setup: ERROR: missing system packages, and this script can only install them as root with apt-get:"
      printf '%s\n' "${missing_lines[@]}"
      echo "Install them, e.g.: sudo apt-get update && sudo apt-get install -y ${missing_pkgs[*]}"
    } >&2
    exit 2
  fi
fi

if [ "$installed" = true ]; then
  say "code-server $CS_VERSION already installed in $CS_DIR ($(elapsed))"
  exit 0
fi
for tool in python3 make g++ tar; do
  command -v "$tool" >/dev/null || fail "$tool is missing (node-gyp builds code-server's native modules with it)"
done

# --- Install ----------------------------------------------------------------------
mkdir -p "$CACHE_ROOT"
# Two test runs starting at once must not install into the same folder.
exec 9>"$CACHE_ROOT/.setup.lock"
if command -v flock >/dev/null; then flock 9; fi

# Installing into a staging folder and renaming it at the end means a failed or
# interrupted run never leaves a half-installed workbench behind the real name.
staging="$CACHE_ROOT/.staging-code-server-$CS_VERSION"
rm -rf "$staging"
mkdir -p "$staging"
log="$CACHE_ROOT/install-code-server-$CS_VERSION.log"
: >"$log"

# @vscode/ripgrep's post-install downloads rg from the network, which is closed
# here; it skips the download when the archive is already in its cache folder
# (under os.tmpdir()), and extracts it with `tar xvf ARCHIVE -C bin/`, then
# expects bin/rg. So the archive holds Debian's rg at its top level.
rg_cache="$(node -p 'require("os").tmpdir()')/vscode-ripgrep-cache-$RG_PKG_VERSION"
mkdir -p "$rg_cache"
tar -czhf "$rg_cache/$RG_ASSET.tmp" -C "$(dirname "$(readlink -f /usr/bin/rg)")" rg
mv -f "$rg_cache/$RG_ASSET.tmp" "$rg_cache/$RG_ASSET"

cat >"$staging/package.json" <<JSON
{
  "name": "copse-e2e-workbench",
  "private": true,
  "description": "Cache of the code-server build used by Copse's end-to-end tests (written by scripts/e2e/setup.sh).",
  "dependencies": { "code-server": "$CS_VERSION" },
  "allowScripts": { $ALLOW_TOP }
}
JSON

# npm 11 skips dependencies' install scripts unless allowed. The allowScripts
# field above covers code-server's own tree, but its post-install runs nested
# `npm install`s in lib/vscode and lib/vscode/extensions, whose package.json
# files have no such field. Passing an allow list through the environment or a
# user npmrc does not work: npm exports it to the post-install as
# npm_config_allow_scripts, and the nested npm refuses that in a project install
# (EALLOWSCRIPTS). A project .npmrc in each nested folder is what npm honours
# there, so: fetch without scripts, drop those .npmrc files in, then rebuild.
cs_pkg="$staging/node_modules/code-server"
say "installing code-server $CS_VERSION into $CS_DIR (log: $log)"
run_npm() {
  # npm_config_yes: node-pty's post-install runs `npx node-gyp`, which a
  # `yes=false` npmrc would refuse. npm_config_unsafe_perm: code-server's
  # post-install insists on it when run as root.
  ( cd "$staging" && npm_config_yes=true npm_config_unsafe_perm=true \
      npm "$@" --prefix "$staging" --no-audit --no-fund --foreground-scripts ) >>"$log" 2>&1 \
    || { tail -n 40 "$log" >&2; fail "npm $1 for code-server $CS_VERSION failed; full log: $log"; }
}
run_npm install --ignore-scripts
echo "allow-scripts=$ALLOW_VSCODE" >"$cs_pkg/lib/vscode/.npmrc"
echo "allow-scripts=$ALLOW_EXTENSIONS" >"$cs_pkg/lib/vscode/extensions/.npmrc"
run_npm rebuild

# Check the parts whose absence would only show up later as a confusing
# workbench failure.
staged_entry="$staging/node_modules/code-server/out/node/entry.js"
staged_vscode="$staging/node_modules/code-server/lib/vscode"
[ -f "$staged_entry" ] || fail "install finished but $staged_entry is missing; see $log"
# code-server writes a default config (with a password) and logs under the
# XDG folders on any start, even --version; keep that out of the user's home.
probe_home="$staging/.probe-home"
version=$(XDG_CONFIG_HOME="$probe_home" XDG_DATA_HOME="$probe_home" \
  node "$staged_entry" --version 2>>"$log" | grep -o "^$CS_VERSION" || true)
rm -rf "$probe_home"
[ "$version" = "$CS_VERSION" ] || fail "code-server --version printed '$version', expected $CS_VERSION; see $log"
"$staged_vscode/node_modules/@vscode/ripgrep/bin/rg" --version >/dev/null \
  || fail "bundled ripgrep does not run; see $log"
for native in node-pty/build/Release/pty.node @vscode/spdlog/build/Release/spdlog.node \
              kerberos/build/Release/kerberos.node native-watchdog/build/Release/watchdog.node; do
  [ -f "$staged_vscode/node_modules/$native" ] || fail "native module $native was not built; see $log"
done

rm -rf "$CS_DIR"
mv "$staging" "$CS_DIR"
printf '%s' "$stamp_text" >"$STAMP"
say "installed code-server $CS_VERSION in $(elapsed)"
