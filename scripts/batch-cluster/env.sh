# Shared settings of start.sh and stop.sh (sourced). Every value can be set from the environment.
BC_HERE=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
BC_ROOT=$(cd "$BC_HERE/../.." && pwd)
BC_STATE=${ERGODEX_BATCH_STATE_DIR:-$BC_ROOT/.data/batch-cluster}
mkdir -p "$BC_STATE"
BC_STATE=$(cd "$BC_STATE" && pwd)
BC_SSH_PORT=${ERGODEX_BATCH_SSH_PORT:-2422}
BC_CTLD_PORT=${ERGODEX_BATCH_CTLD_PORT:-6837}
BC_SLURMD_PORT=${ERGODEX_BATCH_SLURMD_PORT:-6838}
BC_USER=${ERGODEX_BATCH_USER:-ergodex-hpc}
BC_NODE=${ERGODEX_BATCH_NODE:-ergodex-n1}
BC_PARTITION=${ERGODEX_BATCH_PARTITION:-batch}
BC_CLUSTER=${ERGODEX_BATCH_CLUSTER_NAME:-ergodex-test}
BC_KILL_WAIT=${ERGODEX_BATCH_KILL_WAIT:-5}
# Where the pieces the cluster user must reach live (the scheduler's config and munged's socket):
# inside the state dir when the user can traverse it, else a root-owned folder under /run.
bc_public_dir() {
  if id "$BC_USER" >/dev/null 2>&1 && runuser -u "$BC_USER" -- test -x "$BC_STATE" 2>/dev/null; then
    echo "$BC_STATE/public"
  else
    echo "/run/ergodex-batch-cluster-$BC_CTLD_PORT"
  fi
}
bc_log() { printf 'batch-cluster: %s\n' "$*" >&2; }
# PID from a pid file if that process is alive.
bc_alive_pid() { local f=$1 p; [ -s "$f" ] || return 1; p=$(tr -dc 0-9 < "$f"); [ -n "$p" ] && kill -0 "$p" 2>/dev/null && echo "$p"; }
