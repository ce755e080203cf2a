#!/usr/bin/env bash
# Shared helpers for the start, test and stop scripts: install what is missing, run the
# project-local PostgreSQL cluster and the local mail sink. Everything lives under .data/.
set -euo pipefail

ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
DATA="$ROOT/.data"
PG_PORT="${BOARDSIDE_PG_PORT:-54329}"
PG_DATA="$DATA/pg"
PG_RUN="$DATA/pg-run"
SMTP_PORT="${SMTP_PORT:-2525}"
MAIL_DIR="${MAIL_DIR:-$DATA/mail}"
export PATH="$ROOT/node_modules/.bin:$PATH"
# Server-side TypeScript runs with the server's compiler options (legacy decorators for TypeORM).
export TSX_TSCONFIG_PATH="$ROOT/server/tsconfig.json"

log() { printf '\033[1m[boardside]\033[0m %s\n' "$*" >&2; }
die() { printf '\033[1;31m[boardside] %s\033[0m\n' "$*" >&2; exit 1; }

as_root() {
  if [ "$(id -u)" = 0 ]; then "$@"; elif command -v sudo >/dev/null; then sudo "$@"; else die "need root to run: $*"; fi
}

APT_UPDATED=0
apt_install() {
  if [ "$APT_UPDATED" = 0 ]; then
    log "apt-get update"
    as_root apt-get update -qq >&2
    APT_UPDATED=1
  fi
  log "apt-get install $*"
  DEBIAN_FRONTEND=noninteractive as_root apt-get install -y -qq "$@" >/dev/null
}

ensure_node_modules() {
  local stamp="$ROOT/node_modules/.package-lock.json"
  if [ ! -d "$ROOT/node_modules" ] || [ ! -f "$stamp" ] || [ "$ROOT/package-lock.json" -nt "$stamp" ]; then
    log "installing npm dependencies (npm ci)"
    (cd "$ROOT" && npm ci --no-audit --no-fund --loglevel=error)
  fi
}

