#!/usr/bin/env bash
# The API test suite on a real PostgreSQL server: starts a throwaway server (initdb into a temporary
# directory, a free local port, its socket in that directory), runs
# `TEST_DATABASE_URL=postgres://... vitest run --project server --project server-timed` (each test app gets its own database,
# see tests/server/helpers.ts; tests/server/workers.test.ts runs only here), then stops it.
# As root the server runs as the 'postgres' user (created if missing). Installs Debian's postgresql
# when no server binary exists and we are root. Extra arguments go to vitest.
set -euo pipefail
cd "$(dirname "$0")/.."

find_bin() { ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -1; }
PGBIN="$(find_bin)"
if [ -z "$PGBIN" ] || [ ! -x "$PGBIN/initdb" ] || [ ! -x "$PGBIN/postgres" ]; then
  if [ "$(id -u)" = 0 ]; then
    echo "pg-test: installing Debian's postgresql"
    apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql >/dev/null
    PGBIN="$(find_bin)"
  fi
fi
if [ -z "$PGBIN" ] || [ ! -x "$PGBIN/initdb" ]; then echo "pg-test: no PostgreSQL server found (apt-get install -y postgresql)" >&2; exit 1; fi

TMP="$(mktemp -d /tmp/parallax-pg-XXXXXX)"
RUN=()
if [ "$(id -u)" = 0 ]; then
  id postgres >/dev/null 2>&1 || useradd --system --no-create-home --shell /usr/sbin/nologin postgres
  chown postgres "$TMP"
  RUN=(runuser -u postgres --)
fi
PORT="$(node -e 'const s=require("net").createServer();s.listen(0,"127.0.0.1",()=>{console.log(s.address().port);s.close()})')"
stop() {
  "${RUN[@]}" "$PGBIN/pg_ctl" -D "$TMP/data" -m immediate -w stop >/dev/null 2>&1 || true
  rm -rf "$TMP"
}
trap stop EXIT
"${RUN[@]}" "$PGBIN/initdb" -D "$TMP/data" -U parallax --auth=trust -E UTF8 --no-sync >/dev/null
"${RUN[@]}" "$PGBIN/pg_ctl" -D "$TMP/data" -l "$TMP/server.log" -w \
  -o "-p $PORT -k $TMP -c listen_addresses=127.0.0.1 -c fsync=off -c synchronous_commit=off -c full_page_writes=off -c max_connections=400" start >/dev/null
echo "pg-test: PostgreSQL $("$PGBIN/postgres" --version | awk '{print $3}') on 127.0.0.1:$PORT (data in $TMP)"

# The tests that start server processes (durability, backup, uploads) run their children on PGlite
# data directories whatever TEST_DATABASE_URL says: the first pass (npm test) covers them, and
# running them again here would test nothing new. Everything else runs on PostgreSQL, each test
# database copied from a migrated template (CREATE DATABASE ... TEMPLATE, tests/server/helpers.ts).
status=0
TEST_DATABASE_URL="postgres://parallax@127.0.0.1:$PORT/postgres" node node_modules/vitest/vitest.mjs run --project server --project server-timed \
  --exclude tests/server/durability.test.ts --exclude tests/server/backup.test.ts --exclude tests/server/uploads.test.ts "$@" || status=$?
if [ $status -ne 0 ]; then echo "pg-test: the API tests failed on PostgreSQL (server log: last lines below)" >&2; tail -20 "$TMP/server.log" >&2 || true; fi
exit $status
