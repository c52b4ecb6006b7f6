# Shared by scripts/up, scripts/test and scripts/stop. Sourced, not run.
# Everything Cairn starts lives inside the project: MariaDB data in .data/, sockets, pids and logs in .run/.
set -euo pipefail

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/../.." && pwd)"
# Overridable so a test can run a second, scratch instance beside the developer's.
DATA_DIR="${CAIRN_DATA_DIR:-$ROOT/.data}"
RUN_DIR="${CAIRN_RUN_DIR:-$ROOT/.run}"
MARIADB_DATADIR="$DATA_DIR/mariadb"
MARIADB_SOCKET="$RUN_DIR/mariadb.sock"
MARIADB_PID="$RUN_DIR/mariadb.pid"
MARIADB_LOG="$RUN_DIR/mariadb.log"
SECRETS_FILE="${CAIRN_SECRETS_FILE:-$ROOT/.data/secrets.env}"

# Cairn's own ports, away from the usual 3306/3000/25 so another instance on the machine does not clash.
export CAIRN_DB_HOST="${CAIRN_DB_HOST:-127.0.0.1}"
export CAIRN_DB_PORT="${CAIRN_DB_PORT:-3407}"

log() { printf '\033[1;33m[cairn]\033[0m %s %s\n' "$(date -u +%H:%M:%S)" "$*" >&2; }
die() { printf '\033[1;31m[cairn] %s\033[0m\n' "$*" >&2; exit 1; }

export NEXT_TELEMETRY_DISABLED=1
mkdir -p "$DATA_DIR" "$RUN_DIR"

as_root() {
  if [ "$(id -u)" = 0 ]; then "$@"; elif command -v sudo >/dev/null; then sudo "$@"; else die "need root to run: $*"; fi
}

apt_install() {
  log "installing Debian packages: $*"
  as_root apt-get update -o DPkg::Lock::Timeout=900 >/dev/null || log "apt-get update failed; trying the install anyway"
  as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -o DPkg::Lock::Timeout=900 "$@" >/dev/null
}

ensure_mariadb_installed() {
  if ! command -v mariadbd >/dev/null 2>&1 && [ ! -x /usr/sbin/mariadbd ]; then apt_install mariadb-server mariadb-client; fi
  export PATH="$PATH:/usr/sbin"
}

# Rscript (Debian's r-base-core) runs the closed review's reproduction scripts in the integration tests.
ensure_rscript_installed() {
  if ! command -v Rscript >/dev/null 2>&1; then apt_install r-base-core; fi
}

native_packages_load() {
  (cd "$ROOT" && node -e "Promise.all(['rolldown', 'lightningcss', '@tailwindcss/oxide', 'esbuild'].map((m) => import(m))).then(() => process.exit(0), (e) => { console.error(e.message); process.exit(1); })")
}

ensure_node_modules() {
  local stamp="$ROOT/node_modules/.cairn-lock-stamp"
  if [ ! -f "$stamp" ] || ! cmp -s "$ROOT/package-lock.json" "$stamp"; then
    log "installing npm packages (npm ci)"
    (cd "$ROOT" && npm ci --no-audit --no-fund >/dev/null)
    # npm ci treats a platform's native package as an optional dependency and goes on without it when it
    # is skipped (npm/cli#4828); a fresh clone once lost rolldown's, and vitest could not start. Check
    # the native parts load, and install once more if one does not.
    if ! native_packages_load; then
      log "a native package is missing after npm ci; installing again"
      (cd "$ROOT" && rm -rf node_modules && npm ci --no-audit --no-fund >/dev/null)
      native_packages_load || die "native packages (rolldown, lightningcss, @tailwindcss/oxide, esbuild) still do not load after npm ci"
    fi
    cp "$ROOT/package-lock.json" "$stamp"
  fi
}

