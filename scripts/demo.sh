#!/usr/bin/env bash
# `npm run demo`: build the extension, then open the demo workspace (demo/) in
# a real editor with Copse in it.
#
#   bash scripts/demo.sh [--no-build] [--no-wait] [--stop]
#
# With VS Code's `code` command on PATH, VS Code opens demo/ with the extension
# loaded from this repo (--extensionDevelopmentPath). Without it, the workbench
# the e2e tests use (code-server, VS Code 1.100 in a browser; installed by
# scripts/e2e/setup.sh on first use) serves demo/ on 127.0.0.1 with the packaged
# .vsix installed into a demo profile that is kept between runs; the script
# prints the address to open and runs until Ctrl-C.
#
# Options (or environment):
#   --no-build   (DEMO_NO_BUILD=1)  use the .vsix and dist/ already built
#   --no-wait    (DEMO_NO_WAIT=1)   start the workbench in the background, print
#                                   its address and return; stop it with --stop
#   --stop                          stop a workbench left running by --no-wait
#   DEMO_EDITOR=code|code-server    choose instead of looking for `code`
#   DEMO_PORT=N                     port (default 8720; 0 or a busy port: any free one)
#   DEMO_PROFILE=DIR                profile (default ${COPSE_E2E_CACHE:-~/.cache/copse-e2e}/demo-profile)
#   DEMO_FOLDER=DIR                 folder to open (default demo/ in this repo)
set -euo pipefail

repo=$(cd "$(dirname "$0")/.." && pwd)
cd "$repo"

say() { printf 'copse-demo: %s\n' "$*"; }
fail() { printf 'copse-demo: ERROR: %s\n' "$*" >&2; exit 1; }
seconds_since() { echo "$(( $(date +%s) - $1 )) s"; }

# Runs a long step and says every 15 s that it is still going, so a quiet minute does not look like a hang.
# Usage: with_heartbeat "what it is doing" command args...
with_heartbeat() {
  local what=$1 pid t0 n=0 status=0
  shift
  t0=$(date +%s)
  "$@" &
  pid=$!
  while kill -0 "$pid" 2>/dev/null; do
    sleep 1
    n=$((n + 1))
    if [ $((n % 15)) = 0 ] && kill -0 "$pid" 2>/dev/null; then say "  still $what ($(seconds_since "$t0"))"; fi
  done
  wait "$pid" || status=$?
  [ "$status" = 0 ] && say "  done in $(seconds_since "$t0")"
  return "$status"
}

no_build=${DEMO_NO_BUILD:-0}
no_wait=${DEMO_NO_WAIT:-0}
stop_only=0
for arg in "$@"; do
  case "$arg" in
    --no-build) no_build=1 ;;
    --no-wait|--print-only) no_wait=1 ;;
    --stop) stop_only=1 ;;
    -h|--help) sed -n '2,/^set -euo/p' "$0" | sed '$d; s/^# \{0,1\}//'; exit 0 ;;
    *) fail "unknown option $arg (see --help)" ;;
  esac
done

cache_root=${COPSE_E2E_CACHE:-$HOME/.cache/copse-e2e}
profile=${DEMO_PROFILE:-$cache_root/demo-profile}
folder=$(cd "${DEMO_FOLDER:-$repo/demo}" && pwd)
pid_file="$profile/server.pid"
log_file="$profile/server.log"

# --- stopping a background workbench ------------------------------------------------
# The server runs in its own session (setsid), so one signal to its process
# group reaches its extension hosts and watchers too.
descendants() {
  local child
  for child in $(ps -o pid= --ppid "$1" 2>/dev/null); do
    echo "$child"
    descendants "$child"
  done
}

