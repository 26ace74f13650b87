#!/usr/bin/env bash
set -euo pipefail
source "$(dirname "$0")/lib.sh"
bash scripts/services.sh down
say "stopped the check worker, MariaDB, Redis and the mail fake (data kept in .data/)"
