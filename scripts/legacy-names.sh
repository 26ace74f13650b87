# Sourced by env.sh. Before the rename the product was called Phasewright: its settings were PW_*
# and npm start created a database and user named phasewright. Old settings work for one release
# (with a warning) and an existing .data/ keeps its database. The only shell file with the old name.
for _n in DATA_DIR DB_PORT SMTP_PORT DEV_OUTBOX; do
	_old="PW_$_n"; _new="ORRERY_$_n"
	if [ -n "${!_old:-}" ] && [ -z "${!_new:-}" ]; then
		echo "warning: $_old is the old name of $_new; it will stop working in the next release" >&2
		export "$_new=${!_old}"
	fi
done
unset _n _old _new
_legacy_data="${ORRERY_DATA_DIR:-$ROOT/.data}/mariadb/phasewright"
if [ -z "${DB_NAME:-}" ] && [ -d "$_legacy_data" ]; then
	export DB_NAME=phasewright DB_USER="${DB_USER:-phasewright}" DB_PASSWORD="${DB_PASSWORD:-phasewright-local}"
fi
unset _legacy_data
