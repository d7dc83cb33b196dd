#!/usr/bin/env bash
# Nestmark's local runner: brings up a project-local MariaDB on 127.0.0.1, the fake SMTP and S3
# servers and the app, or runs the whole test suite against a separate test database.
#
#   bash scripts/nestmark.sh start      build and serve the demo on http://127.0.0.1:3000
#   bash scripts/nestmark.sh test       check, lint, vitest, build, Playwright, state rebuild; summary
#   bash scripts/nestmark.sh db:up      start MariaDB (left running) with databases and app user
#   bash scripts/nestmark.sh db:down    stop the project's MariaDB
#   bash scripts/nestmark.sh db:migrate apply the Drizzle migrations to the dev database
#   bash scripts/nestmark.sh db:seed    seed the demo scenario into the dev database
#   bash scripts/nestmark.sh db:reset   drop and recreate the dev database, migrate and seed
#   bash scripts/nestmark.sh state:rebuild [--fix]  recompute fixture states, report differences
#   bash scripts/nestmark.sh db:restart shut MariaDB down and start it again (left running)
#   bash scripts/nestmark.sh soak       50 phones against the built app, with faults; prints figures
#
# Everything it starts it stops again on exit (Ctrl-C included), by PID; a MariaDB that was
# already running is reused and left running.
set -euo pipefail

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
cd "$ROOT"
export PATH="$ROOT/node_modules/.bin:$PATH"

DATA_DIR="$ROOT/.data"
DB_CNF="$DATA_DIR/my.cnf"
DB_DATADIR="$DATA_DIR/mysql"
DB_PIDFILE="$DATA_DIR/mysqld.pid"
DB_ERRLOG="$DATA_DIR/mysqld.err"
DB_INIT_MARKER="$DB_DATADIR/.nestmark-initialised"
DEV_DB=nestmark
TEST_DB=nestmark_test

# Never fail on output: after a closed terminal, clean-up must still run to the end.
say() { printf 'nestmark: %s\n' "$*" 2>/dev/null || true; }
warn() { printf 'nestmark: %s\n' "$*" >&2 2>/dev/null || true; }
die() {
	warn "error: $*"
	exit 1
}

# ---------------------------------------------------------------------------------------------
# Environment
# ---------------------------------------------------------------------------------------------

