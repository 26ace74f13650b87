#!/usr/bin/env bash
set -euo pipefail
source "$(dirname "$0")/lib.sh"
# The supervised app first (SIGTERM stops the supervisor for good, and it stops the app), then the rest.
pid_stop "${ORRERY_DATA_DIR:-$ROOT/.data}/app.pid" 100
bash scripts/services.sh down
say "stopped the app, the check worker, MariaDB, Redis and the mail fake (data kept in .data/)"
