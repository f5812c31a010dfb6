#!/usr/bin/env bash
# npm test: install what is missing (Chromium too), then run every test suite (scripts/run-tests.ts).
set -euo pipefail
cd "$(dirname "$0")/.."
export NEXT_TELEMETRY_DISABLED=1
bash scripts/ensure-system.sh --with-chromium
exec node_modules/.bin/tsx --conditions=react-server scripts/run-tests.ts "$@"
