#!/usr/bin/env bash
# npm test: the same install steps as npm start, then a throwaway stack of its own
# (private PostgreSQL cluster, fake cluster, fake SMTP, broker, web app on test ports),
# then every vitest project (unit, integration, e2e). Ends with "N passed, N failed".
source "$(dirname "$0")/lib/common.sh"
ensure_postgres
ensure_chromium
ensure_node_modules
ensure_build

# One test stack per checkout at a time: a second `npm test` waits for the first instead of stopping its stack.
mkdir -p .data; exec 9>.data/test.lock
flock -n 9 || { log "another npm test is running in this checkout; waiting for it"; flock 9; }

export ERGODEX_TEST=1
export ERGODEX_DATA_DIR="$ROOT/.data/test-run"
export ERGODEX_PG_PORT="${ERGODEX_TEST_PG_PORT:-54339}"
export ERGODEX_PORT="${ERGODEX_TEST_PORT:-3427}"
export ERGODEX_CLUSTER_PORT="${ERGODEX_TEST_CLUSTER_PORT:-2232}"
export ERGODEX_SMTP_PORT="${ERGODEX_TEST_SMTP_PORT:-2535}"
export ERGODEX_BROKER_PORT="${ERGODEX_TEST_BROKER_PORT:-3428}"
export ERGODEX_PG_TEMPLATE_DB=ergodex_template
export ERGODEX_DIGEST_SECONDS=3
export ERGODEX_POLL_SECONDS=1
# unit, integration and e2e projects share this stack; four slots keep one long run from queueing the rest
export ERGODEX_CLUSTER_SLOTS=4
export NEXTAUTH_URL="http://127.0.0.1:$ERGODEX_PORT"
unset ERGODEX_PG_DATA

# A leftover stack from an interrupted run is stopped, then the throwaway data is wiped.
ERGODEX_DATA_DIR="$ERGODEX_DATA_DIR" bash scripts/stop.sh >/dev/null 2>&1 || true
rm -rf "$ERGODEX_DATA_DIR"; mkdir -p "$ERGODEX_DATA_DIR" test-output
pg_init "$ERGODEX_DATA_DIR/pg"

log "starting the test stack (log: test-output/stack.log)"
node --conditions=react-server --import tsx scripts/supervisor.ts > test-output/stack.log 2>&1 &
stack=$!
cleanup() { kill -TERM "$stack" 2>/dev/null; wait "$stack" 2>/dev/null; }
trap cleanup EXIT
for _ in $(seq 1 240); do
  grep -q "Ergodex is ready" test-output/stack.log && break
  kill -0 "$stack" 2>/dev/null || break
  sleep 0.5
done
if grep -q "Ergodex is ready" test-output/stack.log; then log "test stack is up"; else log "test stack did not come up; see test-output/stack.log"; tail -30 test-output/stack.log; fi
node --conditions=react-server --import tsx scripts/test-prepare.ts || log "template database could not be prepared"

set +e
npx vitest run --reporter=default --reporter=json --outputFile.json=test-output/vitest.json "$@"
code=$?
set -e
node scripts/test-summary.mjs test-output/vitest.json "$code"
