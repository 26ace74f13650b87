# Development settings (npm start). Override any of them in the environment.
source "$ROOT/scripts/legacy-names.sh"
export ORRERY_DATA_DIR="${ORRERY_DATA_DIR:-$ROOT/.data}"
export ORRERY_DB_PORT="${ORRERY_DB_PORT:-3317}"
export ORRERY_SMTP_PORT="${ORRERY_SMTP_PORT:-2525}"
export ORRERY_REDIS_PORT="${ORRERY_REDIS_PORT:-6390}"
export ORRERY_REDIS_URL="${ORRERY_REDIS_URL:-redis://127.0.0.1:$ORRERY_REDIS_PORT}"
export DB_HOST=127.0.0.1
export DB_PORT="$ORRERY_DB_PORT"
export DB_NAME="${DB_NAME:-orrery}"
export DB_USER="${DB_USER:-orrery}"
export DB_PASSWORD="${DB_PASSWORD:-orrery-local}"
export SMTP_URL="${SMTP_URL:-smtp://127.0.0.1:$ORRERY_SMTP_PORT}"
export MAIL_DIR="${MAIL_DIR:-$ORRERY_DATA_DIR/mail}"
export PORT="${PORT:-3000}"
export HOST="${HOST:-127.0.0.1}"
export ORIGIN="${ORIGIN:-http://127.0.0.1:$PORT}"
# adapter-node refuses bodies over 512 KiB by default; snapshots may be up to 5 MiB (the app checks that itself).
export BODY_SIZE_LIMIT="${BODY_SIZE_LIMIT:-8M}"
