#!/usr/bin/env bash
# Run a command and start it again whenever it dies (a crash, out of memory, kill -9), so one bad
# request cannot take Orrery down for everyone until someone notices. Ctrl-C or SIGTERM stops it
# for good. Restarts wait 1 s, doubling up to 30 s while the command keeps dying within 10 s.
#   bash scripts/supervise.sh node build
set -uo pipefail
source "$(dirname "$0")/lib.sh"
child=""
stopping=""
stop() {
	stopping=1
	[ -n "$child" ] && kill -TERM "$child" 2>/dev/null
}
trap stop INT TERM
# Started by `npm start`, which wrote this pid: the file goes when the supervisor does.
if [ -n "${ORRERY_APP_PIDFILE:-}" ]; then trap 'rm -f "$ORRERY_APP_PIDFILE"' EXIT; fi
delay=1
while :; do
	started=$(date +%s)
	"$@" &
	child=$!
	wait "$child"
	code=$?
	# `wait` returns early when a signal arrives: wait for the child itself to end.
	while kill -0 "$child" 2>/dev/null; do wait "$child"; code=$?; done
	[ -n "$stopping" ] && exit 0
	if [ $(($(date +%s) - started)) -ge 10 ]; then delay=1; fi
	say "the app stopped (exit status $code); starting it again in ${delay} s"
	sleep "$delay" &
	wait $! 2>/dev/null
	[ -n "$stopping" ] && exit 0
	delay=$((delay * 2 > 30 ? 30 : delay * 2))
done