# Values from .env fill in what the environment does not already set, so a variable given on
# the command line (NESTMARK_DB_PORT=3310 npm start) still wins over the file.
load_dotenv() {
	[[ -f "$ROOT/.env" ]] || return 0
	local line name
	while IFS= read -r line || [[ -n "$line" ]]; do
		line="${line#"${line%%[![:space:]]*}"}"
		[[ -z "$line" || "$line" == \#* ]] && continue
		line="${line#export }"
		[[ "$line" =~ ^([A-Za-z_][A-Za-z0-9_]*)= ]] || {
			warn "ignoring unreadable line in .env: $line"
			continue
		}
		name="${BASH_REMATCH[1]}"
		[[ -n "${!name+x}" ]] && continue
		eval "export $line"
	done <"$ROOT/.env"
}

# Percent-encodes a string for use inside a URL's user-info part.
urlencode() {
	local s="$1" out="" c i
	for ((i = 0; i < ${#s}; i++)); do
		c="${s:i:1}"
		case "$c" in
		[A-Za-z0-9._~-]) out+="$c" ;;
		*) out+=$(printf '%%%02X' "'$c") ;;
		esac
	done
	printf '%s' "$out"
}

# Escapes a string for a single-quoted SQL literal.
sql_quote() {
	local s="${1//\\/\\\\}"
	printf "'%s'" "${s//\'/\'\'}"
}

# A stable secret for development, made once and kept with the data, so sessions survive restarts.
dev_auth_secret() {
	local f="$DATA_DIR/auth-secret"
	if [[ ! -s "$f" ]]; then
		(umask 077 && head -c 32 /dev/urandom | base64 | tr -d '\n=' | tr '+/' '-_' >"$f")
	fi
	cat "$f"
}

# Sets and exports every variable the app, the scripts and the tests read. mode: dev | test
setup_env() {
	local mode="$1"
	mkdir -p "$DATA_DIR"
	load_dotenv

	export NESTMARK_DB_PORT="${NESTMARK_DB_PORT:-3307}"
	export NESTMARK_DB_PASSWORD="${NESTMARK_DB_PASSWORD:-nestmark-dev}"
	local db_base
	db_base="mysql://nestmark:$(urlencode "$NESTMARK_DB_PASSWORD")@127.0.0.1:$NESTMARK_DB_PORT"
	export AUTH_SECRET="${AUTH_SECRET:-$(dev_auth_secret)}"
	export HOST="${HOST:-127.0.0.1}"
	export SMTP_HOST="${SMTP_HOST:-127.0.0.1}"
	export MAIL_FROM="${MAIL_FROM:-Nestmark <nestmark@localhost>}"
	# adapter-node's default body limit (512K) is below the sync API's own 2 MB limit and the photo
	# upload's 8 MB; let each endpoint decide, so an oversize body gets its clear JSON 400.
	export BODY_SIZE_LIMIT="${BODY_SIZE_LIMIT:-10M}"
	export S3_BUCKET="${S3_BUCKET:-nestmark-attachments}"
	export S3_REGION="${S3_REGION:-us-east-1}"

	if [[ "$mode" == test ]]; then
		# Tests never take DATABASE_URL, ports or folders from .env: the test database is dropped
		# and recreated on every run, so it must never be the one that holds real data.
		export NESTMARK_TEST_PORT="${NESTMARK_TEST_PORT:-3100}"
		export NESTMARK_TEST_SMTP_PORT="${NESTMARK_TEST_SMTP_PORT:-2526}"
		export DATABASE_URL="$db_base/$TEST_DB"
		export PORT="$NESTMARK_TEST_PORT"
		export HOST=127.0.0.1
		export ORIGIN="http://127.0.0.1:$NESTMARK_TEST_PORT"
		export SMTP_PORT="$NESTMARK_TEST_SMTP_PORT"
		export MAIL_CAPTURE_DIR="$DATA_DIR/mail-test"
		export NESTMARK_ENV=test
		# Mail always goes to the fake, which offers neither TLS nor AUTH.
		unset SMTP_USER SMTP_PASSWORD SMTP_SECURE
		# Photos always go to the S3 fake, emptied on every run.
		export NESTMARK_TEST_S3_PORT="${NESTMARK_TEST_S3_PORT:-4570}"
		export S3_ENDPOINT="http://127.0.0.1:$NESTMARK_TEST_S3_PORT"
		export S3_FAKE_DIR="$DATA_DIR/s3-test"
		export S3_BUCKET=nestmark-attachments S3_REGION=us-east-1 S3_FORCE_PATH_STYLE=true
		export S3_ACCESS_KEY_ID=S3RVER S3_SECRET_ACCESS_KEY=S3RVER
	else
		export DATABASE_URL="${DATABASE_URL:-$db_base/$DEV_DB}"
		export PORT="${PORT:-3000}"
		export ORIGIN="${ORIGIN:-http://$HOST:$PORT}"
		export SMTP_PORT="${SMTP_PORT:-2525}"
		export MAIL_CAPTURE_DIR="${MAIL_CAPTURE_DIR:-$DATA_DIR/mail}"
		export NESTMARK_ENV="${NESTMARK_ENV:-development}"
		export NESTMARK_S3_PORT="${NESTMARK_S3_PORT:-4569}"
		if [[ -z "${S3_ENDPOINT:-}" && "$NESTMARK_ENV" != production ]]; then
			export S3_ENDPOINT="http://127.0.0.1:$NESTMARK_S3_PORT"
			# The fake's fixed key pair; a real store's keys come from .env or the environment.
			export S3_ACCESS_KEY_ID="${S3_ACCESS_KEY_ID:-S3RVER}"
			export S3_SECRET_ACCESS_KEY="${S3_SECRET_ACCESS_KEY:-S3RVER}"
		fi
		export S3_FAKE_DIR="${S3_FAKE_DIR:-$DATA_DIR/s3}"
	fi
}

# ---------------------------------------------------------------------------------------------
# System packages
# ---------------------------------------------------------------------------------------------

# An executable on PATH (command -v alone also reports files that cannot be run).
have_cmd() {
	local p
	p="$(command -v "$1" 2>/dev/null)" && [[ -x "$p" && -f "$p" ]]
}
have_mariadbd() { (have_cmd mariadbd || [[ -x /usr/sbin/mariadbd ]]) && have_cmd mariadb-install-db; }
have_mariadb_client() { have_cmd mariadb && have_cmd mariadb-admin; }
have_chromium() { [[ -x /usr/bin/chromium ]]; }

# Installs missing Debian packages as root; otherwise says exactly what to install and stops.
ensure_packages() {
	local want_chromium="$1" pkgs=()
	have_mariadbd || pkgs+=(mariadb-server-core)
	have_mariadb_client || pkgs+=(mariadb-client)
	[[ "$want_chromium" == yes ]] && ! have_chromium && pkgs+=(chromium)
	((${#pkgs[@]} == 0)) && return 0

	if [[ "$(id -u)" -ne 0 ]]; then
		warn "error: missing system packages: ${pkgs[*]}"
		warn "install them as root, then run this command again:"
		warn "  apt-get update && apt-get install -y --no-install-recommends ${pkgs[*]}"
		exit 1
	fi
	say "installing Debian packages: ${pkgs[*]}"
	export DEBIAN_FRONTEND=noninteractive
	apt-get update
	apt-get install -y --no-install-recommends "${pkgs[@]}"
}

# ---------------------------------------------------------------------------------------------
# MariaDB
# ---------------------------------------------------------------------------------------------

mariadbd_bin() {
	if have_cmd mariadbd; then command -v mariadbd; else echo /usr/sbin/mariadbd; fi
}

# Unix socket paths are limited to 108 bytes; deep checkouts fall back to a short path in /tmp.
db_socket() {
	local s="$DATA_DIR/mysqld.sock"
	if ((${#s} >= 100)); then
		s="/tmp/nestmark-$(printf '%s' "$ROOT" | sha1sum | cut -c1-12).sock"
	fi
	printf '%s' "$s"
}

write_db_config() {
	local sock
	sock="$(db_socket)"
	cat >"$DB_CNF" <<EOF
# Written by scripts/nestmark.sh on every run; edit the script (or .env), not this file.
[mysqld]
datadir=$DB_DATADIR
socket=$sock
pid-file=$DB_PIDFILE
port=$NESTMARK_DB_PORT
bind-address=127.0.0.1
user=$(id -un)
skip-name-resolve
log-error=$DB_ERRLOG
character-set-server=utf8mb4
collation-server=utf8mb4_unicode_ci
# Timestamps are stored and compared in UTC whatever the machine's zone is.
default-time-zone=+00:00
# A local development/test server: flush the redo log once a second, not on every commit.
innodb_flush_log_at_trx_commit=2

[client]
socket=$sock
port=$NESTMARK_DB_PORT
default-character-set=utf8mb4
EOF
}

# Admin access as the operating-system user through the unix socket (mariadb-install-db gives
# root, and the user who ran it, socket authentication).
db_sql() { mariadb --defaults-file="$DB_CNF" -u "$(id -un)" "$@"; }
db_admin() { mariadb-admin --defaults-file="$DB_CNF" -u "$(id -un)" --connect-timeout=2 "$@"; }
db_alive() { db_admin ping >/dev/null 2>&1; }

port_in_use() { (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null; }

db_log_tail() {
	if [[ -f "$DB_ERRLOG" ]]; then
		warn "last lines of $DB_ERRLOG:"
		tail -n 25 "$DB_ERRLOG" | sed 's/^/    /' >&2
	fi
}

db_initialise() {
	[[ -f "$DB_INIT_MARKER" ]] && return 0
	if [[ -d "$DB_DATADIR" ]] && [[ -n "$(ls -A "$DB_DATADIR" 2>/dev/null)" ]]; then
		local aside
		aside="$DB_DATADIR.incomplete-$(date +%Y%m%d-%H%M%S)"
		warn "data directory $DB_DATADIR was never fully initialised; moving it to $aside"
		mv "$DB_DATADIR" "$aside"
	fi
	say "initialising MariaDB data directory in $DB_DATADIR (first run)"
	mkdir -p "$DB_DATADIR"
	if ! mariadb-install-db --defaults-file="$DB_CNF" --auth-root-authentication-method=socket \
		--skip-test-db >"$DATA_DIR/install-db.log" 2>&1; then
		warn "mariadb-install-db failed; last lines of $DATA_DIR/install-db.log:"
		tail -n 25 "$DATA_DIR/install-db.log" | sed 's/^/    /' >&2
		exit 1
	fi
	touch "$DB_INIT_MARKER"
}

DB_STARTED_PID=""

# Starts MariaDB unless it already answers on our socket; remembers the PID only if we started it.
db_start() {
	write_db_config
	if db_alive; then
		say "MariaDB already running on 127.0.0.1:$NESTMARK_DB_PORT (reusing it)"
		return 0
	fi
	if port_in_use "$NESTMARK_DB_PORT"; then
		die "port $NESTMARK_DB_PORT is taken by another program; set NESTMARK_DB_PORT to a free port"
	fi
	db_initialise

	say "starting MariaDB on 127.0.0.1:$NESTMARK_DB_PORT"
	# A session of its own, so a Ctrl-C in the terminal reaches this script, which then shuts the
	# server down cleanly, instead of killing mariadbd mid-write.
	setsid "$(mariadbd_bin)" --defaults-file="$DB_CNF" </dev/null >/dev/null 2>&1 &
	DB_STARTED_PID=$!

	local timeout="${NESTMARK_DB_START_TIMEOUT:-60}" waited=0
	until db_alive; do
		if ! kill -0 "$DB_STARTED_PID" 2>/dev/null; then
			DB_STARTED_PID=""
			db_log_tail
			die "MariaDB exited during start-up (see above)"
		fi
		if ((waited >= timeout * 4)); then
			db_log_tail
			die "MariaDB did not answer within ${timeout}s (NESTMARK_DB_START_TIMEOUT)"
		fi
		sleep 0.25
		waited=$((waited + 1))
	done
	# The server's own record of its PID is the one to watch from here on.
	if [[ -s "$DB_PIDFILE" ]]; then DB_STARTED_PID="$(cat "$DB_PIDFILE")"; fi
	say "MariaDB is up (pid $DB_STARTED_PID)"
}

db_stop_started() {
	[[ -n "$DB_STARTED_PID" ]] || return 0
	local pid="$DB_STARTED_PID"
	DB_STARTED_PID=""
	kill -0 "$pid" 2>/dev/null || return 0
	say "stopping MariaDB (pid $pid)"
	db_admin shutdown >/dev/null 2>&1 || kill -TERM "$pid" 2>/dev/null || true
	wait_gone "$pid" 60 || {
		warn "MariaDB (pid $pid) did not stop in 60s; killing it"
		kill -KILL "$pid" 2>/dev/null || true
	}
}

db_ensure_databases() {
	local pw
	pw="$(sql_quote "$NESTMARK_DB_PASSWORD")"
	db_sql <<EOF
CREATE DATABASE IF NOT EXISTS \`$DEV_DB\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
CREATE DATABASE IF NOT EXISTS \`$TEST_DB\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
CREATE USER IF NOT EXISTS 'nestmark'@'127.0.0.1' IDENTIFIED BY $pw;
CREATE USER IF NOT EXISTS 'nestmark'@'localhost' IDENTIFIED BY $pw;
ALTER USER 'nestmark'@'127.0.0.1' IDENTIFIED BY $pw;
ALTER USER 'nestmark'@'localhost' IDENTIFIED BY $pw;
GRANT ALL PRIVILEGES ON \`$DEV_DB\`.* TO 'nestmark'@'127.0.0.1', 'nestmark'@'localhost';
GRANT ALL PRIVILEGES ON \`$TEST_DB\`.* TO 'nestmark'@'127.0.0.1', 'nestmark'@'localhost';
EOF
}

db_recreate() {
	local db="$1"
	db_sql <<EOF
DROP DATABASE IF EXISTS \`$db\`;
CREATE DATABASE \`$db\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
EOF
	db_ensure_databases
}

# Start (or reuse) MariaDB and make sure databases and user exist. Serialised with a lock so
# `npm start` and `npm test` started together do not both launch a server.
db_up() {
	ensure_packages "${1:-no}"
	exec 8>"$DATA_DIR/db.lock"
	flock -w 120 8 || die "timed out waiting for another nestmark command to bring the database up"
	db_start
	db_ensure_databases
	flock -u 8
	exec 8>&-
}

# True when DATABASE_URL names the project's own MariaDB; false for a server run elsewhere
# (a real shop's), which this script must neither start nor install.
uses_local_db() {
	[[ "$DATABASE_URL" =~ ^mysql://([^@/]*@)?([^:/]+)(:([0-9]+))?/ ]] || return 1
	local host="${BASH_REMATCH[2]}" port="${BASH_REMATCH[4]:-3306}"
	[[ "$host" == 127.0.0.1 || "$host" == localhost ]] && [[ "$port" == "$NESTMARK_DB_PORT" ]]
}

# Brings up the local database when DATABASE_URL points at it; otherwise only says where it goes.
db_up_if_local() {
	if uses_local_db; then
		db_up no
	else
		say "DATABASE_URL points at another server; not starting the local MariaDB"
	fi
}

run_migrate() { tsx scripts/migrate.ts; }

run_seed() {
	if [[ -f scripts/seed.ts ]]; then
		tsx scripts/seed.ts
	else
		say "notice: scripts/seed.ts does not exist yet; skipping the demo seed"
	fi
}

# ---------------------------------------------------------------------------------------------
# Child processes
# ---------------------------------------------------------------------------------------------

wait_gone() {
	local pid="$1" secs="$2" i
	for ((i = 0; i < secs * 10; i++)); do
		kill -0 "$pid" 2>/dev/null || return 0
		sleep 0.1
	done
	return 1
}

stop_pid() {
	local name="$1" pid="$2"
	[[ -n "$pid" ]] && kill -0 "$pid" 2>/dev/null || return 0
	say "stopping $name (pid $pid)"
	kill -TERM "$pid" 2>/dev/null || true
	wait_gone "$pid" 10 || kill -KILL "$pid" 2>/dev/null || true
	wait "$pid" 2>/dev/null || true
}

wait_for_port() {
	local port="$1" pid="$2" secs="$3" i
	for ((i = 0; i < secs * 10; i++)); do
		port_in_use "$port" && return 0
		kill -0 "$pid" 2>/dev/null || return 1
		sleep 0.1
	done
	return 1
}

MAIL_PID=""
S3_PID=""
APP_PID=""

start_mail_fake() {
	if [[ "$SMTP_HOST" != 127.0.0.1 && "$SMTP_HOST" != localhost && "$SMTP_HOST" != ::1 ]] ||
		[[ -n "${SMTP_USER:-}" ]]; then
		say "mail goes to the SMTP server at $SMTP_HOST:$SMTP_PORT (no fake started)"
		return 0
	fi
	if port_in_use "$SMTP_PORT"; then
		die "port $SMTP_PORT (SMTP_PORT) is already in use; is another Nestmark running?"
	fi
	mkdir -p "$MAIL_CAPTURE_DIR"
	# node --import tsx keeps it to one process, so its PID is the one to stop.
	node --import tsx scripts/mail-fake.ts </dev/null &
	MAIL_PID=$!
	wait_for_port "$SMTP_PORT" "$MAIL_PID" 20 || die "the fake SMTP server did not start"
}

# The S3 fake runs only when S3_ENDPOINT is a loopback http address (a real store is left alone).
start_s3_fake() {
	local port
	if [[ ! "${S3_ENDPOINT:-}" =~ ^http://(127\.0\.0\.1|localhost):([0-9]+)/?$ ]]; then
		say "photos go to the S3 store at ${S3_ENDPOINT:-AWS} (no fake started)"
		return 0
	fi
	port="${BASH_REMATCH[2]}"
	if port_in_use "$port"; then
		die "port $port (S3_ENDPOINT) is already in use; is another Nestmark running?"
	fi
	mkdir -p "$S3_FAKE_DIR"
	node --import tsx scripts/s3-fake.ts </dev/null &
	S3_PID=$!
	wait_for_port "$port" "$S3_PID" 20 || die "the fake S3 server did not start"
}

# For the seed commands (the demo's inspection photos): the fake of an 'npm start' already running
# from this folder is used as it is; otherwise one is started for the command and stopped after it.
s3_for_seed() {
	if [[ "${S3_ENDPOINT:-}" =~ ^http://(127\.0\.0\.1|localhost):([0-9]+)/?$ ]] &&
		port_in_use "${BASH_REMATCH[2]}"; then
		say "using the S3 fake already listening on port ${BASH_REMATCH[2]}"
		return 0
	fi
	start_s3_fake
}

CLEANED_UP=""
cleanup() {
	[[ -n "$CLEANED_UP" ]] && return 0
	CLEANED_UP=1
	trap - INT TERM HUP
	set +e
	stop_pid "app" "$APP_PID"
	stop_pid "fake SMTP server" "$MAIL_PID"
	stop_pid "fake S3 server" "$S3_PID"
	db_stop_started
	set -e
	return 0
}

on_signal() {
	warn "interrupted; stopping what this command started"
	exit 130
}

install_traps() {
	trap cleanup EXIT
	trap on_signal INT TERM HUP
}

# ---------------------------------------------------------------------------------------------
# Commands
# ---------------------------------------------------------------------------------------------

print_demo_accounts() {
	local f="$ROOT/scripts/demo-accounts.txt"
	[[ -f "$f" ]] || return 0
	echo
	echo "  Demo accounts (demo-only passwords):"
	printf '    %-11s %-34s %s\n' role e-mail password
	local role email password
	while read -r role email password; do
		[[ -z "$role" ]] && continue
		printf '    %-11s %-34s %s\n' "$role" "$email" "$password"
	done <"$f"
	echo
}

cmd_start() {
	exec 7>"$DATA_DIR/start.lock"
	flock -n 7 || die "another 'npm start' from this folder is already running"
	install_traps
	db_up_if_local
	if port_in_use "$PORT"; then
		die "port $PORT is already in use; stop the other program or set PORT"
	fi
	# The fakes first: the demo seed stores its inspection photos through the S3 API.
	start_mail_fake
	start_s3_fake
	say "applying migrations"
	run_migrate
	run_seed
	say "building the app"
	vite build
	node build </dev/null &
	APP_PID=$!
	wait_for_port "$PORT" "$APP_PID" 60 || die "the app did not start listening on port $PORT"
	echo
	echo "  Nestmark is running at $ORIGIN"
	[[ -n "$MAIL_PID" ]] && echo "  Mail sent by the app is captured in $MAIL_CAPTURE_DIR"
	[[ -n "$S3_PID" ]] && echo "  Photos are kept by the local S3 fake in $S3_FAKE_DIR"
	print_demo_accounts
	echo "  Press Ctrl-C to stop."
	echo
	local rc=0
	wait "$APP_PID" || rc=$?
	APP_PID=""
	die "the app exited (status $rc)"
}

STEP_NAMES=()
STEP_RESULTS=()
STEP_TIMES=()

now_ms() {
	local t="${EPOCHREALTIME//[.,]/}"
	echo $((10#$t / 1000))
}

# Runs one step, records PASS/FAIL and its duration, and never stops the run.
step() {
	local name="$1"
	shift
	echo
	echo "=== $name"
	local t0 rc=0
	t0=$(now_ms)
	"$@" || rc=$?
	record "$name" "$([[ $rc -eq 0 ]] && echo PASS || echo FAIL)" $(($(now_ms) - t0))
	return 0
}

record() {
	STEP_NAMES+=("$1")
	STEP_RESULTS+=("$2")
	STEP_TIMES+=("$3")
	[[ "$2" == FAIL ]] && warn "step failed: $1"
	return 0
}

fmt_secs() { printf '%d.%01ds' $(($1 / 1000)) $((($1 % 1000) / 100)); }

step_result() {
	local name="$1" i
	for i in "${!STEP_NAMES[@]}"; do
		[[ "${STEP_NAMES[$i]}" == "$name" ]] && echo "${STEP_RESULTS[$i]}"
	done
}

prepare_e2e_db() {
	# A fresh database for the browser tests, so nothing the integration tests left behind shows.
	db_recreate "$TEST_DB" && run_migrate && run_seed
}

e2e() {
	if [[ "$(step_result 'vite build')" != PASS ]]; then
		warn "not running Playwright: the build failed, and an older build must not be tested"
		return 1
	fi
	playwright test
}

# The stored state of every fixture in the test database (the demo seed and whatever the browser
# tests logged) must equal a fold of its history; any fixture that differs fails the run.
rebuild_check() {
	tsx scripts/state-rebuild.ts
}

cmd_test() {
	local t_start
	t_start=$(now_ms)
	exec 7>"$DATA_DIR/test.lock"
	flock -n 7 || die "another 'npm test' from this folder is already running"
	install_traps
	db_up yes
	say "recreating the test database $TEST_DB"
	db_recreate "$TEST_DB"
	rm -rf "$MAIL_CAPTURE_DIR" "$S3_FAKE_DIR"
	start_mail_fake
	start_s3_fake

	step "migrate test database" run_migrate
	step "svelte-check" npm run check
	step "lint" npm run lint
	step "vitest (unit + integration)" vitest run
	step "vite build" vite build
	step "prepare e2e database" prepare_e2e_db
	step "playwright (e2e)" e2e
	step "state:rebuild (test database)" rebuild_check

	# Stop the services first, so the summary is the last thing printed.
	echo
	cleanup

	local passed=0 failed=0 i
	echo
	echo "=== Nestmark test summary"
	for i in "${!STEP_NAMES[@]}"; do
		printf '  %-4s  %-30s %8s\n' "${STEP_RESULTS[$i]}" "${STEP_NAMES[$i]}" "$(fmt_secs "${STEP_TIMES[$i]}")"
		if [[ "${STEP_RESULTS[$i]}" == PASS ]]; then passed=$((passed + 1)); else failed=$((failed + 1)); fi
	done
	echo "  total $(fmt_secs $(($(now_ms) - t_start)))"
	echo "Summary: $passed passed, $failed failed"
	((failed == 0))
}

cmd_db_up() {
	db_up no
	DB_STARTED_PID="" # db:up leaves the server running on purpose
	say "databases $DEV_DB and $TEST_DB ready on 127.0.0.1:$NESTMARK_DB_PORT (user nestmark)"
	say "stop it with: npm run db:down"
}

# Shuts the project's MariaDB down cleanly (through its defaults file) and waits until it is gone.
db_shutdown() {
	local pid=""
	[[ -f "$DB_PIDFILE" ]] && pid="$(cat "$DB_PIDFILE")"
	say "stopping MariaDB${pid:+ (pid $pid)}"
	db_admin shutdown
	if [[ -n "$pid" ]]; then wait_gone "$pid" 60 || die "MariaDB (pid $pid) is still running after 60s"; fi
}

cmd_db_down() {
	write_db_config
	if ! db_alive; then
		say "MariaDB is not running"
		return 0
	fi
	db_shutdown
	say "MariaDB stopped; data kept in $DB_DATADIR"
}

# The soak's database fault, and a quick way to apply a changed my.cnf: stop, start, leave running.
cmd_db_restart() {
	write_db_config
	exec 8>"$DATA_DIR/db.lock"
	flock -w 120 8 || die "timed out waiting for another nestmark command to bring the database up"
	if db_alive; then db_shutdown; fi
	db_start
	DB_STARTED_PID="" # left running on purpose, like db:up
	flock -u 8
	exec 8>&-
}

# Soak test (scripts/soak.ts): its own scratch database, S3 fake and app (built first if stale).
cmd_soak() {
	exec 7>"$DATA_DIR/soak.lock"
	flock -n 7 || die "another soak from this folder is already running"
	install_traps
	# The soak must test the code as it is: build when there is no build or the sources are newer.
	if [[ ! -f build/index.js ]] ||
		[[ -n "$(find src static svelte.config.js vite.config.ts package-lock.json -newer build/index.js -print -quit)" ]]; then
		say "building the app (output in .data/soak-build.log)"
		vite build >"$DATA_DIR/soak-build.log" 2>&1 || {
			tail -n 30 "$DATA_DIR/soak-build.log" >&2
			die "the build failed"
		}
	fi
	db_up no
	local rc=0
	tsx scripts/soak.ts || rc=$?
	# The soak restarts MariaDB once: if this command started it, the server to stop is the new one.
	if [[ -n "$DB_STARTED_PID" && -s "$DB_PIDFILE" ]]; then DB_STARTED_PID="$(cat "$DB_PIDFILE")"; fi
	return "$rc"
}

# The db:* commands below leave the server as they found it: stopped again if they started it.
cmd_db_migrate() {
	install_traps
	db_up_if_local
	run_migrate
}

cmd_db_seed() {
	install_traps
	db_up_if_local
	s3_for_seed
	run_seed
}

cmd_state_rebuild() {
	install_traps
	db_up_if_local
	tsx scripts/state-rebuild.ts "$@"
}

cmd_db_reset() {
	if ! uses_local_db || [[ ! "$DATABASE_URL" =~ /$DEV_DB(\?.*)?$ ]]; then
		die "db:reset only resets the project's own '$DEV_DB' database, and DATABASE_URL names another"
	fi
	install_traps
	db_up no
	say "dropping and recreating the database $DEV_DB"
	db_recreate "$DEV_DB"
	run_migrate
	s3_for_seed
	run_seed
	say "database $DEV_DB reset to the demo scenario"
}

usage() {
	sed -n '2,15p' "${BASH_SOURCE[0]}" | sed 's/^# \{0,1\}//'
}

main() {
	local cmd="${1:-}"
	case "$cmd" in
	start)
		setup_env dev
		cmd_start
		;;
	test)
		setup_env test
		cmd_test
		;;
	db:up | db:down | db:restart | db:migrate | db:seed | db:reset | soak)
		setup_env dev
		"cmd_${cmd//:/_}"
		;;
	state:rebuild)
		setup_env dev
		shift
		cmd_state_rebuild "$@"
		;;
	-h | --help | help) usage ;;
	*)
		usage >&2
		exit 2
		;;
	esac
}

main "$@"
