#!/usr/bin/env bash
# npm stop: stop the supervisor (which stops its children in order), then any child left behind, by PID.
set -u
cd "$(dirname "$0")/.."
run="${ERGODEX_DATA_DIR:-.data}/run"
[ -d "$run" ] || { echo "nothing is running"; exit 0; }
stop_pid() { # pid, signal
  kill -0 "$1" 2>/dev/null || return 0
  kill "-$2" "$1" 2>/dev/null
  for _ in $(seq 1 100); do kill -0 "$1" 2>/dev/null || return 0; sleep 0.2; done
  kill -KILL "$1" 2>/dev/null
}
if [ -f "$run/supervisor.pid" ]; then stop_pid "$(cat "$run/supervisor.pid")" TERM; rm -f "$run/supervisor.pid"; fi
for f in "$run"/*.pid; do
  [ -f "$f" ] || continue
  name=$(basename "$f" .pid); sig=TERM; [ "$name" = postgres ] && sig=INT
  stop_pid "$(cat "$f")" "$sig"; rm -f "$f"; echo "stopped $name"
done
echo "Ergodex stopped"
