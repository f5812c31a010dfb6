#!/usr/bin/env bash
# npm test: install what is missing (Chromium too), then run every test suite (scripts/run-tests.ts).
set -euo pipefail
cd "$(dirname "$0")/.."
export NEXT_TELEMETRY_DISABLED=1
bash scripts/ensure-system.sh --with-chromium
# As in start.sh: tsx in-process, so that signals reach scripts/run-tests.ts itself.
exec node --conditions=react-server --import tsx scripts/run-tests.ts "$@"
