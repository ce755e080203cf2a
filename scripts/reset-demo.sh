#!/usr/bin/env bash
# `npm run db:reset`: drop the `boardside` database of `npm start` and seed the demo club afresh
# (PostgreSQL keeps running). `npm run db:reset -- --remove-demo` instead removes only the demo
# club and its accounts (published password) and keeps everything else.
source "$(dirname "${BASH_SOURCE[0]}")/lib.sh"
cd "$ROOT"

remove=0
for arg in "$@"; do
  case "$arg" in
    --remove-demo) remove=1 ;;
    *) die "unknown option: $arg (reset-demo.sh [--remove-demo])" ;;
  esac
done

ensure_node_modules
pg_use start
pg_up
if [ "$remove" = 0 ]; then pg_drop_db boardside; fi
pg_ensure_db boardside
export DATABASE_URL="${DATABASE_URL:-$(pg_url boardside)}"
export JWT_SECRET="${JWT_SECRET:-$(jwt_secret)}"
tsx server/cli/migrate.ts
if [ "$remove" = 1 ]; then
  tsx server/cli/seed.ts --remove
  log "demo club and accounts removed"
else
  tsx server/cli/seed.ts
  log "demo data reset"
fi
