#!/usr/bin/env bash
# npm test: everything from a clean clone. A throwaway MariaDB and mail fake in /dev/shm,
# migrations, vitest (unit + integration), type checks and lint, a production build,
# Playwright in Debian's Chromium. One closing line sums every runner.
#
# With arguments, only those run (for working on one part): paths ending in .spec.ts go to
# Playwright (after a build), others to vitest (a *.app.test.ts file gets a build first too: it
# starts the built app); the type check and lint are skipped.
#   bash scripts/test.sh tests/integration/accounts.test.ts tests/e2e/landing.spec.ts
set -uo pipefail
UNIT_ONLY=(); E2E_ONLY=(); NEEDS_BUILD=0
for a in "$@"; do
	if [[ "$a" == *.spec.ts ]]; then E2E_ONLY+=("$a"); NEEDS_BUILD=1; else UNIT_ONLY+=("$a"); fi
	# *.app.test.ts: an integration test that starts the built app (node build) itself.
	[[ "$a" == *.app.test.ts ]] && NEEDS_BUILD=1
done
[ $# -eq 0 ] && NEEDS_BUILD=1
SUBSET=$#
source "$(dirname "$0")/lib.sh"

ensure_system_packages --with-browser
ensure_node_modules

T="/dev/shm/orrery-test-$$"
mkdir -p "$T"
export ORRERY_DB_PORT; ORRERY_DB_PORT=$(free_port_from "${ORRERY_TEST_DB_PORT:-3417}")
export ORRERY_SMTP_PORT; ORRERY_SMTP_PORT=$(free_port_from "${ORRERY_TEST_SMTP_PORT:-2625}")
export ORRERY_REDIS_PORT; ORRERY_REDIS_PORT=$(free_port_from "${ORRERY_TEST_REDIS_PORT:-6490}")
export ORRERY_REDIS_URL="redis://127.0.0.1:$ORRERY_REDIS_PORT"
export E2E_PORT; E2E_PORT=$(free_port_from "${ORRERY_TEST_APP_PORT:-4173}")
export DB_HOST=127.0.0.1 DB_PORT=$ORRERY_DB_PORT DB_NAME=orrery_test DB_USER=orrery DB_PASSWORD=orrery-test
export SMTP_URL="smtp://127.0.0.1:$ORRERY_SMTP_PORT" MAIL_DIR="$T/mail" ORRERY_DEV_OUTBOX=1
export ORRERY_TEST_DATADIR="$T/mariadb" ORRERY_TEST_RUN=1
export ORIGIN="http://127.0.0.1:$E2E_PORT"
# adapter-node refuses bodies over 512 KiB by default; snapshots may be up to 5 MiB (the app checks that itself).
export BODY_SIZE_LIMIT=8M

cleanup() {
	worker_stop "$T/worker.pid"
	redis_stop "$T/redis"
	mail_stop "$T/mail-fake.pid"
	db_stop "$T/mariadb"
	rm -rf "$T"
}
trap cleanup EXIT

say "throwaway MariaDB on 127.0.0.1:$ORRERY_DB_PORT, Redis on :$ORRERY_REDIS_PORT, mail fake on :$ORRERY_SMTP_PORT, under $T"
db_start "$T/mariadb" "$ORRERY_DB_PORT" --innodb-flush-log-at-trx-commit=0 --innodb-doublewrite=0 --skip-log-bin
db_provision "$T/mariadb" "$DB_NAME" "$DB_USER" "$DB_PASSWORD"
mail_start "$T/mail" "$ORRERY_SMTP_PORT" "$T/mail-fake.pid"
# Throwaway Redis: no persistence at all.
redis_start "$T/redis" "$ORRERY_REDIS_PORT" --appendonly no

STEPS="$T/steps.txt"; : >"$STEPS"
step() { # step NAME command...
	local name=$1; shift
	say "── $name"
	if "$@"; then echo "$name ok" >>"$STEPS"; else echo "$name FAILED" >>"$STEPS"; fi
}

step migrate node --import tsx scripts/migrate.ts latest
npx svelte-kit sync >/dev/null 2>&1
# Built before vitest: the *.app.test.ts integration tests and Playwright both run the built app.
[ "$NEEDS_BUILD" -eq 1 ] && step build npx vite build --logLevel warn
if [ "$SUBSET" -eq 0 ] || [ ${#UNIT_ONLY[@]} -gt 0 ]; then
	say "── vitest"
	npx vitest run --reporter=default --reporter=json --outputFile.json="$T/vitest.json" ${UNIT_ONLY[@]+"${UNIT_ONLY[@]}"}
fi
[ "$SUBSET" -eq 0 ] && step check npm run -s check
say "── playwright"
if grep -q "build ok" "$STEPS" && { [ "$SUBSET" -eq 0 ] || [ ${#E2E_ONLY[@]} -gt 0 ]; }; then
	node --import tsx scripts/migrate.ts seed >/dev/null
	# The end-to-end tests need checks to run: one worker, started after vitest (whose queue tests run their own).
	# Backfill off: the seeded demo circuits (period finding among them) would keep the one worker busy
	# for minutes and starve the checks the tests ask for.
	export ORRERY_WORKER_BACKFILL=0
	worker_start "$T/worker.pid" "$T/worker.log"
	ORRERY_JSON_REPORT="$T/playwright.json" npx playwright test ${E2E_ONLY[@]+"${E2E_ONLY[@]}"}
else
	say "skipping Playwright (build failed or not asked for)"
fi

echo
VJ="$T/vitest.json"; PJ="$T/playwright.json"
if [ "$SUBSET" -gt 0 ]; then [ ${#UNIT_ONLY[@]} -gt 0 ] || VJ=""; [ ${#E2E_ONLY[@]} -gt 0 ] || PJ=""; fi
node scripts/test-summary.mjs "$VJ" "$PJ" "$STEPS"
