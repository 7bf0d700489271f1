# A private PostgreSQL cluster for Skewsmith: created with initdb, listening on 127.0.0.1 only,
# password-protected, owned by the `postgres` user when we run as root (initdb and pg_ctl refuse root).
# Source scripts/lib/common.sh first.
# shellcheck shell=bash

PG_USER="skewsmith"
PG_HOST="127.0.0.1"
PG_STARTED=0

# The newest installed server's bin directory (or the one matching an existing cluster's version).
pg_bin_dir() {
  local want="${1:-}" dir best=""
  if [ -n "$want" ] && [ -x "/usr/lib/postgresql/$want/bin/initdb" ]; then
    echo "/usr/lib/postgresql/$want/bin"
    return 0
  fi
  # Pick the highest major version, compared as numbers.
  best="$(for dir in /usr/lib/postgresql/*/bin; do [ -x "$dir/initdb" ] && echo "$dir"; done |
    sed -E 's#^/usr/lib/postgresql/([0-9]+)/bin$#\1 &#' | sort -n | tail -1 | cut -d' ' -f2)"
  [ -n "$best" ] || die "PostgreSQL server binaries not found under /usr/lib/postgresql/*/bin (is the postgresql package installed?)"
  echo "$best"
}

# Runs a command as the cluster's owner: `postgres` when we are root, ourselves otherwise.
pg_as_owner() {
  if [ "$(id -u)" = 0 ]; then
    # From /, so the postgres user is not left in a directory it may not read.
    (cd / && runuser -u postgres -- "$@")
  else
    "$@"
  fi
}

_pg_owner_can_use() {
  pg_as_owner test -w "$1" 2>/dev/null && pg_as_owner test -x "$1" 2>/dev/null
}

