#!/usr/bin/env bash
# `npm start`: install what is missing, start PostgreSQL (the durable cluster in .data/pg) and the
# mail sink on loopback, migrate, build the web app and serve API + web app on one port.
#
# The demo club (accounts with the password published in the README) is loaded on first run
# when the server listens on loopback only, which is what `npm start` does. `--no-demo` (or
# BOARDSIDE_DEMO=0) never loads it: the start for a team's own server. `--demo` (BOARDSIDE_DEMO=1)
# asks for it whatever HOST is - the server itself still refuses to listen beyond loopback while
# demo accounts exist (`npm run db:reset -- --remove-demo` removes them).
source "$(dirname "${BASH_SOURCE[0]}")/lib.sh"
cd "$ROOT"

demo="${BOARDSIDE_DEMO:-}"
for arg in "$@"; do
  case "$arg" in
    --demo) demo=1 ;;
    --no-demo) demo=0 ;;
    *) die "unknown option: $arg (start.sh [--demo | --no-demo])" ;;
  esac
done

PORT="${PORT:-8420}"
HOST="${HOST:-127.0.0.1}"
if [ -z "$demo" ]; then
  case "$HOST" in
    127.* | ::1 | '[::1]' | localhost) demo=1 ;;
    *) demo=0 ;;
  esac
fi
[[ "$demo" =~ ^[01]$ ]] || die "BOARDSIDE_DEMO must be 0 or 1"

ensure_node_modules
pg_use start
pg_up
pg_ensure_db boardside
mail_up

export NODE_ENV="${NODE_ENV:-production}"
export PORT HOST
export DATABASE_URL="${DATABASE_URL:-$(pg_url boardside)}"
export JWT_SECRET="${JWT_SECRET:-$(jwt_secret)}"
export PUBLIC_URL="${PUBLIC_URL:-http://127.0.0.1:$PORT}"
export SMTP_HOST=127.0.0.1 SMTP_PORT MAIL_DIR
export WEB_DIST="${WEB_DIST:-$ROOT/dist}"

build_web
tsx server/cli/migrate.ts
if [ "$demo" = 1 ]; then
  tsx server/cli/seed.ts --if-empty
  signins="(the demo sign-ins are listed above)"
else
  log "no demo data (--no-demo): create the first team by signing up"
  signins="(sign up to create your team)"
fi

cat <<MSG

  Boardside is starting at $PUBLIC_URL   $signins
  Captured e-mail: npm run mail:list   (files in ${MAIL_DIR#"$ROOT/"}/)
  Stop: Ctrl-C here, then npm run stop for PostgreSQL and the mail sink.

MSG
exec tsx server/main.ts
