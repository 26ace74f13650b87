#!/usr/bin/env bash
# Queue benches (part of npm run bench): a throwaway MariaDB and Redis in /dev/shm, as npm test uses,
# then scripts/bench-queue.ts with real worker processes. Prints `bench …` lines.
set -uo pipefail
source "$(dirname "$0")/lib.sh"
ensure_system_packages
T="/dev/shm/orrery-bench-$$"
mkdir -p "$T"
export ORRERY_DB_PORT; ORRERY_DB_PORT=$(free_port_from 3517)
export ORRERY_REDIS_PORT; ORRERY_REDIS_PORT=$(free_port_from 6590)
export ORRERY_REDIS_URL="redis://127.0.0.1:$ORRERY_REDIS_PORT"
export DB_HOST=127.0.0.1 DB_PORT=$ORRERY_DB_PORT DB_NAME=orrery_bench DB_USER=orrery DB_PASSWORD=orrery-bench
cleanup() {
	redis_stop "$T/redis"
	db_stop "$T/mariadb"
	rm -rf "$T"
}
trap cleanup EXIT
db_start "$T/mariadb" "$ORRERY_DB_PORT" --innodb-flush-log-at-trx-commit=0 --innodb-doublewrite=0 --skip-log-bin
db_provision "$T/mariadb" "$DB_NAME" "$DB_USER" "$DB_PASSWORD"
redis_start "$T/redis" "$ORRERY_REDIS_PORT" --appendonly no
node --import tsx scripts/migrate.ts latest >/dev/null
node --import tsx scripts/bench-queue.ts "$@"
