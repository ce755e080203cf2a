#!/usr/bin/env bash
# `npm run bench`: benchmarks on this machine, reported as figures (never timed test assertions).
# Starts its own database (boardside_bench, in the test cluster: throw-away data), mail sink and
# server like `npm test` does.
source "$(dirname "${BASH_SOURCE[0]}")/lib.sh"
cd "$ROOT"

BENCH_PORT="${BENCH_PORT:-8434}"
export SMTP_PORT="${BENCH_SMTP_PORT:-2527}" MAIL_DIR="$DATA/mail-bench"
ensure_node_modules
command -v chromium >/dev/null 2>&1 || apt_install chromium
pg_use test
pg_up
pg_drop_db boardside_bench
pg_ensure_db boardside_bench
mail_up
trap 'daemon_down bench-server; daemon_down "mail-sink-$SMTP_PORT"' EXIT

export NODE_ENV=production LOG_LEVEL=warn BCRYPT_COST=4
export DATABASE_URL="$(pg_url boardside_bench)"
export JWT_SECRET="bench-secret-that-is-long-enough-for-hs256-0123456789"
build_web
(
  export PORT="$BENCH_PORT" PUBLIC_URL="http://127.0.0.1:$BENCH_PORT" WEB_DIST="$ROOT/dist" LOGIN_LIMIT_PER_IP=100000
  daemon_up bench-server node "$ROOT/node_modules/.bin/tsx" "$ROOT/server/main.ts"
)
wait_http "http://127.0.0.1:$BENCH_PORT/api/health" "the bench server" "$DATA/bench-server.log"

# BENCH_ONLY=sync|board|clock|review|convergence runs one step (default: all of them).
step() { [ -z "${BENCH_ONLY:-}" ] || [ "$BENCH_ONLY" = "$1" ]; }

if step sync; then
  log "sync: push and pull throughput against raw PostgreSQL (50,000 observations), then a first pull in the browser"
  BENCH_BASE_URL="http://127.0.0.1:$BENCH_PORT" tsx bench/sync.ts
fi

if step board; then
  log "board: 50,000 stored observations, 200 taps in two passes"
  BENCH_BASE_URL="http://127.0.0.1:$BENCH_PORT" tsx bench/board.ts
fi

if step clock; then
  log "clock: a pair timed with touch taps, lanes 0.3 s apart (stored crossing vs event time, tap to lap shown)"
  BENCH_BASE_URL="http://127.0.0.1:$BENCH_PORT" tsx bench/clock.ts
fi

if step review; then
  log "review: 500,000 notes of 40 skaters over 53 ISO weeks; the group and skater matrices, one week, the CSV export, each beside raw SQL"
  BENCH_BASE_URL="http://127.0.0.1:$BENCH_PORT" tsx bench/review.ts
fi

if step convergence; then
  log "sync convergence: 20 clients x 500 ops, requests and replies lost, clocks skewed"
  tsx bench/convergence.ts
fi