stop_server() {
  local pid=$1 tree n
  tree="$pid $(descendants "$pid" | tr '\n' ' ')"
  kill -TERM -- "-$pid" 2>/dev/null || true
  # shellcheck disable=SC2086
  kill -TERM $tree 2>/dev/null || true
  for n in $(seq 50); do
    # shellcheck disable=SC2086
    kill -0 $tree 2>/dev/null || break
    sleep 0.2
  done
  kill -KILL -- "-$pid" 2>/dev/null || true
  # shellcheck disable=SC2086
  kill -KILL $tree 2>/dev/null || true
  rm -f "$pid_file"
}

running_pid() {
  [ -f "$pid_file" ] || return 1
  local pid
  pid=$(cat "$pid_file")
  # Only a pid that is still our code-server counts: pids are reused.
  if kill -0 "$pid" 2>/dev/null && tr '\0' ' ' <"/proc/$pid/cmdline" 2>/dev/null | grep -q -- "--user-data-dir $profile/user-data"; then
    echo "$pid"
    return 0
  fi
  rm -f "$pid_file"
  return 1
}

if [ "$stop_only" = 1 ]; then
  if pid=$(running_pid); then
    stop_server "$pid"
    say "stopped the demo workbench (pid $pid)"
  else
    say "no demo workbench is running for $profile"
  fi
  exit 0
fi

# --- build ---------------------------------------------------------------------
version=$(node -p 'require("./package.json").version')
vsix="$repo/copse-$version.vsix"
if [ "$no_build" = 1 ]; then
  [ -f "$vsix" ] || fail "no $vsix; run without --no-build (or npm run package) first"
else
  say "building the extension and packaging copse-$version.vsix (npm run package; about half a minute)"
  package_quietly() { npm run --silent package >/dev/null; }
  with_heartbeat "building" package_quietly || fail "npm run package failed (run it by hand to see why)"
fi
[ -f "$vsix" ] || fail "npm run package did not write $vsix"

# --- which editor --------------------------------------------------------------
editor=${DEMO_EDITOR:-}
if [ -z "$editor" ]; then
  if command -v code >/dev/null 2>&1; then editor=code; else editor=code-server; fi
fi

if [ "$editor" = code ]; then
  command -v code >/dev/null 2>&1 || fail "DEMO_EDITOR=code, but there is no code command on PATH"
  say "opening $folder in VS Code with the extension from $repo"
  exec code --extensionDevelopmentPath="$repo" "$folder"
fi
[ "$editor" = code-server ] || fail "DEMO_EDITOR must be code or code-server, not $editor"

# --- the bundled workbench -----------------------------------------------------
cs_version=$(sed -n 's/^readonly CS_VERSION=//p' "$repo/scripts/e2e/setup.sh")
entry="$cache_root/code-server-$cs_version/node_modules/code-server/out/node/entry.js"
if [ -f "$entry" ]; then
  say "checking the workbench (code-server $cs_version) in $cache_root"
  bash "$repo/scripts/e2e/setup.sh" --no-browser
else
  say "installing the workbench, code-server $cs_version (VS Code 1.100 in a browser), into $cache_root:"
  say "  npm fetches it, then builds its native modules; a few minutes, once (log: $cache_root/install-code-server-$cs_version.log)"
  with_heartbeat "installing the workbench" bash "$repo/scripts/e2e/setup.sh" --no-browser
fi
[ -f "$entry" ] || fail "code-server is not at $entry after setup"

if pid=$(running_pid); then
  say "stopping the demo workbench left running earlier (pid $pid)"
  stop_server "$pid"
fi

mkdir -p "$profile/user-data/User" "$profile/extensions" "$profile/xdg"
settings="$profile/user-data/User/settings.json"
# Written once; after that the profile is the user's, settings and all.
if [ ! -f "$settings" ]; then
  cat >"$settings" <<'JSON'
{
  "security.workspace.trust.enabled": false,
  "workbench.startupEditor": "none",
  "workbench.tips.enabled": false,
  "telemetry.telemetryLevel": "off",
  "update.mode": "none",
  "extensions.autoCheckUpdates": false,
  "extensions.autoUpdate": false,
  "extensions.ignoreRecommendations": true,
  "files.autoSave": "off"
}
JSON
fi
# code-server writes a config (with a password) and logs under the XDG folders; keep them in the profile.
export XDG_CONFIG_HOME="$profile/xdg/config" XDG_DATA_HOME="$profile/xdg/data"
unset ELECTRON_RUN_AS_NODE

