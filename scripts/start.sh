#!/usr/bin/env bash
# One command from a fresh Debian machine with Node 20 to a running Orrery.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
source "$ROOT/scripts/env.sh"

if port_in_use "$PORT"; then
	die "port $PORT is already in use (is Orrery already running?). Stop that program or choose another port: PORT=$((PORT + 1)) npm start"
fi

ensure_system_packages
ensure_node_modules
bash scripts/services.sh up
say "database on 127.0.0.1:$ORRERY_DB_PORT, Redis on 127.0.0.1:$ORRERY_REDIS_PORT, mail fake on 127.0.0.1:$ORRERY_SMTP_PORT (messages in ${MAIL_DIR#$ROOT/})"

node --import tsx scripts/migrate.ts latest
node --import tsx scripts/migrate.ts seed

if [ ! -f build/handler.js ] || [ ! -f build/heavy-worker.js ] || [ -n "$(find src static package-lock.json svelte.config.js vite.config.ts tailwind.config.ts -newer build/handler.js -print -quit 2>/dev/null)" ]; then
	say "building the app"
	npx vite build >/tmp/orrery-build.log 2>&1 || { tail -n 30 /tmp/orrery-build.log >&2; die "the build failed (log above)"; }
fi

# One check worker beside the app (more: npm run worker, on this or any machine reaching the same
# MariaDB and Redis). At start it queues a check for every latest version that has none (the demo seeds).
worker_start "$ORRERY_DATA_DIR/worker.pid" "$ORRERY_DATA_DIR/worker.log"
say "check worker started (log in ${ORRERY_DATA_DIR#$ROOT/}/worker.log)"

node --import tsx scripts/print-demo.ts || true
say "mail the app sends (sign-up, reset and invitation links) is written by the mail fake to $MAIL_DIR/*.eml"
say "Orrery is running at $ORIGIN  (Ctrl-C stops the app; npm run stop stops the app, the worker, database, Redis and mail fake)"
# A built app is a production app: the development outbox is off (src/lib/server/config.ts).
export NODE_ENV=production
# Supervised: if the app dies it is started again (scripts/supervise.sh). Its pid (this shell's,
# kept by exec) lets `npm run stop` end it too when the app was started in the background.
export ORRERY_APP_PIDFILE="$ORRERY_DATA_DIR/app.pid"
echo $$ > "$ORRERY_APP_PIDFILE"
exec bash scripts/supervise.sh node build
