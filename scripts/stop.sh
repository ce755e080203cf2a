#!/usr/bin/env bash
# `npm run stop`: stop everything `npm start` or `npm test` left running.
source "$(dirname "${BASH_SOURCE[0]}")/lib.sh"
for pidfile in "$DATA"/*.pid; do
  [ -e "$pidfile" ] || continue
  daemon_down "$(basename "$pidfile" .pid)"
done
pg_down   # both clusters (start and test)
