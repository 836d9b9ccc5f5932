#!/usr/bin/env bash
# Stop what start.sh started from this state dir, by PID: the jobs of the cluster user first
# (their processes are not children of any daemon we could wait for), then sshd, slurmd,
# slurmctld and munged. Idempotent.
set -uo pipefail
source "$(dirname "$0")/env.sh"

PUB=$(bc_public_dir)
export SLURM_CONF="$PUB/slurm.conf"
if [ -f "$SLURM_CONF" ] && bc_alive_pid "$BC_STATE/run/slurmctld.pid" >/dev/null; then
  scancel --user="$BC_USER" 2>/dev/null || true
  for _ in $(seq 40); do
    [ -z "$(squeue -h --user="$BC_USER" --states=RUNNING,COMPLETING -o %i 2>/dev/null)" ] && break
    sleep 0.25
  done
fi

stop_pid() { # name pidfile
  local p
  p=$(bc_alive_pid "$2") || { rm -f "$2"; return 0; }
  kill -TERM "$p" 2>/dev/null
  for _ in $(seq 60); do kill -0 "$p" 2>/dev/null || break; sleep 0.25; done
  if kill -0 "$p" 2>/dev/null; then bc_log "$1 ($p) ignored SIGTERM; sending SIGKILL"; kill -KILL "$p" 2>/dev/null; fi
  rm -f "$2"
  bc_log "stopped $1 ($p)"
}
stop_pid sshd "$BC_STATE/run/sshd.pid"
stop_pid slurmd "$BC_STATE/run/slurmd.pid"
stop_pid slurmctld "$BC_STATE/run/slurmctld.pid"
stop_pid munged "$BC_STATE/run/munged.pid"
exit 0
