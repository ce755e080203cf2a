#!/usr/bin/env bash
# `npm test`: everything CI runs. Installs what is missing (npm packages, PostgreSQL, Chromium),
# starts the test cluster (.data/pg-test, its own port, fsync off: nothing in it is kept), a
# throw-away test database and a mail sink on loopback, then runs the type check, the jest
# projects (unit, client, server integration against the real PostgreSQL) and the end-to-end tests
# in headless Chromium against the built web app served by the real server.
#
# `bash scripts/test.sh --setup` only starts the test cluster (keeping the test database), the test
# mail sink, and writes .data/secrets/test-database-url, then leaves them running: after it,
# `npx jest --selectProjects server` works on its own (tests/integration/env.ts reads that file).
source "$(dirname "${BASH_SOURCE[0]}")/lib.sh"
cd "$ROOT"

setup_only=0
for arg in "$@"; do
  case "$arg" in
    --setup) setup_only=1 ;;
    *) die "unknown option: $arg (test.sh [--setup])" ;;
  esac
done

TEST_PORT="${TEST_PORT:-8431}"
export SMTP_PORT="${TEST_SMTP_PORT:-2526}"
export MAIL_DIR="$DATA/mail-test"
RESULTS="$DATA/test-results"

# The test database's URL (with the test cluster's generated password) for jest runs by hand.
write_test_url() {
  private_dir "$SECRETS"
  (umask 077 && pg_url boardside_test >"$SECRETS/test-database-url")
  chmod 600 "$SECRETS/test-database-url"
}

ensure_node_modules
pg_use test

if [ "$setup_only" = 1 ]; then
  pg_up
  pg_ensure_db boardside_test
  write_test_url
  mail_up
  log "test cluster on 127.0.0.1:$PG_PORT (database boardside_test) and mail sink on 127.0.0.1:$SMTP_PORT are running"
  log "now: npx jest --selectProjects server   (npm run stop stops them)"
  exit 0
fi

command -v chromium >/dev/null 2>&1 || apt_install chromium
command -v chromium >/dev/null 2>&1 || die "Chromium is required for the end-to-end tests and could not be installed"

pg_was_running=0
pg_running && pg_was_running=1
pg_up
pg_drop_db boardside_test
pg_ensure_db boardside_test
write_test_url

cleanup() {
  daemon_down "test-server"
  daemon_down "mail-sink-$SMTP_PORT"
  if [ "$pg_was_running" = 0 ]; then pg_down; fi
}
trap cleanup EXIT

rm -rf "$MAIL_DIR" "$RESULTS"
mkdir -p "$RESULTS"
mail_up

export NODE_ENV=test
export DATABASE_URL="$(pg_url boardside_test)"
export JWT_SECRET="test-secret-that-is-long-enough-for-hs256-0123456789"
export BCRYPT_COST=4 LOG_LEVEL=silent SMTP_HOST=127.0.0.1

status=0
log "type check"
tsc --noEmit -p tsconfig.json || status=1
tsc --noEmit -p server/tsconfig.json || status=1

log "jest: unit, client, server integration"
jest --ci --json --outputFile="$RESULTS/jest.json" || status=1

log "end-to-end: build the web app and start the server on 127.0.0.1:$TEST_PORT"
build_web
(
  export PORT="$TEST_PORT" PUBLIC_URL="http://127.0.0.1:$TEST_PORT" WEB_DIST="$ROOT/dist" LOG_LEVEL=warn
  daemon_up "test-server" node "$ROOT/node_modules/.bin/tsx" "$ROOT/server/main.ts"
)
wait_http "http://127.0.0.1:$TEST_PORT/api/health" "the test server" "$DATA/test-server.log"

E2E_BASE_URL="http://127.0.0.1:$TEST_PORT" PLAYWRIGHT_JSON_OUTPUT_NAME="$RESULTS/e2e.json" \
  playwright test --reporter=list,json || status=1

node scripts/test-summary.js "$RESULTS/jest.json" "$RESULTS/e2e.json" || status=1
exit $status
