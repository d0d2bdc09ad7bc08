#!/usr/bin/env bash
# Starts a throwaway PostgreSQL cluster on 127.0.0.1 (Debian's packages) and runs the server tests
# against it: `npm run test:server:pg` (or, with --bench, the benches: `npm run bench:pg site`). The cluster
# is removed afterwards.
set -euo pipefail
cd "$(dirname "$0")/.."
bin=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -1)
if [ -z "$bin" ]; then echo "PostgreSQL is not installed (apt-get install -y postgresql)"; exit 1; fi
port=${PG_TEST_PORT:-54329}
dir=$(mktemp -d /tmp/gw-pg-XXXXXX)
chmod 755 "$dir"
run_pg() { if [ "$(id -u)" = 0 ]; then su postgres -s /bin/bash -c "$*"; else bash -c "$*"; fi; }
[ "$(id -u)" = 0 ] && chown postgres "$dir"
run_pg "$bin/initdb -D $dir/data -A trust -U postgres >/dev/null"
run_pg "$bin/pg_ctl -D $dir/data -o '-p $port -k $dir -c listen_addresses=127.0.0.1 -c max_connections=200' -l $dir/log -w start >/dev/null"
trap 'run_pg "$bin/pg_ctl -D $dir/data -m immediate stop >/dev/null" || true; rm -rf "$dir"' EXIT
url="postgres://postgres@127.0.0.1:$port/postgres"
# --bench: the same throwaway server under the benches instead (`npm run bench:pg site`).
if [ "${1:-}" = "--bench" ]; then shift; DATABASE_URL="$url" node --import tsx tests/bench/run.ts "$@"; exit; fi
TEST_DATABASE_URL="$url" npx vitest run --config tests/vitest.config.ts --project server "$@"