say "installing copse-$version.vsix into the demo profile $profile (about 10 s)"
install_log=$(node "$entry" --user-data-dir "$profile/user-data" --extensions-dir "$profile/extensions" \
  --force --install-extension "$vsix" 2>&1) || true
# code-server exits 0 even when an install fails; its message is the signal.
grep -q "was successfully installed" <<<"$install_log" || fail "installing $vsix failed: $install_log"

port_free() {
  node -e 'const s = require("net").createServer(); s.once("error", () => process.exit(1));
    s.listen(Number(process.argv[1]), "127.0.0.1", () => s.close(() => process.exit(0)));' "$1"
}
port=${DEMO_PORT:-8720}
if [ "$port" = 0 ] || ! port_free "$port"; then
  [ "$port" = 0 ] || say "port $port is taken; using a free one"
  port=$(node -e 'const s = require("net").createServer(); s.listen(0, "127.0.0.1", () => { console.log(s.address().port); s.close(); });')
fi

: >"$log_file"
say "starting the workbench on 127.0.0.1:$port (up to a minute; log: $log_file)"
started_at=$(date +%s)
launcher=()
command -v setsid >/dev/null 2>&1 && launcher=(setsid)
"${launcher[@]}" node "$entry" --auth none --bind-addr "127.0.0.1:$port" \
  --disable-telemetry --disable-update-check --disable-workspace-trust --disable-getting-started-override \
  --user-data-dir "$profile/user-data" --extensions-dir "$profile/extensions" "$folder" \
  </dev/null >>"$log_file" 2>&1 &
server=$!
echo "$server" >"$pid_file"
on_signal() {
  # A second Ctrl-C while stopping must not cut the stop short.
  trap '' INT TERM HUP
  echo
  say "stopping"
  stop_server "$server"
  exit 0
}
if [ "$no_wait" != 1 ]; then trap on_signal INT TERM HUP; fi

healthy() {
  node -e 'require("http").get({ host: "127.0.0.1", port: Number(process.argv[1]), path: "/healthz", timeout: 2000 },
    (r) => process.exit(r.statusCode === 200 ? 0 : 1)).on("error", () => process.exit(1));' "$port"
}
for n in $(seq 300); do
  healthy && break
  if [ $((n % 75)) = 0 ]; then say "  still starting ($(seconds_since "$started_at"))"; fi
  kill -0 "$server" 2>/dev/null || { tail -n 30 "$log_file" >&2; rm -f "$pid_file"; fail "code-server exited before serving; log: $log_file"; }
  sleep 0.2
done
healthy || { stop_server "$server"; fail "code-server did not answer on port $port within 60 s; log: $log_file"; }

url="http://127.0.0.1:$port/?folder=$(node -p 'encodeURIComponent(process.argv[1])' "$folder")"
echo "$url" >"$profile/server.url"
say "Copse $version is installed in the workbench; open this address in a browser:"
echo
echo "    $url"
echo
say "right-click kite-flights.csv in the explorer and choose \"Fit a Forest\"."
if [ "$no_wait" = 1 ]; then
  stop_cmd="bash scripts/demo.sh --stop"
  [ -z "${DEMO_PROFILE:-}" ] || stop_cmd="DEMO_PROFILE=$DEMO_PROFILE $stop_cmd"
  say "running in the background (pid $server, log $log_file); stop it with: $stop_cmd"
  exit 0
fi
say "Ctrl-C stops it (log: $log_file)."
wait "$server" || true
rm -f "$pid_file"
