# Shared shell helpers for start, stop and test. Sourced, never run.
# Every message here is meant for a newcomer: say what failed and what to do.

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$ROOT"

# Colour only on a terminal (and never with NO_COLOR set): logs and CI output stay plain text.
_tty_colour() { [ -t "$1" ] && [ -z "${NO_COLOR:-}" ] && [ "${TERM:-dumb}" != dumb ]; }
say() { if _tty_colour 1; then printf '\033[36morrery\033[0m %s\n' "$*"; else printf 'orrery %s\n' "$*"; fi; }
die() { if _tty_colour 2; then printf '\033[31morrery: %s\033[0m\n' "$*" >&2; else printf 'orrery: %s\n' "$*" >&2; fi; exit 1; }

port_in_use() { (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null; }

# The first port from $1 that is free and not claimed by another running script. Two test runs
# that start together used to pick the same port (both saw it free before either bound it): a claim
# is a directory made with mkdir, which only one process can create; it holds the claiming script's
# pid ($$, also inside $(…)) and lapses when that process is gone, so no cleanup is needed.
free_port_from() {
	local p=$1 claim owner
	while :; do
		claim="${TMPDIR:-/tmp}/orrery-port-$p.claim"
		if mkdir "$claim" 2>/dev/null; then
			echo "$$" >"$claim/pid"
			if ! port_in_use "$p"; then
				echo "$p"
				return 0
			fi
			rm -rf "$claim"
		else
			owner=$(cat "$claim/pid" 2>/dev/null || true)
			if [ -n "$owner" ] && ! kill -0 "$owner" 2>/dev/null; then
				rm -rf "$claim" # its script has ended
				continue
			fi
		fi
		p=$((p + 1))
	done
}

# Debian packages the project needs, installed only when missing.
ensure_system_packages() {
	local want=()
	command -v mariadbd >/dev/null 2>&1 || [ -x /usr/sbin/mariadbd ] || want+=(mariadb-server mariadb-client)
	command -v redis-server >/dev/null 2>&1 || [ -x /usr/bin/redis-server ] || want+=(redis-server)
	if [ "${1:-}" = "--with-browser" ]; then
		command -v chromium >/dev/null 2>&1 || want+=(chromium)
	fi
	[ ${#want[@]} -eq 0 ] && return 0
	say "installing system packages: ${want[*]}"
	local sudo=""
	if [ "$(id -u)" != 0 ]; then
		command -v sudo >/dev/null 2>&1 || die "need root to install ${want[*]}; run: sudo apt-get install -y ${want[*]}"
		sudo="sudo"
	fi
	if ! { $sudo apt-get update -qq && DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq "${want[@]}"; } >/tmp/orrery-apt.log 2>&1; then
		tail -n 15 /tmp/orrery-apt.log >&2
		die "could not install ${want[*]} with apt-get (log above, full log in /tmp/orrery-apt.log); install them by hand and run again"
	fi
}

ensure_node_modules() {
	if [ ! -d node_modules ] || [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
		say "installing node modules (npm ci)"
		npm ci --no-audit --no-fund >/tmp/orrery-npm.log 2>&1 || {
			tail -n 20 /tmp/orrery-npm.log >&2
			die "npm ci failed (log above, full log in /tmp/orrery-npm.log)"
		}
	fi
}

export PATH="/usr/sbin:/usr/bin:$PATH"

# db_start DATADIR PORT [extra mariadbd flags...]
# Idempotent: a running instance on that data dir is left alone; data is kept across restarts.
db_start() {
	local datadir=$1 port=$2; shift 2
	local sock="$datadir/mysqld.sock" pidf="$datadir/mysqld.pid" log="$datadir/error.log"
	mkdir -p "$datadir"
	if mariadb-admin --no-defaults --socket="$sock" -uroot ping >/dev/null 2>&1; then
		return 0
	fi
	if port_in_use "$port"; then
		die "port $port is taken by another program, so MariaDB cannot listen there. Stop that program or pick another port: ORRERY_DB_PORT=3318 npm start"
	fi
	if [ ! -d "$datadir/mysql" ]; then
		mariadb-install-db --no-defaults --datadir="$datadir" --user=root \
			--auth-root-authentication-method=socket --skip-test-db >"$datadir/install.log" 2>&1 || {
			tail -n 20 "$datadir/install.log" >&2
			die "mariadb-install-db failed for $datadir (log above)"
		}
	fi
	setsid mariadbd --no-defaults --user=root --datadir="$datadir" --bind-address=127.0.0.1 \
		--port="$port" --socket="$sock" --pid-file="$pidf" --log-error="$log" \
		--character-set-server=utf8mb4 --collation-server=utf8mb4_unicode_ci \
		--max-allowed-packet=256M "$@" </dev/null >/dev/null 2>&1 &
	local i
	for i in $(seq 1 150); do
		mariadb-admin --no-defaults --socket="$sock" -uroot ping >/dev/null 2>&1 && return 0
		sleep 0.2
	done
	echo "--- last lines of $log ---" >&2
	tail -n 25 "$log" >&2 2>/dev/null
	die "MariaDB did not start on 127.0.0.1:$port (its log is above)"
}

# db_provision DATADIR DBNAME USER PASSWORD
db_provision() {
	local sock="$1/mysqld.sock"
	mariadb --no-defaults --socket="$sock" -uroot <<SQL || die "could not create database $2"
CREATE DATABASE IF NOT EXISTS \`$2\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
CREATE USER IF NOT EXISTS '$3'@'127.0.0.1' IDENTIFIED BY '$4';
CREATE USER IF NOT EXISTS '$3'@'localhost' IDENTIFIED BY '$4';
GRANT ALL PRIVILEGES ON \`$2\`.* TO '$3'@'127.0.0.1';
GRANT ALL PRIVILEGES ON \`$2\`.* TO '$3'@'localhost';
FLUSH PRIVILEGES;
SQL
}

# pid_stop PIDFILE TENTHS [force]: stop the process named in PIDFILE (TERM), wait up to TENTHS
# tenths of a second for it to go (a zombie counts as gone), then KILL it if "force" is given.
pid_stop() {
	local pidf=$1 tenths=$2 force=${3:-}
	[ -f "$pidf" ] || return 0
	local pid; pid=$(cat "$pidf" 2>/dev/null)
	if [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null; then
		kill "$pid" 2>/dev/null
		local i st
		for i in $(seq 1 "$tenths"); do
			st=$(ps -o stat= -p "$pid" 2>/dev/null || true) # gone: ps fails, and set -e must not end the caller
			[ -z "$st" ] || [[ "$st" == Z* ]] && break
			sleep 0.1
		done
		[ -n "$force" ] && kill -9 "$pid" 2>/dev/null
	fi
	rm -f "$pidf"
}

db_stop() { pid_stop "$1/mysqld.pid" 100; }

# service_start NAME PORT PIDFILE OUT LOG READY HINT COMMAND...
# Run COMMAND in the background in its own session (no terminal, stdout and stderr to OUT) and wait
# until READY (a command line) succeeds; LOG is shown if it never does. Idempotent: a process alive
# under PIDFILE that is READY is left alone. HINT says how to choose another port when PORT is taken.
service_start() {
	local name=$1 port=$2 pidf=$3 out=$4 log=$5 ready=$6 hint=$7; shift 7
	if [ -f "$pidf" ] && kill -0 "$(cat "$pidf")" 2>/dev/null && $ready >/dev/null 2>&1; then
		return 0
	fi
	if port_in_use "$port"; then
		die "port $port is taken by another program, so $name cannot listen there. $hint"
	fi
	setsid "$@" </dev/null >>"$out" 2>&1 &
	echo $! >"$pidf"
	local i
	for i in $(seq 1 100); do
		$ready >/dev/null 2>&1 && return 0
		sleep 0.1
	done
	tail -n 20 "$log" >&2 2>/dev/null
	die "$name did not start on 127.0.0.1:$port (its log is above)"
}

# mail_start DIR PORT PIDFILE: the mail fake (scripts/mail-fake.ts) writing what it catches to DIR.
mail_start() {
	local dir=$1 port=$2 pidf=$3
	mkdir -p "$dir"
	service_start "the mail fake" "$port" "$pidf" "$dir/../mail-fake.log" "$dir/../mail-fake.log" "port_in_use $port" \
		"Pick another: ORRERY_SMTP_PORT=$((port + 1)) npm start" \
		env MAIL_DIR="$dir" SMTP_PORT="$port" node --import tsx scripts/mail-fake.ts
}

mail_stop() { pid_stop "$1" 0; }

# redis_start DIR PORT [extra redis-server flags...]
# A private Redis on loopback as a plain process (no service manager). Idempotent: an instance
# already answering on that port with this pid file is left alone.
redis_start() {
	local dir=$1 port=$2; shift 2
	mkdir -p "$dir"
	service_start Redis "$port" "$dir/redis.pid" /dev/null "$dir/redis.log" "redis-cli -p $port ping" \
		"Stop that program or pick another port: ORRERY_REDIS_PORT=$((port + 1)) npm start" \
		redis-server --port "$port" --bind 127.0.0.1 --dir "$dir" --daemonize no \
		--pidfile "$dir/redis.pid" --logfile "$dir/redis.log" --save '' --appendonly yes "$@"
}

redis_stop() { pid_stop "$1/redis.pid" 50; }

# worker_start PIDFILE LOG: one check worker in the background (npm run worker runs one in the foreground).
worker_start() {
	local pidf=$1 log=$2
	if [ -f "$pidf" ] && kill -0 "$(cat "$pidf")" 2>/dev/null; then return 0; fi
	setsid node --import tsx scripts/check-worker.ts </dev/null >"$log" 2>&1 &
	echo $! >"$pidf"
}

# A worker finishes its current chunk of inputs and closes (at most a few seconds).
worker_stop() { pid_stop "$1" 100 force; }
