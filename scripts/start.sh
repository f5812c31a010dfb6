#!/usr/bin/env bash
# npm start: install what is missing, then run the private database and the app (scripts/start.ts).
set -euo pipefail
cd "$(dirname "$0")/.."
export NEXT_TELEMETRY_DISABLED=1
bash scripts/ensure-system.sh
exec node_modules/.bin/tsx --conditions=react-server scripts/start.ts