# Creates (once) and starts the cluster in BASE on PORT. MODE "throwaway" trades durability for speed, and
# moves to the next port when PORT is taken (by anything, at any moment up to the bind), up to 20 times.
# Sets PG_BASE, PG_DATA, PG_BIN, PG_PORT, PG_PASSWORD and PG_STARTED (1 when this call started it).
pg_cluster_up() {
  local base="$1" port="$2" mode="${3:-durable}"
  mkdir -p "$base"
  base="$(cd "$base" && pwd -P)"
  if [ "$(id -u)" = 0 ]; then
    getent passwd postgres >/dev/null || die "the postgres user does not exist (is the postgresql package installed?)"
    chown postgres: "$base"
  fi
  chmod 700 "$base"
  if ! _pg_owner_can_use "$base"; then
    # The checkout sits where the postgres user cannot reach (say, under /root): keep the cluster in
    # postgres's home instead and point BASE at it with a symlink, so the layout stays the same.
    local alt
    alt="/var/lib/postgresql/skewsmith-$(echo "$base" | cksum | cut -d' ' -f1)"
    warn "the postgres user cannot reach $base; keeping the cluster in $alt"
    mkdir -p "$alt"
    chown postgres: "$alt"
    chmod 700 "$alt"
    rmdir "$base" 2>/dev/null || true
    [ -e "$base" ] || ln -s "$alt" "$base"
    base="$alt"
  fi
  PG_BASE="$base"
  PG_DATA="$base/data"
  PG_PORT="$port"
  local version=""
  [ -f "$PG_DATA/PG_VERSION" ] && version="$(cat "$PG_DATA/PG_VERSION")"
  PG_BIN="$(pg_bin_dir "$version")"

  if [ ! -f "$PG_DATA/PG_VERSION" ]; then
    say "creating a PostgreSQL cluster in $PG_DATA"
    rm -rf "$PG_DATA"
    random_hex 24 >"$base/password"
    [ "$(id -u)" = 0 ] && chown postgres: "$base/password"
    chmod 600 "$base/password"
    pg_as_owner "$PG_BIN/initdb" -D "$PG_DATA" -U "$PG_USER" --pwfile="$base/password" \
      --auth-local=peer --auth-host=scram-sha-256 -E UTF8 --no-locale >"$base/initdb.log" 2>&1 ||
      die "initdb failed; see $base/initdb.log"
    {
      echo "# Skewsmith: loopback only, no Unix socket."
      echo "listen_addresses = '$PG_HOST'"
      echo "unix_socket_directories = ''"
      if [ "$mode" = throwaway ]; then
        echo "# Throwaway test cluster: speed over durability."
        echo "fsync = off"
        echo "synchronous_commit = off"
        echo "full_page_writes = off"
      fi
    } | pg_as_owner tee -a "$PG_DATA/postgresql.conf" >/dev/null
  fi
  PG_PASSWORD="$(cat "$base/password")"

  if pg_as_owner "$PG_BIN/pg_ctl" -D "$PG_DATA" status >/dev/null 2>&1; then
    local running
    running="$(sed -n 4p "$PG_DATA/postmaster.pid" 2>/dev/null || true)"
    if [ "$running" = "$port" ]; then
      say "PostgreSQL already running on $PG_HOST:$port (left running when we stop)"
      PG_STARTED=0
      return 0
    fi
    say "PostgreSQL is running on port $running; restarting it on $port"
    pg_as_owner "$PG_BIN/pg_ctl" -D "$PG_DATA" -m fast -w stop >/dev/null
  fi
  if [ "$mode" != throwaway ]; then
    require_free_port "$port" "PostgreSQL"
    say "starting PostgreSQL on $PG_HOST:$port"
    pg_as_owner "$PG_BIN/pg_ctl" -D "$PG_DATA" -l "$base/postgres.log" -w -t 60 -o "-p $port" start >/dev/null ||
      die "PostgreSQL did not start; see $base/postgres.log"
    PG_STARTED=1
    return 0
  fi
  # A throwaway cluster takes the first port that really binds: checking first and binding later would race
  # another run doing the same, so a failed start whose log says the address is taken moves on too.
  local tries=0
  while :; do
    if port_in_use "$port"; then
      warn "port $port is taken; trying $((port + 1)) for PostgreSQL"
    else
      say "starting PostgreSQL on $PG_HOST:$port"
      local log_start
      log_start=$(wc -l <"$base/postgres.log" 2>/dev/null || echo 0)
      if pg_as_owner "$PG_BIN/pg_ctl" -D "$PG_DATA" -l "$base/postgres.log" -w -t 60 -o "-p $port" start >/dev/null; then
        PG_PORT="$port"
        PG_STARTED=1
        return 0
      fi
      tail -n +"$((log_start + 1))" "$base/postgres.log" 2>/dev/null | grep -qiE "could not bind|address already in use|could not create any TCP/IP sockets" ||
        die "PostgreSQL did not start; see $base/postgres.log"
      warn "port $port was taken while PostgreSQL started; trying $((port + 1))"
    fi
    tries=$((tries + 1))
    [ "$tries" -lt 20 ] || die "no free port for PostgreSQL from $2 to $port"
    port=$((port + 1))
  done
}

# Stops the cluster in PG_DATA now (fast shutdown), whoever started it.
pg_cluster_stop() {
  pg_as_owner "$PG_BIN/pg_ctl" -D "$PG_DATA" -m fast -w -t 30 stop >/dev/null 2>&1 || warn "pg_ctl stop failed"
}

# Stops the cluster if pg_cluster_up started it.
pg_cluster_down() {
  if [ "${PG_STARTED:-0}" = 1 ] && [ -n "${PG_DATA:-}" ]; then
    say "stopping PostgreSQL"
    pg_as_owner "$PG_BIN/pg_ctl" -D "$PG_DATA" -m fast -w -t 30 stop >/dev/null 2>&1 || warn "pg_ctl stop failed"
    PG_STARTED=0
  fi
}

pg_url() {
  echo "postgres://$PG_USER:$PG_PASSWORD@$PG_HOST:$PG_PORT/$1"
}

_pg_psql() {
  PGPASSWORD="$PG_PASSWORD" "$PG_BIN/psql" -X -q -v ON_ERROR_STOP=1 -h "$PG_HOST" -p "$PG_PORT" -U "$PG_USER" -d postgres "$@"
}

# Creates database NAME unless it exists.
pg_ensure_database() {
  local name="$1"
  if [ "$(_pg_psql -tAc "select 1 from pg_database where datname = '$name'")" != 1 ]; then
    say "creating database $name"
    _pg_psql -c "create database \"$name\""
  fi
}

pg_drop_database() {
  _pg_psql -c "drop database if exists \"$1\" with (force)" >/dev/null 2>&1 || warn "could not drop database $1"
}
