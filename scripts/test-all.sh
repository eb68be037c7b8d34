#!/usr/bin/env bash
# Every test Copse has, in the order a failure is cheapest to read: this is `npm test`, and CI runs it.
set -euo pipefail
cd "$(dirname "$0")/.."

step() { printf '\n== %s\n' "$*"; }

step "system packages and the real workbench (cached after the first run)"
bash scripts/e2e/setup.sh

step "type-check and compile"
npx tsc -p tsconfig.json
npx tsc -p webview/tsconfig.json --noEmit
npm run --silent lint

step "unit, engine, CLI, host-logic and webview tests"
npx mocha

step "package the extension"
npm run --silent package

step "end-to-end tests in a real VS Code workbench"
npx mocha --no-config --timeout 300000 'out/test/e2e/**/*.e2e.js'
