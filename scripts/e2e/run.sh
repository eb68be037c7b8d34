#!/usr/bin/env bash
# Installs the workbench if needed, builds, and runs the e2e suites
# (default: every out/test/e2e/*.e2e.js; or the compiled files given).
set -euo pipefail
cd "$(dirname "$0")/../.."
bash scripts/e2e/setup.sh

# tsc still emits JavaScript when some file has type errors. Errors elsewhere
# in the repo are reported but do not stop the e2e run; errors in the e2e code do.
tsc_log=$(mktemp)
if ! npx tsc -p tsconfig.json >"$tsc_log" 2>&1; then
  cat "$tsc_log" >&2
  if grep -q "^test/e2e/" "$tsc_log"; then
    rm -f "$tsc_log"
    echo "e2e: the e2e code does not compile" >&2
    exit 1
  fi
  echo "e2e: type errors outside test/e2e (above); running the e2e tests anyway" >&2
fi
rm -f "$tsc_log"

if [ $# -eq 0 ]; then set -- out/test/e2e/*.e2e.js; fi
# --no-config: mocha merges .mocharc.json's spec (all unit tests) with the
# files named here, so the config is left out.
started=$(date +%s)
status=0
npx mocha --no-config --reporter spec --timeout 300000 "$@" || status=$?
echo "e2e: mocha took $(( $(date +%s) - started )) s (exit $status)"
exit "$status"