pg_bin() {
  local dir
  dir=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1 || true)
  if [ -z "$dir" ] || [ ! -x "$dir/initdb" ]; then
    apt_install postgresql
    dir=$(ls -d /usr/lib/postgresql/*/bin | sort -V | tail -n 1)
  fi
  [ -x "$dir/initdb" ] || die "PostgreSQL server binaries not found after install"
  echo "$dir"
}

# Runs a command as the cluster's owner: initdb refuses to run as root.
as_pg() {
  if [ "$(id -u)" = 0 ]; then runuser -u postgres -- "$@"; else "$@"; fi
}

pg_up() {
  local bin; bin=$(pg_bin)
  mkdir -p "$DATA" "$PG_RUN"
  if [ "$(id -u)" = 0 ]; then chown postgres:postgres "$PG_RUN"; fi
  if [ ! -f "$PG_DATA/PG_VERSION" ]; then
    log "creating the PostgreSQL cluster in .data/pg"
    mkdir -p "$PG_DATA"
    if [ "$(id -u)" = 0 ]; then chown postgres:postgres "$PG_DATA"; fi
    as_pg "$bin/initdb" -D "$PG_DATA" -U postgres -A trust -E UTF8 --no-locale >/dev/null
  fi
  if ! as_pg "$bin/pg_ctl" -D "$PG_DATA" status >/dev/null 2>&1; then
    log "starting PostgreSQL on 127.0.0.1:$PG_PORT"
    as_pg "$bin/pg_ctl" -D "$PG_DATA" -l "$PG_DATA/server.log" -w -t 60 \
      -o "-c listen_addresses=127.0.0.1 -p $PG_PORT -k $PG_RUN -c fsync=off -c max_connections=200" start >/dev/null \
      || { tail -n 20 "$PG_DATA/server.log" >&2; die "PostgreSQL did not start"; }
  fi
}

pg_ensure_db() {
  local db="$1" bin; bin=$(pg_bin)
  local psql=("$bin/psql" -h 127.0.0.1 -p "$PG_PORT" -U postgres -v ON_ERROR_STOP=1 -qtA)
  if [ "$("${psql[@]}" -d postgres -c "select 1 from pg_roles where rolname='boardside'")" != 1 ]; then
    "${psql[@]}" -d postgres -c "create role boardside login password 'boardside'"
  fi
  if [ "$("${psql[@]}" -d postgres -c "select 1 from pg_database where datname='$db'")" != 1 ]; then
    log "creating database $db"
    "${psql[@]}" -d postgres -c "create database $db owner boardside"
  fi
}

pg_drop_db() {
  local db="$1" bin; bin=$(pg_bin)
  "$bin/psql" -h 127.0.0.1 -p "$PG_PORT" -U postgres -qtA -d postgres -c "drop database if exists $db with (force)" >/dev/null
}

pg_down() {
  local bin; bin=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1 || true)
  if [ -n "$bin" ] && [ -f "$PG_DATA/PG_VERSION" ] && as_pg "$bin/pg_ctl" -D "$PG_DATA" status >/dev/null 2>&1; then
    log "stopping PostgreSQL"
    as_pg "$bin/pg_ctl" -D "$PG_DATA" -m fast stop >/dev/null
  fi
}

# Starts a background process and records its pid in .data/<name>.pid unless it already runs.
daemon_up() {
  local name="$1"; shift
  local pidfile="$DATA/$name.pid"
  mkdir -p "$DATA"
  if [ -f "$pidfile" ] && kill -0 "$(cat "$pidfile")" 2>/dev/null; then return 0; fi
  nohup "$@" >"$DATA/$name.log" 2>&1 &
  echo $! >"$pidfile"
}

daemon_down() {
  local pidfile="$DATA/$1.pid"
  if [ -f "$pidfile" ]; then
    local pid; pid=$(cat "$pidfile")
    if kill -0 "$pid" 2>/dev/null; then
      log "stopping $1"
      kill "$pid" 2>/dev/null || true
      for _ in $(seq 1 50); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
      kill -9 "$pid" 2>/dev/null || true
    fi
    rm -f "$pidfile"
  fi
}

wait_http() {
  local url="$1" name="$2" logf="${3:-}"
  for _ in $(seq 1 150); do
    if node -e "fetch(process.argv[1]).then(r=>process.exit(r.ok?0:1)).catch(()=>process.exit(1))" "$url"; then return 0; fi
    sleep 0.2
  done
  [ -n "$logf" ] && tail -n 30 "$logf" >&2
  die "$name did not answer at $url"
}

wait_port() {
  local port="$1" name="$2" logf="${3:-}"
  for _ in $(seq 1 100); do
    if node -e "const s=require('net').connect(+process.argv[1],'127.0.0.1');s.on('connect',()=>process.exit(0));s.on('error',()=>process.exit(1))" "$port"; then return 0; fi
    sleep 0.1
  done
  [ -n "$logf" ] && tail -n 30 "$logf" >&2
  die "$name did not listen on port $port"
}

mail_up() {
  mkdir -p "$MAIL_DIR"
  SMTP_PORT="$SMTP_PORT" MAIL_DIR="$MAIL_DIR" daemon_up "mail-sink-$SMTP_PORT" node "$ROOT/node_modules/.bin/tsx" "$ROOT/scripts/mail-sink.ts"
  wait_port "$SMTP_PORT" "the mail sink" "$DATA/mail-sink-$SMTP_PORT.log"
}

# The JWT signing secret of this machine's demo install, made once and kept in .data/.
jwt_secret() {
  local f="$DATA/jwt-secret"
  mkdir -p "$DATA"
  [ -s "$f" ] || node -e "process.stdout.write(require('crypto').randomBytes(48).toString('base64url'))" >"$f"
  cat "$f"
}

web_build_needed() {
  [ ! -f "$ROOT/dist/index.html" ] && return 0
  local newer
  newer=$(find "$ROOT/app" "$ROOT/components" "$ROOT/store" "$ROOT/sync" "$ROOT/shared" "$ROOT/assets" \
    "$ROOT/app.json" "$ROOT/package-lock.json" "$ROOT/metro.config.js" "$ROOT/babel.config.js" \
    "$ROOT/scripts/write-service-worker.js" \
    -newer "$ROOT/dist/index.html" -print -quit 2>/dev/null)
  [ -n "$newer" ]
}

build_web() {
  if web_build_needed; then
    log "building the web app (expo export)"
    (cd "$ROOT" && CI=1 expo export -p web --output-dir dist >"$DATA/web-build.log" 2>&1 \
      && node scripts/write-service-worker.js dist >>"$DATA/web-build.log" 2>&1) \
      || { tail -n 40 "$DATA/web-build.log" >&2; die "web build failed (see .data/web-build.log)"; }
  fi
}