# Random secrets made once per checkout and kept out of git.
ensure_secrets() {
  if [ ! -f "$SECRETS_FILE" ]; then
    umask 077
    {
      echo "CAIRN_DB_APP_PASSWORD=$(head -c 18 /dev/urandom | base64 | tr -dc 'A-Za-z0-9')"
      echo "CAIRN_DB_OWNER_PASSWORD=$(head -c 18 /dev/urandom | base64 | tr -dc 'A-Za-z0-9')"
      echo "NEXTAUTH_SECRET=$(head -c 32 /dev/urandom | base64 | tr -dc 'A-Za-z0-9')"
    } >"$SECRETS_FILE"
  fi
  # Secrets added later are appended to an existing file, so a checkout made before keeps its others.
  # CAIRN_AUDIT_KEY keys the audit chain and signature hashes: it lives here, never in the database,
  # so a database dump (scripts/backup) holds no key. Keep a copy of this file apart from the dumps.
  if ! grep -q '^CAIRN_AUDIT_KEY=' "$SECRETS_FILE"; then
    (umask 077; echo "CAIRN_AUDIT_KEY=$(head -c 48 /dev/urandom | base64 | tr -dc 'A-Za-z0-9')" >>"$SECRETS_FILE")
  fi
  if ! grep -q '^CAIRN_DB_BLIND_PASSWORD=' "$SECRETS_FILE"; then
    (umask 077; echo "CAIRN_DB_BLIND_PASSWORD=$(head -c 18 /dev/urandom | base64 | tr -dc 'A-Za-z0-9')" >>"$SECRETS_FILE")
  fi
  set -a; . "$SECRETS_FILE"; set +a
  export CAIRN_DB_APP_USER=cairn_app CAIRN_DB_OWNER_USER=cairn_owner CAIRN_DB_BLIND_USER=cairn_blind
}

mysql_root() { mariadb --no-defaults --socket="$MARIADB_SOCKET" -uroot "$@"; }

mariadb_running() {
  [ -S "$MARIADB_SOCKET" ] && mariadb-admin --no-defaults --socket="$MARIADB_SOCKET" -uroot ping >/dev/null 2>&1
}

start_mariadb() {
  ensure_mariadb_installed
  if mariadb_running; then return 0; fi
  if [ ! -d "$MARIADB_DATADIR/mysql" ]; then
    log "initialising a private MariaDB in .data/mariadb"
    rm -rf "$MARIADB_DATADIR"; mkdir -p "$MARIADB_DATADIR"
    mariadb-install-db --no-defaults --datadir="$MARIADB_DATADIR" --user=root \
      --auth-root-authentication-method=socket --skip-test-db >"$RUN_DIR/mariadb-install.log" 2>&1 \
      || die "mariadb-install-db failed; see .run/mariadb-install.log"
  fi
  # A stale pid or socket left by an unclean stop would make mariadbd refuse to start.
  if [ -f "$MARIADB_PID" ] && ! kill -0 "$(cat "$MARIADB_PID")" 2>/dev/null; then rm -f "$MARIADB_PID"; fi
  rm -f "$MARIADB_SOCKET" "$MARIADB_SOCKET.lock"
  # The test command's instance holds nothing worth a crash-safe commit: the redo log reaches the disk
  # once a second instead of at every commit (a killed mariadbd still loses nothing; only a crash of
  # the machine would), and pages skip the doublewrite buffer. scripts/up keeps the safe defaults.
  local durability=()
  if [ "${CAIRN_DB_THROWAWAY:-0}" = 1 ]; then durability=(--innodb-flush-log-at-trx-commit=2 --innodb-doublewrite=0); fi
  log "starting MariaDB on $CAIRN_DB_HOST:$CAIRN_DB_PORT${durability:+ (throwaway: commits not flushed to disk each time)}"
  setsid mariadbd --no-defaults --datadir="$MARIADB_DATADIR" --socket="$MARIADB_SOCKET" \
    --port="$CAIRN_DB_PORT" --bind-address=127.0.0.1 --user=root --pid-file="$MARIADB_PID" \
    --log-error="$MARIADB_LOG" --skip-name-resolve --character-set-server=utf8mb4 \
    --collation-server=utf8mb4_unicode_ci --max-allowed-packet=64M "${durability[@]}" </dev/null >/dev/null 2>&1 &
  for _ in $(seq 1 150); do
    if mariadb_running; then return 0; fi
    sleep 0.2
  done
  die "MariaDB did not start; see .run/mariadb.log (is port $CAIRN_DB_PORT taken?)"
}

