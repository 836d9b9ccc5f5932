#!/usr/bin/env bash
# npm start: install what is missing, build, then run the whole product in the foreground.
source "$(dirname "$0")/lib/common.sh"
ensure_postgres
ensure_node_modules
ensure_build
pg_init "${ERGODEX_PG_DATA:-${ERGODEX_DATA_DIR:-.data}/pg}"
exec node --conditions=react-server --import tsx scripts/supervisor.ts
