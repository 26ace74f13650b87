#!/usr/bin/env bash
# Start or stop the background services (MariaDB, Redis and the mail fake) for development;
# down also stops the check worker that npm start ran beside the app.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
source "$ROOT/scripts/env.sh"
case "${1:-}" in
	up)
		db_start "$ORRERY_DATA_DIR/mariadb" "$ORRERY_DB_PORT"
		db_provision "$ORRERY_DATA_DIR/mariadb" "$DB_NAME" "$DB_USER" "$DB_PASSWORD"
		mail_start "$MAIL_DIR" "$ORRERY_SMTP_PORT" "$ORRERY_DATA_DIR/mail-fake.pid"
		redis_start "$ORRERY_DATA_DIR/redis" "$ORRERY_REDIS_PORT"
		;;
	down)
		worker_stop "$ORRERY_DATA_DIR/worker.pid"
		redis_stop "$ORRERY_DATA_DIR/redis"
		mail_stop "$ORRERY_DATA_DIR/mail-fake.pid"
		db_stop "$ORRERY_DATA_DIR/mariadb"
		;;
	*) die "usage: scripts/services.sh up|down" ;;
esac