stop_mariadb() {
  export PATH="$PATH:/usr/sbin"
  if mariadb_running; then
    mariadb-admin --no-defaults --socket="$MARIADB_SOCKET" -uroot shutdown || true
  fi
  if [ -f "$MARIADB_PID" ]; then
    local pid; pid=$(cat "$MARIADB_PID")
    for _ in $(seq 1 100); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
    rm -f "$MARIADB_PID"
  fi
}

# Creates the database and two accounts: an owner that runs migrations, and the application's
# account, which may not UPDATE or DELETE the audit trail (see grant_app_privileges).
ensure_database() {
  local db="$1"
  mysql_root <<SQL
CREATE DATABASE IF NOT EXISTS \`$db\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
CREATE USER IF NOT EXISTS '$CAIRN_DB_OWNER_USER'@'127.0.0.1' IDENTIFIED BY '$CAIRN_DB_OWNER_PASSWORD';
ALTER USER '$CAIRN_DB_OWNER_USER'@'127.0.0.1' IDENTIFIED BY '$CAIRN_DB_OWNER_PASSWORD';
CREATE USER IF NOT EXISTS '$CAIRN_DB_APP_USER'@'127.0.0.1' IDENTIFIED BY '$CAIRN_DB_APP_PASSWORD';
ALTER USER '$CAIRN_DB_APP_USER'@'127.0.0.1' IDENTIFIED BY '$CAIRN_DB_APP_PASSWORD';
CREATE USER IF NOT EXISTS '$CAIRN_DB_BLIND_USER'@'127.0.0.1' IDENTIFIED BY '$CAIRN_DB_BLIND_PASSWORD';
ALTER USER '$CAIRN_DB_BLIND_USER'@'127.0.0.1' IDENTIFIED BY '$CAIRN_DB_BLIND_PASSWORD';
GRANT ALL PRIVILEGES ON \`$db\`.* TO '$CAIRN_DB_OWNER_USER'@'127.0.0.1';
FLUSH PRIVILEGES;
SQL
}

# Table-level grants, renewed after every migration: full DML everywhere except the audit trail,
# signatures, recommendations and the committee's signed records (votes, declarations, letters),
# which the application may only read and append to, and users, which it may not delete.
grant_app_privileges() {
  local db="$1" tables t
  local views v
  tables=$(mysql_root -N -e "SELECT table_name FROM information_schema.tables WHERE table_schema='$db' AND table_type='BASE TABLE'")
  views=$(mysql_root -N -e "SELECT table_name FROM information_schema.tables WHERE table_schema='$db' AND table_type='VIEW'")
  {
    # The *_open views are what blinded reads go through; open queries shared by every role join
    # them (signatures_open), so the application's account reads them too.
    for v in $views; do echo "GRANT SELECT ON \`$db\`.\`$v\` TO '$CAIRN_DB_APP_USER'@'127.0.0.1';"; done
    for t in $tables; do
      case "$t" in
        # Append-only: the application may read and add, never change or remove. The REVOKE removes
        # UPDATE/DELETE granted before this rule; the GRANT before it ensures REVOKE finds a grant row.
        audit_events|signatures|recommendations|committee_votes|conflict_declarations|recommendation_letters)
          echo "GRANT SELECT, INSERT ON \`$db\`.\`$t\` TO '$CAIRN_DB_APP_USER'@'127.0.0.1';"
          echo "REVOKE UPDATE, DELETE ON \`$db\`.\`$t\` FROM '$CAIRN_DB_APP_USER'@'127.0.0.1';" ;;
        # Accounts are deactivated, never deleted.
        users)
          echo "GRANT SELECT, INSERT, UPDATE ON \`$db\`.\`$t\` TO '$CAIRN_DB_APP_USER'@'127.0.0.1';"
          echo "REVOKE DELETE ON \`$db\`.\`$t\` FROM '$CAIRN_DB_APP_USER'@'127.0.0.1';" ;;
        knex_migrations|knex_migrations_lock|knex_migrations_checksums) echo "GRANT SELECT ON \`$db\`.\`$t\` TO '$CAIRN_DB_APP_USER'@'127.0.0.1';" ;;
        *) echo "GRANT SELECT, INSERT, UPDATE, DELETE ON \`$db\`.\`$t\` TO '$CAIRN_DB_APP_USER'@'127.0.0.1';" ;;
      esac
    done
    echo "FLUSH PRIVILEGES;"
  } | mysql_root
}

# The blinded account (reads for sponsor, coordinator, administrator): SELECT only on what
# db/classification.ts lists as open (whole tables, open columns, the *_open views), nothing else.
# Its grants on this database are dropped and rebuilt (other databases on the server keep theirs),
# so a column reclassified as closed loses its grant.
grant_blind_privileges() {
  local db="$1" account="'$CAIRN_DB_BLIND_USER'@'127.0.0.1'" names grants
  names=$(mysql_root -N -e "SELECT table_name FROM information_schema.tables WHERE table_schema='$db'")
  grants=$(cd "$ROOT" && printf '%s\n' $names | npx tsx scripts/blind-grants.ts "$db" "$account") \
    || die "could not compute the blinded account's grants"
  {
    echo "DELETE FROM mysql.columns_priv WHERE Db='$db' AND User='$CAIRN_DB_BLIND_USER';"
    echo "DELETE FROM mysql.tables_priv WHERE Db='$db' AND User='$CAIRN_DB_BLIND_USER';"
    echo "FLUSH PRIVILEGES;"
    echo "$grants"
    echo "FLUSH PRIVILEGES;"
  } | mysql_root
}

migrate_database() {
  local db="$1"
  log "migrating database $db"
  (cd "$ROOT" && CAIRN_DB_NAME="$db" CAIRN_DB_AS_OWNER=1 npx tsx scripts/migrate.ts) \
    || die "migrations failed on $db"
  grant_app_privileges "$db"
  grant_blind_privileges "$db"
}

# Start a background process with its pid in .run/NAME.pid and output in .run/NAME.log.
start_daemon() {
  local name="$1"; shift
  stop_daemon "$name"
  (cd "$ROOT" && setsid "$@" </dev/null >"$RUN_DIR/$name.log" 2>&1 & echo $! >"$RUN_DIR/$name.pid")
}

# Every descendant of a pid, deepest first (next start forks a server that may leave the process group).
descendants() {
  local child
  for child in $(pgrep -P "$1" 2>/dev/null); do descendants "$child"; echo "$child"; done
}

stop_daemon() {
  local name="$1" pidfile="$RUN_DIR/$1.pid" pid pids
  [ -f "$pidfile" ] || return 0
  pid=$(cat "$pidfile")
  if kill -0 "$pid" 2>/dev/null; then
    pids="$(descendants "$pid") $pid"
    kill -- "-$pid" 2>/dev/null || true
    kill $pids 2>/dev/null || true
    for _ in $(seq 1 50); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
    kill -9 -- "-$pid" 2>/dev/null || true
    kill -9 $pids 2>/dev/null || true
  fi
  rm -f "$pidfile"
}

wait_for_http() {
  local url="$1" tries="${2:-150}"
  for _ in $(seq 1 "$tries"); do
    if curl -fsS -o /dev/null "$url" 2>/dev/null; then return 0; fi
    sleep 0.2
  done
  return 1
}
