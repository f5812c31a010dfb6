#!/usr/bin/env bash
# npm start: install what is missing, then run the private database and the app (scripts/start.ts).
set -euo pipefail
cd "$(dirname "$0")/.."
export NEXT_TELEMETRY_DISABLED=1
bash scripts/ensure-system.sh
# tsx is loaded into node itself (--import) rather than run as a command: the tsx command runs the
# script in a child process, relays only SIGINT and SIGTERM to it, and SIGKILLs that child when it
# does not acknowledge a relayed signal within a few tens of milliseconds (as when it is busy), which
# would skip stopping PostgreSQL. With `exec`, node takes this shell's place: every signal sent to
# the command reaches scripts/start.ts itself.
exec node --conditions=react-server --import tsx scripts/start.ts
